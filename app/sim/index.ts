/** The simulated bench: simulated instruments around a computed circuit. */
export * from './simulated-bench';
export * from './faults';
export * from './pty-pair';
export * from './bench-model';
export * from './circuit-under-test';
export { SIMULATED_MANUFACTURER } from './sim-instrument';
export { SIM_METER_AC_BANDWIDTH_HZ } from './sim-meter';
export { SIM_GENERATOR_LIMITS, type GeneratorSettings } from './sim-generator';
export { LOOPBACK_HOST, SIM_SERIAL_BAUD } from './endpoints';
export { SIMULATED_BENCH_DEFAULTS } from './defaults';

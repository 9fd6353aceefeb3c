/**
 * What the simulated bench does when nobody says otherwise — the same for
 * `rolloff sim`, `sweep --simulated`, `serve --simulated`, `resume` and the
 * window's Bench view, so one sweep takes as long and reads as noisy on each.
 * Real time, so the simulated bench keeps a real bench's pace; 100 µV RMS of
 * flat noise, so the fits have noise to report and stated uncertainties are
 * never zero (our choice, no source).
 */
export const SIMULATED_BENCH_DEFAULTS = {
  /** Bench seconds per wall-clock second. */
  timeScale: 1,
  /** Flat white noise on every reading (the measurement's own), volts RMS. */
  measurementNoiseVrms: 1e-4,
  /** Random seed of the noise and faults. */
  seed: 1,
} as const;

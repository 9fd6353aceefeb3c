/** Instrument roles, profiles and the controls a sweep drives. */
export * from './clock';
export * from './roles';
export * from './errors';
export * from './stimulus';
export * from './template';
export * from './profile';
export * from './profile-store';
export * from './operation';
export * from './generator';
export * from './meter';
export * from './scope';
export * from './waveform-decode';
export * from './open-instrument';
export * from './profile-check';
export * from './bench-name';
export * from './bench-key';

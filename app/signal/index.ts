export * from './errors';
export * from './sine-fit';
export * from './two-channel';
export * from './distortion';
export * from './cramer-rao';
export * from './student-t';
export * from './levenberg-marquardt';
export * from './log-stage-fit';
export * from './single-pole-fit';
export * from './outliers';
/**
 * Noise and stability from measurements: welchPsd(samples, fs, { segmentLength })
 * → one-sided density (V/√Hz) with its degrees of freedom, relative standard
 * errors and 95 % interval; phaseMarginFromPeakingDb(measured peaking) → phase
 * margin of the equivalent second-order loop.
 */
export * from './welch';
/** welchPsdOfRecords(records, fs, options): one estimate over several separate records (degrees of freedom add). */
export * from './welch-records';
export * from './peaking-phase-margin';
/** shapedNoiseRecord({ length, sampleRateHz, densityVPerRtHz, gaussian }) → a Gaussian record with that one-sided density. */
export * from './shaped-noise';

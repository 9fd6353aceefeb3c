/** Run analysis (pure): figures, deviations, flags and verdicts from measured points and theory. */
export * from './crossing';
export * from './passband';
export * from './rolloff';
export * from './gain-limit';
export * from './deviation';
export * from './verdict';
export * from './analyze-ac';
export * from './drift';
export * from './usable-points';
export * from './stability-estimate';
export * from './noise-figures';
export * from './noise-figure-rows';

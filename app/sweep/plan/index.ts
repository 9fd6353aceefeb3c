/** Sweep planning (pure): grid, amplitude, settling, integration, refinement and duration. */
export * from './types';
export * from './settle';
export * from './amplitude';
export * from './plan';
export * from './refine';
export * from './defaults';
export * from './noise-plan';

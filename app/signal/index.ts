export * from './errors';
export * from './sine-fit';
export * from './two-channel';
export * from './distortion';

export * from './engineering';
export * from './decibels';
export * from './grid';
export * from './duration';
export * from './uncertainty';

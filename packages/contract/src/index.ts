export * from './vocabulary';
export * from './common';
export * from './auth';

export * from './vocabulary';
export * from './common';
export * from './auth';
export * from './visits';
export * from './day';

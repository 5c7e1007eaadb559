export * from './vocabulary';
export * from './common';
export * from './auth';
export * from './sites';
export * from './team';
export * from './visits';
export * from './day';

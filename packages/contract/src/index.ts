export * from './vocabulary';
export * from './common';
export * from './auth';
export * from './work-orders';
export * from './roster';

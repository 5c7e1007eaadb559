export * from './vocabulary';
export * from './common';
export * from './auth';
export * from './fix-quality';
export * from './unit-file';

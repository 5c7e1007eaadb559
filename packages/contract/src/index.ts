export * from './vocabulary';
export * from './common';
export * from './auth';
export * from './watchlist';
export * from './agreements';

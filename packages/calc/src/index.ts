export * from './refrigerants';
export * from './saturation-data';
export * from './sensor-check';
export * from './leak-rules';
export * from './dates';

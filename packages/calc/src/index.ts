// @coilpath/calc — everything Coilpath computes: pure TypeScript, no I/O.
export * from './refrigerants';
export * from './saturation-data';
export * from './sensor-check';
export * from './leak-rules';
export * from './fix-quality';
export * from './repeat-alarms';
export * from './geo';
export * from './route';
export * from './certification';
export * from './schedule';
export * from './even-out';
export * from './agreements';
export * from './dates';
export * from './units';
export * from './csv';

// Snapshot formats: the reader contract, the readers, and CSV writing.
export * from './snapshot';
export * from './reader';
export * from './csv';
export * from './registry';
export * from './csvWrite';

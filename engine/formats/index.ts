// Snapshot formats: the reader contract, the readers, loading, description and mapping proposals, CSV writing.
export * from './snapshot';
export * from './reader';
export * from './byteSource';
export * from './description';
export * from './csv';
export * from './npy';
export * from './npz';
export * from './hdf5';
export * from './registry';
export * from './propose';
export * from './signature';
export * from './validate';
export * from './csvWrite';

export * from './ewald';
export * from './params';
export * from './kernelTable';
export * from './cellList';
export * from './kSpace';
export * from './realSpace';

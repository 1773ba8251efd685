// torusgrav engine: pure numerical code and file parsers (typed arrays in, typed arrays out).
export * from './box';
export * from './softening';
export * from './targets';
export * from './util/random';
export * from './special/erf';
export * from './ewald/index';
export * from './demo/demoSnapshot';
export * from './formats/index';
export * from './orders/index';
export * from './units';
export * from './pme/index';

// Comparison statistics: relative errors, percentiles, distributions, neighbours, the force-accuracy report.
export * from './relativeError';
export * from './percentile';
export * from './bins';
export * from './errorSummary';
export * from './errorReport';
export * from './neighbours';
export * from './checkSummary';

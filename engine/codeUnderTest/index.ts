// The demo's approximate "code under test": a coarse particle-mesh solver and its FFT.
export * from './fft';
export * from './meshForces';

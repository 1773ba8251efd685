// The demo's approximate "code under test": a coarse particle-mesh solver (on the PME engine's mesh FFT).
export * from './meshForces';

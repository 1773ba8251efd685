// Entry point of the WebAssembly kernels: re-exports each kernel module.
export { structurePaired, structurePairedAdd, fourierPairedLoad, fourierPaired } from './kspace';
export { setKernel, realSpaceAll, realSpaceTargets } from './realspace';
export { particlesPrepare, cellListFill, deinterleave4, addSoaUnsorted, addInto, finalizeAll, positionsRepeat } from './prepare';

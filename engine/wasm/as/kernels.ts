// Entry point of the WebAssembly kernels: re-exports each kernel module.
export { structureFactor, fourierTargets } from './kspace';
export { setKernel, realSpaceAll, realSpaceTargets } from './realspace';
export { particlesPrepare, cellListFill, deinterleave4, addInterleaved, deinterleave2, addSoaUnsorted, addInto, finalizeAll } from './prepare';

// The kernels' relaxed-SIMD build runs in the tests as in the command line (app/cli/wasmFeatures.ts);
// describeKernelPaths (tests/helpers/kernelPaths.ts) also runs suites on the plain SIMD build and the
// JavaScript twins.
import { relaxedSimdEnable } from '../../app/cli/wasmFeatures';

relaxedSimdEnable();

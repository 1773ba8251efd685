// Entry point of the `torusgrav` command line (bundled to dist-cli/torusgrav.mjs; see bin/torusgrav.mjs).
// Only what must come first is imported statically: V8's flag for relaxed SIMD (before any kernel module
// is compiled) and the early start of a forces run's worker threads; the command line itself loads after.
import { relaxedSimdEnable } from './wasmFeatures';
import { forcesPrestart } from './workerWarm';

relaxedSimdEnable();
forcesPrestart(process.argv.slice(2));
const { cliRun } = await import('./cliRun');
const { processIo } = await import('./cliIo');
process.exitCode = await cliRun(process.argv.slice(2), processIo());

// Entry point of the `torusgrav` command line (bundled to dist-cli/torusgrav.mjs; see bin/torusgrav.mjs).
import { cliRun } from './cliRun';
import { processIo } from './cliIo';
import { relaxedSimdEnable } from './wasmFeatures';

relaxedSimdEnable(); // before any kernel module is compiled
process.exitCode = await cliRun(process.argv.slice(2), processIo());

#!/usr/bin/env node
// Thin launcher: the CLI is compiled to dist-cli/ by `npm run build:cli` (run by `npm install` via `prepare`).
import { existsSync } from 'node:fs';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { dirname, join } from 'node:path';

const built = join(dirname(fileURLToPath(import.meta.url)), '..', 'dist-cli', 'torusgrav.mjs');
if (!existsSync(built)) {
  process.stderr.write('torusgrav: the command line is not built yet; run `npm run build:cli` in the project folder\n');
  process.exit(2);
}
await import(pathToFileURL(built).href);

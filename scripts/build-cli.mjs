// `npm run build:cli`: compiles the command line to dist-cli/ with esbuild code splitting. Entries: the
// command (torusgrav.mjs) and the two thread workers (forceWorker.mjs, pmeWorker.mjs, resolved beside the
// bundle by parallelEwald.ts / parallelPme.ts); shared code goes to chunk-*.mjs in the same folder, and each
// command's module is a dynamic import() (app/cli/cliRun.ts), so `forces` never parses the other commands.
// Chunks left over from an earlier build are removed after the new ones are written.
import { build } from 'esbuild';
import { mkdirSync, readdirSync, rmSync } from 'node:fs';
import { basename, join, resolve } from 'node:path';

const root = resolve(import.meta.dirname, '..');
const outdir = join(root, 'dist-cli');
mkdirSync(outdir, { recursive: true });
const result = await build({
  absWorkingDir: root,
  entryPoints: { torusgrav: 'app/cli/main.ts', forceWorker: 'app/cli/forceWorker.ts', pmeWorker: 'app/cli/pmeWorker.ts' },
  bundle: true,
  splitting: true,
  platform: 'node',
  format: 'esm',
  target: 'node20',
  external: ['h5wasm', 'h5wasm/node'],
  outdir,
  outExtension: { '.js': '.mjs' },
  chunkNames: 'chunk-[hash]',
  metafile: true,
  logLevel: 'warning',
});
const written = new Set(Object.keys(result.metafile.outputs).map((p) => basename(p)));
for (const f of readdirSync(outdir)) {
  if (/^chunk-.*\.mjs$/.test(f) && !written.has(f)) rmSync(join(outdir, f), { force: true });
}

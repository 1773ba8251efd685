// `npm run bench`: bundles the benchmark sources with esbuild and runs them; each prints JSON lines.
// `npm run bench -- --only=ewald,pme` runs only the benches whose names start with those words; other
// arguments (e.g. --quick) go to every bench. The command line is rebuilt first, so that the figures are
// those of the code in the tree.
import { build } from 'esbuild';
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdirSync } from 'node:fs';
import { pathToFileURL } from 'node:url';
import { resolve } from 'node:path';

const root = resolve(import.meta.dirname, '..');
process.chdir(root);
execFileSync('npm', ['run', '--silent', 'build:cli'], { stdio: 'inherit' });
const onlyArg = process.argv.find((a) => a.startsWith('--only='));
const only = onlyArg ? onlyArg.slice('--only='.length).split(',') : null;
const passed = process.argv.slice(2).filter((a) => a !== onlyArg);
mkdirSync('dist-bench', { recursive: true });
const benches = ['ewaldBench', 'ordersBench', 'loadBench', 'pmeBench'].filter((b) => !only || only.some((o) => b.startsWith(o)));
for (const name of benches) {
  await build({
    entryPoints: [`scripts/bench/${name}.ts`],
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    outfile: `dist-bench/${name}.mjs`,
    logLevel: 'warning',
    external: ['h5wasm', 'h5wasm/node'],
  });
  const r = spawnSync(process.execPath, [`dist-bench/${name}.mjs`, ...passed], {
    stdio: 'inherit',
    env: { ...process.env, TORUSGRAV_WORKER_URL: pathToFileURL(resolve('dist-cli/forceWorker.mjs')).href },
  });
  if (r.status !== 0) process.exit(r.status ?? 1);
}

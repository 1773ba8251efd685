// `npm run bench`: bundles the benchmark sources with esbuild and runs them; each prints JSON lines.
import { build } from 'esbuild';
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync } from 'node:fs';
import { pathToFileURL } from 'node:url';
import { resolve } from 'node:path';

const root = resolve(import.meta.dirname, '..');
process.chdir(root);
if (!existsSync('dist-cli/forceWorker.mjs')) execFileSync('npm', ['run', '--silent', 'build:cli'], { stdio: 'inherit' });
mkdirSync('dist-bench', { recursive: true });
const benches = ['ewaldBench', 'ordersBench', 'loadBench', 'pmeBench'];
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
  const r = spawnSync(process.execPath, [`dist-bench/${name}.mjs`, ...process.argv.slice(2)], {
    stdio: 'inherit',
    env: { ...process.env, TORUSGRAV_WORKER_URL: pathToFileURL(resolve('dist-cli/forceWorker.mjs')).href },
  });
  if (r.status !== 0) process.exit(r.status ?? 1);
}

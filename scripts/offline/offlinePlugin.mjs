// Vite plugin: after a production build, lists every file written (page, scripts, styles, worker
// bundles, lazily loaded chunks such as the HDF5 reader, public files) and writes sw.js, the service
// worker that caches them for offline use (serviceWorkerSource.mjs). The cache is named by a hash of
// the files' contents, so a new build replaces it. Plain JavaScript so that vite.config.ts can import it
// with its extension.
import { createHash } from 'node:crypto';
import { readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { join, relative, sep } from 'node:path';
import { serviceWorkerSource } from './serviceWorkerSource.mjs';

export const SERVICE_WORKER_FILE = 'sw.js';

/** @param {string} dir @returns {string[]} */
function filesUnder(dir) {
  const out = [];
  for (const e of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, e.name);
    if (e.isDirectory()) out.push(...filesUnder(p));
    else if (e.isFile()) out.push(p);
  }
  return out;
}

/** The files to cache besides the page: relative paths with '/', sorted; not sw.js, index.html or source maps. */
export function offlineFiles(outDir) {
  return filesUnder(outDir)
    .map((p) => relative(outDir, p).split(sep).join('/'))
    .filter((f) => f !== SERVICE_WORKER_FILE && !f.endsWith('.map') && f !== 'index.html')
    .sort();
}

/** Writes sw.js into `outDir` for the files there; returns the cache version (a content hash). */
export function serviceWorkerWrite(outDir) {
  const files = offlineFiles(outDir);
  const hash = createHash('sha256');
  for (const f of [...files, 'index.html']) {
    hash.update(f);
    hash.update(readFileSync(join(outDir, f)));
  }
  const version = hash.digest('hex').slice(0, 16);
  writeFileSync(join(outDir, SERVICE_WORKER_FILE), serviceWorkerSource(version, files));
  return version;
}

/** The plugin (production builds only). */
export function offlinePlugin() {
  let outDir = null;
  return {
    name: 'torusgrav-offline',
    apply: 'build',
    writeBundle(options) {
      if (options.dir) outDir = options.dir;
    },
    closeBundle() {
      if (outDir) serviceWorkerWrite(outDir);
    },
  };
}

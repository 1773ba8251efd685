/**
 * Snapshot loading benchmark: one JSON object per line. Writes 10^6 particles (x, y, z, m; float64;
 * seeded) as .npy (N,4), CSV (17 digits), .npz (stored) and HDF5 into a temp folder, then loads each
 * in a fresh child process through the CLI's streaming path and reports wall seconds (best of 3), the
 * child's resident memory during the load above its level before it (sampled every 2 ms and at the
 * end), and that over the data size (32 bytes per particle: positions and masses as float64).
 * Run: npx tsx scripts/bench/loadBench.ts [--n N] [--quick]
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { zipSync } from 'fflate';
import { snapshotFileRead, h5wasmNode } from '../../app/cli/snapshotFile';
import { csvChunks } from '../../engine/formats/csvWrite';
import { randomSeeded } from '../../engine/util/random';

function emit(o: Record<string, unknown>): void {
  process.stdout.write(JSON.stringify(o) + '\n');
}

/** A .npy (format 1.0) of float64 little-endian values with the given shape. */
function npyBytes(values: Float64Array, shape: number[]): Uint8Array {
  let dict = `{'descr': '<f8', 'fortran_order': False, 'shape': (${shape.join(', ')}${shape.length === 1 ? ',' : ''}), }`;
  while ((10 + dict.length + 1) % 64 !== 0) dict += ' ';
  dict += '\n';
  const out = new Uint8Array(10 + dict.length + values.byteLength);
  out.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0, dict.length & 0xff, dict.length >> 8]);
  out.set(new TextEncoder().encode(dict), 10);
  out.set(new Uint8Array(values.buffer, values.byteOffset, values.byteLength), 10 + dict.length);
  return out;
}

async function child(path: string): Promise<void> {
  if (path.endsWith('.h5')) {
    const h5 = (await h5wasmNode()) as { ready: Promise<unknown> };
    await h5.ready;
  }
  // Peak resident memory during the load, sampled (the process's maxRSS would include start-up).
  const base = process.memoryUsage().rss;
  let peak = base;
  const sampler = setInterval(() => {
    peak = Math.max(peak, process.memoryUsage().rss);
  }, 2);
  const t0 = performance.now();
  const s = await snapshotFileRead(path);
  const seconds = (performance.now() - t0) / 1000;
  clearInterval(sampler);
  peak = Math.max(peak, process.memoryUsage().rss);
  process.stdout.write(JSON.stringify({ seconds, count: s.count, baseRss: base, peakRss: peak }) + '\n');
}

async function main(): Promise<void> {
  const args = process.argv.slice(2);
  const childAt = args.indexOf('--child');
  if (childAt >= 0) return child(args[childAt + 1]);
  const nAt = args.indexOf('--n');
  const n = nAt >= 0 ? Number(args[nAt + 1]) : args.includes('--quick') ? 100_000 : 1_000_000;
  const dir = mkdtempSync(join(tmpdir(), 'torusgrav-loadbench-'));
  try {
    const r = randomSeeded(7);
    const data = new Float64Array(4 * n);
    for (let i = 0; i < n; i++) {
      data[4 * i] = r();
      data[4 * i + 1] = r();
      data[4 * i + 2] = r();
      data[4 * i + 3] = 1 / n;
    }
    const pos = new Float64Array(3 * n);
    const mass = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      pos.set(data.subarray(4 * i, 4 * i + 3), 3 * i);
      mass[i] = data[4 * i + 3];
    }
    const files: [string, string][] = [];
    const npy = join(dir, 'snap.npy');
    writeFileSync(npy, npyBytes(data, [n, 4]));
    files.push(['npy', npy]);
    const csv = join(dir, 'snap.csv');
    writeFileSync(
      csv,
      [...csvChunks(
        [
          { name: 'x', values: pos, stride: 3, offset: 0 },
          { name: 'y', values: pos, stride: 3, offset: 1 },
          { name: 'z', values: pos, stride: 3, offset: 2 },
          { name: 'm', values: mass },
        ],
        n,
        65536,
      )].join(''),
    );
    files.push(['csv', csv]);
    const npz = join(dir, 'snap.npz');
    writeFileSync(npz, zipSync({ 'pos.npy': [npyBytes(pos, [n, 3]), { level: 0 }], 'mass.npy': [npyBytes(mass, [n]), { level: 0 }] }));
    files.push(['npz', npz]);
    const h5 = (await h5wasmNode()) as {
      ready: Promise<unknown>;
      File: new (p: string, m: string) => { create_dataset(o: object): unknown; close(): void };
    };
    await h5.ready;
    const h5path = join(dir, 'snap.h5');
    const f = new h5.File(h5path, 'w');
    f.create_dataset({ name: 'pos', data: pos, shape: [n, 3], dtype: '<d' });
    f.create_dataset({ name: 'mass', data: mass, shape: [n], dtype: '<d' });
    f.close();
    files.push(['hdf5', h5path]);

    const dataBytes = 32 * n;
    for (const [format, path] of files) {
      let best: { seconds: number; count: number; baseRss: number; peakRss: number } | null = null;
      for (let rep = 0; rep < 3; rep++) {
        const c = spawnSync(process.execPath, [...process.execArgv, process.argv[1], '--child', path], { encoding: 'utf8' });
        if (c.status !== 0) throw new Error(`child failed for ${format}: ${c.stderr}`);
        const r2 = JSON.parse(c.stdout.trim().split('\n').pop()!);
        if (r2.count !== n) throw new Error(`${format}: read ${r2.count} particles, wrote ${n}`);
        if (!best || r2.seconds < best.seconds) best = r2;
      }
      const extra = best!.peakRss - best!.baseRss;
      emit({
        bench: 'load',
        format,
        particles: n,
        fileBytes: statSync(path).size,
        seconds: Number(best!.seconds.toFixed(3)),
        particlesPerSecond: Math.round(n / best!.seconds),
        dataBytes,
        memoryAboveBaseline: extra,
        memoryOverData: Number((extra / dataBytes).toFixed(2)),
      });
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

await main();

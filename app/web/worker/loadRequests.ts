/**
 * The worker's file requests: describe a file (its arrays and a proposed mapping) and load it with a
 * mapping, streaming from the File in slices (a large file is never held whole on the page), with
 * progress while parsing, then the checks that need every particle (masses, softening, box).
 */
import { type Box, boxMake } from '../../../engine/box';
import { type ByteSource, blobSource, bytesSource } from '../../../engine/formats/byteSource';
import { snapshotDescribe, snapshotLoad } from '../../../engine/formats/registry';
import type { VectorRef } from '../../../engine/formats/snapshot';
import { snapshotValidate } from '../../../engine/formats/validate';
import { boxGuess } from '../state/snapshotLoad';
import { type DescribePayload, type DescribeRequest, LIMIT_ADVICE, type LoadPayload, type LoadRequest } from './loadProtocol';

export { LIMIT_ADVICE } from './loadProtocol';


function sourceOf(file: Blob | Uint8Array): ByteSource {
  return file instanceof Uint8Array ? bytesSource(file) : blobSource(file);
}

/**
 * The same source, reporting the furthest byte read so far as a fraction of its size (binary readers
 * report progress per array only; a large single array would otherwise show none until it is done).
 */
export function progressSource(source: ByteSource, report: (fraction: number) => void): ByteSource {
  let furthest = 0;
  return {
    size: source.size,
    ...(source.bytes ? { bytes: source.bytes } : {}),
    ...(source.path !== undefined ? { path: source.path } : {}),
    async read(offset, length, into) {
      const piece = await source.read(offset, length, into);
      if (offset + piece.length > furthest && source.size > 0) {
        furthest = offset + piece.length;
        report(furthest / source.size);
      }
      return piece;
    },
  };
}

/** Names of the three acceleration components, for labels. */
export function accelerationNames(ref: VectorRef | undefined): [string, string, string] | null {
  if (ref === undefined) return null;
  const name = (r: string | number) => (typeof r === 'number' ? `col ${r}` : r);
  if (Array.isArray(ref)) return ref.map(name) as [string, string, string];
  return [`${name(ref as string | number)} x`, 'y', 'z'];
}

/** Describes a file (format by content, then name). */
export async function describeRun(request: DescribeRequest, progress: (f: number) => void): Promise<DescribePayload> {
  const description = await snapshotDescribe(sourceOf(request.file), request.fileName);
  progress(1);
  return { kind: 'describe', description };
}

/** Loads a file with a mapping; progress is the fraction of the file read (the checks take the last 5 %). */
export async function loadRun(request: LoadRequest, progress: (f: number) => void): Promise<LoadPayload> {
  const { fileName, mapping } = request;
  // progress: the larger of the reader's own fraction and the share of the file's bytes read
  let reader = 0;
  let bytes = 0;
  const report = () => progress(0.95 * Math.max(reader, bytes));
  const source = progressSource(sourceOf(request.file), (f) => {
    bytes = f;
    report();
  });
  const s = await snapshotLoad(source, fileName, mapping, {
    every: request.every ?? 1,
    ...(request.maxBytes !== undefined ? { maxBytes: request.maxBytes } : {}),
    onProgress: (f) => {
      reader = f;
      report();
    },
    limitAdvice: LIMIT_ADVICE,
  });
  let box: Box;
  let boxFrom: LoadPayload['boxFrom'];
  let boxText: string;
  if (s.box) {
    box = boxMake(s.box.lx, s.box.ly, s.box.lz);
    boxFrom = 'file';
    boxText = box.lx === box.ly && box.ly === box.lz ? String(box.lx) : `${box.lx},${box.ly},${box.lz}`;
  } else if (request.box) {
    box = request.box;
    boxFrom = 'typed';
    boxText = box.lx === box.ly && box.ly === box.lz ? String(box.lx) : `${box.lx},${box.ly},${box.lz}`;
  } else {
    const g = boxGuess(s.positions);
    box = g.box;
    boxFrom = 'guessed';
    boxText = g.text;
  }
  // masses > 0 and softening lengths finite ≥ 0; coincident particles are the force methods' concern
  const v = snapshotValidate(s, fileName, box, { softened: true, coincident: false });
  progress(1);
  return {
    kind: 'load',
    format: s.format,
    count: s.count,
    total: s.total ?? s.count,
    every: s.every ?? 1,
    positions: s.positions,
    masses: s.masses,
    accelerations: s.accelerations ?? null,
    ids: s.ids ?? null,
    softening: s.softening ?? null,
    box,
    boxFrom,
    boxText,
    outside: v.outside,
    columns: s.columns,
    massColumn: s.massColumn,
    accelerationColumns: s.accelerations ? accelerationNames(mapping.accelerations) : null,
    sources: { ...(s.sources ?? {}) },
  };
}

/**
 * Delimited text snapshots (comma, tab or whitespace separated), optionally gzip-compressed: an
 * optional UTF-8 byte-order mark, column names from a header row (or a # line right above the data),
 * one particle per data row. Blank lines and lines starting with # are skipped; LF or CRLF line ends;
 * blanks around cells are ignored; columns the mapping does not use are not looked at.
 * Bytes go straight into typed arrays, streamed piece by piece: one pass, no per-row objects or strings.
 */
import { type ByteSource, bytesSource } from './byteSource';
import { crc32Update } from './crc32';
import { type Layout, layoutResolve } from './csvColumns';
import { type LoadOptions, type SnapshotDescription, loadLimitError, loadLimitExceeded } from './description';
import { textProposal } from './propose';
import type { SnapshotReader } from './reader';
import { structureSignature } from './signature';
import { type ColumnMapping, type Snapshot, SnapshotFormatError } from './snapshot';
import { type TextHead, lineSkippable, textHeadParse } from './textHead';
import { type TextRowsResult, textRowParserMake } from './textRows';

const LF = 10;
const COMMA = 44;
const PIECE = 4 << 20;

/** Whether bytes start with the gzip magic number 1f 8b (RFC 1952 §2.3.1). */
export function isGzip(b: Uint8Array): boolean {
  return b.length >= 2 && b[0] === 0x1f && b[1] === 0x8b;
}

/** Streams the (decompressed) text of a source to `sink`, piece by piece; stops when sink returns false. */
async function textStream(
  source: ByteSource,
  fileName: string,
  options: LoadOptions,
  sink: (piece: Uint8Array) => boolean | void,
  every = 1,
): Promise<void> {
  const head = await source.read(0, 2);
  const gz = isGzip(head);
  const limited = { ...options, every };
  const tooBig = (bytes: number, what: string) => loadLimitError(fileName, what, bytes, limited);
  if (!gz) {
    if (loadLimitExceeded(source.size, limited)) throw tooBig(source.size, 'the file holds');
    let stop = false;
    // One buffer for all pieces: the row parser copies only a line split between two pieces.
    const into = source.bytes ? undefined : new Uint8Array(Math.min(PIECE, source.size));
    for (let at = 0; at < source.size && !stop; ) {
      const piece = await source.read(at, Math.min(PIECE, source.size - at), into);
      if (piece.length === 0) break;
      at += piece.length;
      stop = sink(piece) === false;
      options.onProgress?.(at / source.size);
    }
    return;
  }
  // fflate is loaded only for compressed files (building its tables costs a few ms at every start).
  const { Gunzip } = await import('fflate');
  let out = 0;
  let crc = 0;
  let members = 0;
  let stop = false;
  let failure: unknown = null;
  const gunzip = new Gunzip((chunk) => {
    if (stop || failure) return;
    out += chunk.length;
    crc = crc32Update(crc, chunk);
    if (loadLimitExceeded(out, limited)) {
      failure = tooBig(out, 'the decompressed text holds at least');
      return;
    }
    try {
      stop = sink(chunk) === false;
    } catch (e) {
      failure = e;
    }
  });
  gunzip.onmember = () => void members++;
  let at = 0;
  try {
    while (at < source.size && !stop && !failure) {
      const piece = await source.read(at, Math.min(PIECE, source.size - at));
      if (piece.length === 0) break;
      at += piece.length;
      gunzip.push(piece, at >= source.size);
      options.onProgress?.(at / source.size);
    }
  } catch (e) {
    if (failure) throw failure;
    const why = e instanceof Error ? e.message : String(e);
    throw new SnapshotFormatError(
      fileName,
      `the gzip data is damaged (${why}) after ${out} decompressed bytes; the file may be truncated or corrupt: compress it again`,
      { offset: at },
    );
  }
  if (failure) throw failure;
  if (!stop && at >= source.size && members <= 1) {
    // The gzip trailer: CRC-32 and size mod 2^32 of the uncompressed data (RFC 1952 §2.3.1).
    const t = await source.read(source.size - 8, 8);
    const want = t.length === 8 ? (t[0] | (t[1] << 8) | (t[2] << 16)) + t[3] * 2 ** 24 : -1;
    const size = t.length === 8 ? (t[4] | (t[5] << 8) | (t[6] << 16)) + t[7] * 2 ** 24 : -1;
    if (want !== crc || size !== out % 2 ** 32) {
      throw new SnapshotFormatError(
        fileName,
        `the gzip data is damaged (the CRC-32 or size in its trailer does not match the ${out} bytes it decompresses to); the file is truncated or corrupt: compress it again`,
      );
    }
  }
}

/** Reads the head of the (decompressed) text; returns it with the bytes seen so far. */
async function headRead(source: ByteSource, fileName: string, options: LoadOptions): Promise<{ head: TextHead; seen: Uint8Array; gzip: boolean }> {
  const gzip = isGzip(await source.read(0, 2));
  let buf: Uint8Array = new Uint8Array(0);
  let head: TextHead | null = null;
  let done = false;
  await textStream(source, fileName, { ...options, onProgress: undefined }, (piece) => {
    if (buf.length === 0 && !gzip) {
      // The first piece: kept as it is (no copy of what may be the whole file) when it holds the head and a
      // data line, since reading stops here and nothing reuses its buffer after.
      head = textHeadParse(piece, fileName, false);
      if (head && piece.indexOf(LF, head.dataBegin) >= 0) {
        buf = piece;
        return false;
      }
    }
    const joined = new Uint8Array(buf.length + piece.length);
    joined.set(buf);
    joined.set(piece, buf.length);
    buf = joined;
    head = textHeadParse(buf, fileName, false);
    if (head && buf.indexOf(LF, head.dataBegin) >= 0) return false;
    if (buf.length > 64 << 20) throw new SnapshotFormatError(fileName, 'no line end in the first 64 MiB; this is not a text snapshot');
    return true;
  }, options.every ?? 1);
  done = true;
  head ??= textHeadParse(buf, fileName, done);
  return { head: head!, seen: buf, gzip };
}

/** Loads a text snapshot from a source (streaming; gzip detected by its magic number). */
export async function textLoad(source: ByteSource, fileName: string, mapping: ColumnMapping = {}, options: LoadOptions = {}): Promise<Snapshot> {
  const massDefault = mapping.massDefault ?? 1;
  if (!Number.isFinite(massDefault)) throw new SnapshotFormatError(fileName, `default mass must be finite, got ${massDefault}`);
  const every = options.every ?? 1;
  if (!Number.isInteger(every) || every < 1) throw new RangeError(`every must be a positive integer, got ${every}`);
  if (mapping.box !== undefined) {
    throw new SnapshotFormatError(fileName, `a text file has no named entries to read the box from (${JSON.stringify(mapping.box)}); enter the box side instead`);
  }
  const { head, seen, gzip } = await headRead(source, fileName, options);
  const layout = layoutResolve(fileName, head.columns, head.header, head.headerRow, mapping);
  const hasFirstPiece = !gzip && seen.length === source.size;
  let capacity = 1;
  if (hasFirstPiece) {
    for (let k = seen.indexOf(LF, head.dataBegin); k >= 0; k = seen.indexOf(LF, k + 1)) capacity++;
  } else if (!gzip) {
    // Line ends counted in a first pass (fast, one reused buffer): exact capacity, no growing or trimming.
    const into = source.bytes ? undefined : new Uint8Array(Math.min(PIECE, source.size));
    for (let at = head.dataBegin; at < source.size; ) {
      const piece = await source.read(at, Math.min(PIECE, source.size - at), into);
      if (piece.length === 0) break;
      for (let k = piece.indexOf(LF); k >= 0; k = piece.indexOf(LF, k + 1)) capacity++;
      at += piece.length;
    }
  } else {
    // Rows estimated from the bytes per line seen so far (the arrays grow if the guess is short).
    let lines = 0;
    for (let k = seen.indexOf(LF, head.dataBegin); k >= 0; k = seen.indexOf(LF, k + 1)) lines++;
    const perLine = lines > 0 ? (seen.length - head.dataBegin) / lines : 64;
    capacity = (4 * source.size) / Math.max(8, perLine) + 16;
  }
  capacity = Math.ceil(capacity / every) + 1;
  const parser = textRowParserMake(fileName, head.columns, layout, head.delim, head.linesBefore, capacity, massDefault, every);
  if (hasFirstPiece) parser.push(seen.subarray(head.dataBegin));
  else {
    let skip = head.dataBegin;
    await textStream(
      source,
      fileName,
      options,
      (piece) => {
        if (skip >= piece.length) {
          skip -= piece.length;
          return;
        }
        parser.push(skip > 0 ? piece.subarray(skip) : piece);
        skip = 0;
      },
      every,
    );
  }
  const r = parser.finish();
  if (r.count === 0) {
    throw new SnapshotFormatError(fileName, head.header ? 'the file has a header row but no particle rows' : 'the file has no particle rows', { row: head.headerRow });
  }
  return textSnapshot(head, layout, r, every);
}

/** The Snapshot of parsed rows: masses scaled when subsampled, sources named by column. */
function textSnapshot(head: TextHead, layout: Layout, r: TextRowsResult, every: number): Snapshot {
  let masses = r.masses;
  if (every > 1 && r.count < r.total) {
    const scale = r.total / r.count;
    masses = masses.map((m) => m * scale);
  }
  const colName = (slot: number) => head.columns[layout.slotOf.indexOf(slot)];
  const triple = (s: number) => `columns ${[s, s + 1, s + 2].map((k) => JSON.stringify(colName(k))).join(', ')}`;
  return {
    format: 'text',
    count: r.count,
    positions: r.positions,
    masses,
    ...(r.accelerations ? { accelerations: r.accelerations } : {}),
    ...(r.ids ? { ids: r.ids } : {}),
    ...(r.softening ? { softening: r.softening } : {}),
    columns: head.columns,
    massColumn: layout.massColumn,
    lines: r.lines,
    sources: {
      positions: triple(0),
      ...(layout.massColumn !== null ? { masses: `column ${JSON.stringify(layout.massColumn)}` } : {}),
      ...(layout.hasAcc ? { accelerations: triple(4) } : {}),
      ...(layout.hasIds ? { ids: `column ${JSON.stringify(colName(7))}` } : {}),
      ...(layout.hasSoftening ? { softening: `column ${JSON.stringify(colName(8))}` } : {}),
    },
    total: r.total,
    every,
  };
}

/** Reads text bytes (comma, tab or whitespace separated; gzip or not) into a Snapshot, in file units. */
export function csvRead(bytes: Uint8Array, fileName: string, mapping: ColumnMapping = {}): Snapshot {
  // The in-memory path is synchronous: bytesSource resolves at once, but await would defer; so parse here.
  if (isGzip(bytes)) throw new SnapshotFormatError(fileName, 'gzip-compressed text: use textLoad or snapshotRead (asynchronous)');
  const massDefault = mapping.massDefault ?? 1;
  if (!Number.isFinite(massDefault)) throw new SnapshotFormatError(fileName, `default mass must be finite, got ${massDefault}`);
  const head = textHeadParse(bytes, fileName, true)!;
  const layout = layoutResolve(fileName, head.columns, head.header, head.headerRow, mapping);
  let capacity = 1;
  for (let k = bytes.indexOf(LF, head.dataBegin); k >= 0; k = bytes.indexOf(LF, k + 1)) capacity++;
  const parser = textRowParserMake(fileName, head.columns, layout, head.delim, head.linesBefore, capacity, massDefault);
  parser.push(bytes.subarray(head.dataBegin));
  const r = parser.finish();
  if (r.count === 0) throw new SnapshotFormatError(fileName, head.header ? 'the file has a header row but no particle rows' : 'the file has no particle rows', { row: head.headerRow });
  return textSnapshot(head, layout, r, 1);
}

/** Describes a text file from its first lines: delimiter, column names, estimated rows, a proposal. */
export async function textDescribe(source: ByteSource, fileName: string, options: LoadOptions = {}): Promise<SnapshotDescription> {
  const { head, seen, gzip } = await headRead(source, fileName, options);
  let lines = 0;
  for (let k = seen.indexOf(LF, head.dataBegin); k >= 0; k = seen.indexOf(LF, k + 1)) lines++;
  const whole = !gzip && seen.length === source.size;
  if (whole && seen.length > head.dataBegin && seen[seen.length - 1] !== LF) lines++;
  const perLine = lines > 0 ? (seen.length - head.dataBegin) / lines : 64;
  const rows = whole ? lines : Math.round((gzip ? 4 : 1) * (source.size - head.dataBegin) / perLine);
  const arrays = head.columns.map((c) => ({
    name: c,
    label: `column ${JSON.stringify(c)}`,
    shape: [rows],
    dtype: 'decimal text',
    kind: 'float' as const,
    usable: true,
  }));
  const text = { delimiter: head.delimiter, header: head.header, columns: head.columns, gzip };
  const proposal = textProposal(text, whole ? rows : null);
  return { format: 'text', fileName, size: source.size, arrays, attributes: [], text, proposal, signature: structureSignature('text', arrays, [], text) };
}

/** True when the first bytes contain a NUL (binary data, not text). */
function looksBinary(b: Uint8Array): boolean {
  const n = Math.min(b.length, 4096);
  for (let i = 0; i < n; i++) if (b[i] === 0) return true;
  return false;
}

const TEXT_EXTENSIONS = ['.csv', '.tsv', '.txt', '.dat', '.asc', '.ssv', '.tab'];

/** Whether the name ends in a text extension, with or without .gz. */
function textNamed(fileName: string): boolean {
  const f = fileName.toLowerCase().replace(/\.gz$/, '');
  return TEXT_EXTENSIONS.some((e) => f.endsWith(e));
}

/** The text reader: claims text-named files and other files whose first meaningful line is delimited numbers or names. */
export const csvReader: SnapshotReader = {
  name: 'text',
  description: 'delimited text (comma, tab or whitespace separated, optionally .gz) with a header row naming x,y,z (and m or mass)',
  extensions: [...TEXT_EXTENSIONS, ...TEXT_EXTENSIONS.map((e) => `${e}.gz`)],
  sniff(bytes: Uint8Array, fileName: string): boolean {
    if (isGzip(bytes)) return !/\.(npy|npz|h5|hdf5|hdf)\.gz$/i.test(fileName);
    if (looksBinary(bytes)) return false;
    if (textNamed(fileName)) return true;
    let pos = 0;
    while (pos < bytes.length) {
      let lineEnd = bytes.indexOf(LF, pos);
      if (lineEnd < 0) lineEnd = bytes.length;
      const end = lineEnd > pos && bytes[lineEnd - 1] === 13 ? lineEnd - 1 : lineEnd;
      if (!lineSkippable(bytes, pos, end)) {
        const k = bytes.indexOf(COMMA, pos);
        if (k >= 0 && k < end) return true;
        // Whitespace or tab separated: at least three cells that all look like numbers.
        const cells = new TextDecoder().decode(bytes.subarray(pos, end)).trim().split(/[ \t]+/);
        return cells.length >= 3 && cells.every((c) => /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(c));
      }
      pos = lineEnd + 1;
    }
    return false;
  },
  read: (bytes, fileName, mapping) => (isGzip(bytes) ? textLoad(bytesSource(bytes), fileName, mapping) : csvRead(bytes, fileName, mapping)),
  describe: textDescribe,
  load: textLoad,
};

/** The same reader under its format name. */
export const textReader = csvReader;

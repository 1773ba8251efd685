/**
 * SHA-256 of what the report describes (WebCrypto, crypto.subtle.digest): a dropped or chosen file's
 * bytes (the File is remembered by name as it arrives, through capture listeners on the document, and
 * hashed when a report asks), or, for the built-in demo, the generated positions followed by the masses
 * as float64 bytes (the demo has no file).
 */
import type { Snapshot } from '../state/types';
import type { ReportDigest } from './reportContent';

/** Files larger than this are not hashed (WebCrypto digests a whole buffer held in memory). */
export const DIGEST_MAX_BYTES = 1 << 30;

const files = new Map<string, Blob>();
const fileDigests = new Map<Blob, Promise<string | null>>();
let watching = false;

/** Hex SHA-256 of the concatenated bytes of `parts`; null where WebCrypto is missing (not a secure context). */
export async function sha256Hex(parts: readonly ArrayBufferView[]): Promise<string | null> {
  const subtle = globalThis.crypto?.subtle;
  if (!subtle) return null;
  let total = 0;
  for (const p of parts) total += p.byteLength;
  const all = new Uint8Array(total);
  let at = 0;
  for (const p of parts) {
    all.set(new Uint8Array(p.buffer, p.byteOffset, p.byteLength), at);
    at += p.byteLength;
  }
  const d = new Uint8Array(await subtle.digest('SHA-256', all));
  return Array.from(d, (b) => b.toString(16).padStart(2, '0')).join('');
}

/** Remembers a file that arrives (its name is the snapshot's fileName); hashed only when a report asks. */
export function fileRemember(name: string, file: Blob): void {
  files.set(name, file);
}

/**
 * Remembers every file dropped on the page or chosen in a file input, from capture listeners on the
 * document (so that the loaders need no hook). Installed once.
 */
export function fileWatch(doc: Document = document): void {
  if (watching) return;
  watching = true;
  doc.addEventListener('drop', (e) => {
    for (const f of Array.from(e.dataTransfer?.files ?? [])) fileRemember(f.name, f);
  }, true);
  doc.addEventListener('change', (e) => {
    const t = e.target;
    if (t instanceof HTMLInputElement && t.type === 'file') for (const f of Array.from(t.files ?? [])) fileRemember(f.name, f);
  }, true);
}

/** Whether this machine stores numbers little-endian (the demo's bytes are hashed as stored). */
function littleEndian(): boolean {
  return new Uint8Array(Float64Array.of(1).buffer)[7] === 0x3f;
}

/** The digest the report shows for a snapshot, and what it is of. */
export async function snapshotDigest(snap: Snapshot): Promise<ReportDigest> {
  if (snap.kind === 'demo') {
    const order = littleEndian() ? 'little-endian' : 'big-endian';
    return { sha256: await sha256Hex([snap.positions, snap.masses]), of: `of the generated positions (x0,y0,z0,x1,…) then masses as float64 ${order} bytes; the demo has no file` };
  }
  const file = snap.fileName ? files.get(snap.fileName) : undefined;
  if (file && file.size > DIGEST_MAX_BYTES) return { sha256: null, of: `not computed: the file is larger than ${DIGEST_MAX_BYTES / 2 ** 30} GiB` };
  let p = file ? fileDigests.get(file) : undefined;
  if (file && !p) {
    p = file.arrayBuffer().then((b) => sha256Hex([new Uint8Array(b)])).catch(() => null);
    fileDigests.set(file, p);
  }
  if (!p) return { sha256: null, of: 'the file’s bytes are not at hand: the snapshot was restored from this browser’s storage (or read before this page could keep it); drop the file again to hash it' };
  const sha = await p;
  return sha ? { sha256: sha, of: 'of the file’s bytes' } : { sha256: null, of: 'the file could not be read again, or WebCrypto is not available on this page' };
}

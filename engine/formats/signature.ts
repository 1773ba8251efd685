/**
 * Structure signature: a short key that is the same for two files of the same layout (format, array
 * names, element kinds, ranks and trailing dimensions, attribute names; text: delimiter and column
 * names or count) whatever their particle count, so that a confirmed mapping can be offered again.
 */
import type { ArrayInfo, AttributeInfo, SnapshotDescription, TextLayout } from './description';

/** FNV-1a, 64 bits, as 16 hex digits (Fowler, Noll, Vo; IETF draft-eastlake-fnv). */
function fnv1a64(text: string): string {
  let h = 0xcbf29ce484222325n;
  const p = 0x100000001b3n;
  const bytes = new TextEncoder().encode(text);
  for (const b of bytes) h = ((h ^ BigInt(b)) * p) & 0xffffffffffffffffn;
  return h.toString(16).padStart(16, '0');
}

/** The text the signature hashes (exported for tests and debugging). */
export function structureText(format: string, arrays: readonly ArrayInfo[], attributes: readonly AttributeInfo[], text?: TextLayout): string {
  const parts: string[] = [`format=${format}`];
  if (text) {
    parts.push(`delimiter=${text.delimiter}`, text.header ? `columns=${text.columns.map((c) => c.toLowerCase()).join(',')}` : `columns#=${text.columns.length}`);
  } else {
    for (const a of [...arrays].sort((x, y) => (x.name < y.name ? -1 : x.name > y.name ? 1 : 0))) {
      parts.push(`array ${a.name}:${a.kind}[${a.shape.map((d, i) => (i === 0 ? '*' : String(d))).join(',')}]`);
    }
    for (const a of [...attributes].map((x) => x.ref).sort()) parts.push(`attr ${a}`);
  }
  return parts.join('\n');
}

/** The signature of a layout: "format-" plus 16 hex digits. */
export function structureSignature(format: string, arrays: readonly ArrayInfo[], attributes: readonly AttributeInfo[], text?: TextLayout): string {
  return `${format}-${fnv1a64(structureText(format, arrays, attributes, text))}`;
}

/** The structure signature of a described file (same as description.signature). */
export function snapshotStructureSignature(d: Pick<SnapshotDescription, 'format' | 'arrays' | 'attributes' | 'text'>): string {
  return structureSignature(d.format, d.arrays, d.attributes, d.text);
}

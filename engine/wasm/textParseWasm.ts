/**
 * The row loop of textRows.ts for rows whose cells all take the fast paths of cellParse, in WebAssembly
 * (engine/wasm/as/textParse.ts): compiled ahead, so even the first file of a process parses at full
 * speed, where the JavaScript parser first runs un-optimised. Same grammar, same operations, same bits;
 * every row it cannot finish goes back to the JavaScript code, which parses it (and reports its errors).
 *
 * One instance per thread, compiled on first use (synchronously) and reused by every parse, with a fixed
 * memory of about 0.5 MiB whatever the file's size: the bytes go in a window of whole lines at a time (at
 * most WINDOW bytes; small, so that a cold start touches few fresh pages), the values come out at most
 * OUT_ROWS rows at a time. Null where WebAssembly (with SIMD) is unavailable or
 * disabled (globalThis.TORUSGRAV_NO_WASM = true, or env TORUSGRAV_NO_WASM=1 in Node).
 */
import { TEXT_PARSE_WASM_BASE64 } from './textParseBinary';
import { wasmCompile, wasmDisabled } from './compile';

interface TextParseExports {
  memory: WebAssembly.Memory;
  textRows: (...args: number[]) => number;
  stopReason: () => number;
  linesDone: () => number;
  rowsDone: () => number;
  rowsKept: () => number;
}

const LF = 10;
/** Bytes of text copied into the instance at a time (whole lines; a longer line goes to JavaScript). */
const WINDOW = 1 << 16;
/** Rows stored per call. */
export const OUT_ROWS = 4096;
/** Columns (up to the last used one) the slot table has room for; wider files stay in JavaScript. */
const MAX_COLUMNS = 16384;
/** stopReason codes of textParse.ts. */
const STOP_FULL = 1;
const STOP_ROW = 2;

// Memory layout (bytes), above the module's own first 64 KiB.
const SLOTS = 65536;
const OUT_POS = SLOTS + 4 * MAX_COLUMNS;
const OUT_MASS = OUT_POS + 24 * OUT_ROWS;
const OUT_ACC = OUT_MASS + 8 * OUT_ROWS;
const OUT_ID = OUT_ACC + 24 * OUT_ROWS;
const OUT_SOFT = OUT_ID + 8 * OUT_ROWS;
const OUT_LINES = OUT_SOFT + 8 * OUT_ROWS;
const IN = OUT_LINES + 4 * OUT_ROWS;
/** The window, a byte after it that is not a digit, and the 48 bytes the 16-byte loads may read past a cell. */
const MEMORY_BYTES = IN + WINDOW + 64;

let cachedModule: WebAssembly.Module | null | undefined;

/** The compiled parser module, or null when WebAssembly (with SIMD) cannot be used here. */
export function textParseModule(): WebAssembly.Module | null {
  if (wasmDisabled()) return null;
  if (cachedModule === undefined) cachedModule = wasmCompile(TEXT_PARSE_WASM_BASE64);
  return cachedModule;
}

/** The thread's instance, its memory grown to the layout once; `owner` is the parser whose window and slots it holds. */
interface Shared {
  readonly x: TextParseExports;
  readonly bytes: Uint8Array;
  readonly f64: Float64Array;
  readonly i32: Int32Array;
  owner: TextRowsWasm | null;
}

let shared: Shared | null | undefined;

function sharedInstance(): Shared | null {
  if (shared !== undefined) return shared;
  const mod = textParseModule();
  if (!mod) return null;
  try {
    const x = new WebAssembly.Instance(mod, {}).exports as unknown as TextParseExports;
    const need = MEMORY_BYTES - x.memory.buffer.byteLength;
    if (need > 0) x.memory.grow(Math.ceil(need / 65536));
    const buf = x.memory.buffer;
    shared = { x, bytes: new Uint8Array(buf), f64: new Float64Array(buf), i32: new Int32Array(buf), owner: null };
  } catch {
    shared = null;
  }
  return shared;
}

/** Where the JavaScript row loop hands rows to WebAssembly (one per parse). */
export interface TextRowsWasm {
  /** Forgets the bytes copied in (call whenever the bytes of a buffer may have changed: on each piece). */
  forget(): void;
  /**
   * Parses the lines of b[pos, limit) from a line start, as the loop of textRows.ts would, while they
   * take the fast paths, storing at most `room` rows; `line` = lines before pos, `phase` = data rows
   * before pos modulo `every`. Returns where it stopped, a line start (or past limit); kept, lines, rows
   * say what it did; `more` that calling again from there goes on (else JavaScript parses the row at the
   * returned position first, or limit is reached).
   */
  run(b: Uint8Array, pos: number, limit: number, line: number, phase: number, room: number): number;
  readonly kept: number;
  readonly lines: number;
  readonly rows: number;
  readonly more: boolean;
  /** Copies the `kept` rows of the last run into the arrays at row n (null: a slot not read). */
  take(
    n: number,
    positions: Float64Array,
    masses: Float64Array | null,
    accelerations: Float64Array | null,
    ids: Float64Array | null,
    softening: Float64Array | null,
    lines: Int32Array,
  ): void;
}

class Rows implements TextRowsWasm {
  kept = 0;
  lines = 0;
  rows = 0;
  more = false;
  private span: Uint8Array | null = null;
  private wBegin = 0;
  private wEnd = 0;

  constructor(
    private readonly s: Shared,
    private readonly slotOf: Int32Array,
    private readonly delim: number,
    private readonly every: number,
  ) {}

  forget(): void {
    this.span = null;
  }

  run(b: Uint8Array, pos: number, limit: number, line: number, phase: number, room: number): number {
    const s = this.s;
    this.kept = this.lines = this.rows = 0;
    this.more = false;
    if (s.owner !== this) {
      s.owner = this;
      this.span = null;
      s.i32.set(this.slotOf, SLOTS >> 2);
    }
    if (this.span !== b || pos < this.wBegin || pos >= this.wEnd) {
      let end = Math.min(limit, pos + WINDOW);
      if (end < limit) {
        const lf = b.lastIndexOf(LF, end - 1);
        if (lf < pos) return pos; // a line longer than the window: JavaScript parses it
        end = lf + 1;
      }
      s.bytes.set(b.subarray(pos, end), IN);
      s.bytes[IN + end - pos] = 0; // digit runs stop here (a line end stops them everywhere else)
      this.span = b;
      this.wBegin = pos;
      this.wEnd = end;
    }
    const maxKeep = Math.min(room, OUT_ROWS);
    const x = s.x;
    const at = x.textRows(
      IN + (pos - this.wBegin),
      IN + (this.wEnd - this.wBegin),
      SLOTS,
      this.slotOf.length - 1,
      this.delim,
      this.every,
      phase,
      line,
      maxKeep,
      OUT_POS,
      OUT_MASS,
      OUT_ACC,
      OUT_ID,
      OUT_SOFT,
      OUT_LINES,
    );
    this.kept = x.rowsKept();
    this.lines = x.linesDone();
    this.rows = x.rowsDone();
    const stop = x.stopReason();
    const next = this.wBegin + (at - IN);
    this.more = stop === STOP_ROW ? false : stop === STOP_FULL ? maxKeep < room : next < limit;
    return next;
  }

  take(
    n: number,
    positions: Float64Array,
    masses: Float64Array | null,
    accelerations: Float64Array | null,
    ids: Float64Array | null,
    softening: Float64Array | null,
    lines: Int32Array,
  ): void {
    const k = this.kept;
    const { f64, i32 } = this.s;
    positions.set(f64.subarray(OUT_POS >> 3, (OUT_POS >> 3) + 3 * k), 3 * n);
    if (masses) masses.set(f64.subarray(OUT_MASS >> 3, (OUT_MASS >> 3) + k), n);
    if (accelerations) accelerations.set(f64.subarray(OUT_ACC >> 3, (OUT_ACC >> 3) + 3 * k), 3 * n);
    if (ids) ids.set(f64.subarray(OUT_ID >> 3, (OUT_ID >> 3) + k), n);
    if (softening) softening.set(f64.subarray(OUT_SOFT >> 3, (OUT_SOFT >> 3) + k), n);
    lines.set(i32.subarray(OUT_LINES >> 2, (OUT_LINES >> 2) + k), n);
  }
}

/**
 * The WebAssembly row parser for a file with column slots `slotOf` (−1 unused; 0–2 x,y,z, 3 mass, 4–6
 * accelerations, 7 id, 8 softening), delimiter code `delim` (comma, tab, or 32 for runs of blanks) and
 * subsampling `every`; null when WebAssembly is off or the layout does not fit (then use JavaScript).
 */
export function textRowsWasmMake(slotOf: Int32Array, delim: number, every: number): TextRowsWasm | null {
  if (wasmDisabled() || slotOf.length === 0 || slotOf.length > MAX_COLUMNS || !(every >= 1 && every <= 0x3fffffff)) return null;
  const s = sharedInstance();
  if (!s) return null;
  return new Rows(s, slotOf, delim, every);
}

/**
 * The start of a delimited text file: which delimiter it uses (comma, tab or whitespace, from the
 * first meaningful line) and its column names (a header row, or a # comment line right above the first
 * data row whose names match the data's cell count, as numpy.savetxt writes them).
 */
import { DELIM_COMMA, DELIM_TAB, DELIM_WHITESPACE, isBlank } from './csvCell';
import { NUMBER_LIKE, headerName } from './csvColumns';
import { SnapshotFormatError } from './snapshot';

const LF = 10;
const CR = 13;
const HASH = 35;

/** Result of textHeadParse. */
export interface TextHead {
  /** DELIM_COMMA, DELIM_TAB or DELIM_WHITESPACE. */
  readonly delim: number;
  readonly delimiter: 'comma' | 'tab' | 'whitespace';
  /** Column names (header names, or "0","1",… without a header). */
  readonly columns: readonly string[];
  readonly header: boolean;
  /** 1-based line of the header (row or comment), or of the first data line without one. */
  readonly headerRow: number;
  /** Byte offset where data lines start, and the number of lines before that offset. */
  readonly dataBegin: number;
  readonly linesBefore: number;
}

/** Index of the next LF at or after `from`, or −1. */
function lfFind(b: Uint8Array, from: number): number {
  return b.indexOf(LF, from);
}

/** Content end of a line (drops a CR before the LF). */
export function contentEnd(b: Uint8Array, begin: number, lineEnd: number): number {
  return lineEnd > begin && b[lineEnd - 1] === CR ? lineEnd - 1 : lineEnd;
}

/** Whether the line holds nothing but blanks, or is a comment. */
export function lineSkippable(b: Uint8Array, begin: number, end: number): boolean {
  let i = begin;
  while (i < end && isBlank(b[i])) i++;
  return i === end || b[i] === HASH;
}

/** Cells of a line split by the delimiter (blanks trimmed). */
export function cellsSplit(text: string, delim: number): string[] {
  if (delim === DELIM_WHITESPACE) return text.trim().split(/[ \t]+/);
  return text.split(String.fromCharCode(delim));
}

const utf8 = new TextDecoder('utf-8');

/**
 * Parses the head of a text file from its first bytes; null when `b` ends before the first data line
 * does and more bytes may follow (`complete` false). Throws SnapshotFormatError for an empty file.
 */
export function textHeadParse(b: Uint8Array, fileName: string, complete: boolean): TextHead | null {
  let pos = b.length >= 3 && b[0] === 0xef && b[1] === 0xbb && b[2] === 0xbf ? 3 : 0;
  if (b.indexOf(LF) < 0 && b.indexOf(CR) >= 0 && (complete || b.length > 65536)) {
    throw new SnapshotFormatError(fileName, 'lines end in CR alone (old Mac style); save the file with LF or CRLF line ends');
  }
  let line = 0;
  let lastComment: string | null = null;
  let lastCommentLine = 0;
  for (;;) {
    if (pos >= b.length) {
      if (!complete) return null;
      throw new SnapshotFormatError(fileName, 'the file is empty (no header row, no data)');
    }
    const lf = lfFind(b, pos);
    if (lf < 0 && !complete) return null;
    const lineEnd = lf < 0 ? b.length : lf;
    const end = contentEnd(b, pos, lineEnd);
    line++;
    if (lineSkippable(b, pos, end)) {
      let i = pos;
      while (i < end && isBlank(b[i])) i++;
      if (i < end) {
        lastComment = utf8.decode(b.subarray(i + 1, end));
        lastCommentLine = line;
      }
      pos = lineEnd + 1;
      continue;
    }
    const text = utf8.decode(b.subarray(pos, end)).replace(/^\ufeff/, '');
    const delim = text.includes(',') ? DELIM_COMMA : text.includes('\t') ? DELIM_TAB : DELIM_WHITESPACE;
    const delimiter = delim === DELIM_COMMA ? 'comma' : delim === DELIM_TAB ? 'tab' : 'whitespace';
    const cells = cellsSplit(text, delim);
    const numeric = cells.every((c) => NUMBER_LIKE.test(c.trim()));
    if (!numeric) {
      return { delim, delimiter, columns: cells.map(headerName), header: true, headerRow: line, dataBegin: lineEnd + 1, linesBefore: line };
    }
    if (lastComment !== null) {
      const names = cellsSplit(lastComment.trim(), delim).map(headerName);
      if (names.length === cells.length && names.every((n) => n.length > 0 && !NUMBER_LIKE.test(n))) {
        return { delim, delimiter, columns: names, header: true, headerRow: lastCommentLine, dataBegin: pos, linesBefore: line - 1 };
      }
    }
    return { delim, delimiter, columns: cells.map((_, k) => String(k)), header: false, headerRow: line, dataBegin: pos, linesBefore: line - 1 };
  }
}

/**
 * A small CSV reader (RFC 4180 style): comma separators, CRLF/LF/CR line ends, double-quoted
 * fields that may hold commas, newlines and doubled quotes (""). Unquoted fields are trimmed.
 */

/** One record with the spreadsheet row (1-based line number) on which it starts. */
export interface CsvRecord {
  readonly row: number;
  readonly fields: readonly string[];
}

/** Mutable cursor over the text, shared by the small readers below. */
interface Cursor {
  readonly text: string;
  pos: number;
  line: number;
}

/**
 * Parses CSV text into records. Blank lines are skipped (but still counted for row numbers).
 * `what` names the file in error messages.
 */
export function parseCsv(text: string, what: string): CsvRecord[] {
  const cursor: Cursor = { text: text.startsWith('\uFEFF') ? text.slice(1) : text, pos: 0, line: 1 };
  const records: CsvRecord[] = [];
  while (cursor.pos < cursor.text.length) {
    const row = cursor.line;
    const fields = readRecord(cursor, what);
    const blank = fields.length === 1 && fields[0] === '';
    if (!blank) records.push({ row, fields });
  }
  return records;
}

function readRecord(cursor: Cursor, what: string): string[] {
  const fields: string[] = [];
  for (;;) {
    fields.push(readField(cursor, what));
    const ch = cursor.text[cursor.pos];
    if (ch === ',') {
      cursor.pos++;
      continue;
    }
    skipLineEnd(cursor);
    return fields;
  }
}

function readField(cursor: Cursor, what: string): string {
  const { text } = cursor;
  let start = cursor.pos;
  while (text[start] === ' ' || text[start] === '\t') start++;
  if (text[start] === '"') {
    cursor.pos = start;
    return readQuoted(cursor, what);
  }
  let end = cursor.pos;
  while (end < text.length && !isFieldEnd(text[end])) end++;
  const value = text.slice(cursor.pos, end).trim();
  cursor.pos = end;
  return value;
}

function readQuoted(cursor: Cursor, what: string): string {
  const { text } = cursor;
  const startLine = cursor.line;
  let value = '';
  let i = cursor.pos + 1;
  for (;;) {
    if (i >= text.length) throw new Error(`${what} row ${startLine}: a quoted field is not closed`);
    const ch = text[i];
    if (ch === '"') {
      if (text[i + 1] === '"') {
        value += '"';
        i += 2;
        continue;
      }
      i++;
      break;
    }
    if (ch === '\n' || (ch === '\r' && text[i + 1] !== '\n')) cursor.line++;
    value += ch;
    i++;
  }
  while (text[i] === ' ' || text[i] === '\t') i++;
  if (i < text.length && !isFieldEnd(text[i])) {
    throw new Error(`${what} row ${startLine}: unexpected text after a closing quote`);
  }
  cursor.pos = i;
  return value;
}

function isFieldEnd(ch: string | undefined): boolean {
  return ch === ',' || ch === '\n' || ch === '\r';
}

function skipLineEnd(cursor: Cursor): void {
  const { text } = cursor;
  if (text[cursor.pos] === '\r') cursor.pos++;
  if (text[cursor.pos] === '\n') cursor.pos++;
  cursor.line++;
}

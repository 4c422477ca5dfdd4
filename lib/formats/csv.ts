/**
 * RFC 4180 tokenizer that keeps line numbers as an editor shows them (1-based, counting the header and
 * every physical line, including newlines inside quoted fields). Pure: text in, records out.
 *
 * Beyond RFC 4180: CRLF, LF or lone CR line ends; a UTF-8 BOM is dropped; blank lines are skipped; a
 * line whose first non-blank character is `#` (outside quotes, at the start of a record) is a comment.
 * Fields are not trimmed here; quoted fields are marked so callers can tell `""` from nothing.
 */

export interface CsvField {
  value: string;
  /** Line on which the field starts. */
  line: number;
  quoted: boolean;
}
export interface CsvRecord {
  /** Line on which the record starts. */
  line: number;
  fields: CsvField[];
}
export interface CsvSyntaxError {
  line: number;
  message: string;
}

export function tokenizeCsv(text: string): { records: CsvRecord[]; errors: CsvSyntaxError[] } {
  const src = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const records: CsvRecord[] = [];
  const errors: CsvSyntaxError[] = [];
  const n = src.length;
  let i = 0;
  let line = 1;

  /** Advance over one line end at i (CRLF, LF or CR); returns whether there was one. */
  const eatNewline = (): boolean => {
    const ch = src[i];
    if (ch === "\r") {
      i += src[i + 1] === "\n" ? 2 : 1;
      line++;
      return true;
    }
    if (ch === "\n") {
      i++;
      line++;
      return true;
    }
    return false;
  };

  while (i < n) {
    // Record start: blank line or comment?
    let j = i;
    while (j < n && (src[j] === " " || src[j] === "\t")) j++;
    if (j >= n) break;
    if (src[j] === "\r" || src[j] === "\n") {
      i = j;
      eatNewline();
      continue;
    }
    if (src[j] === "#") {
      i = j;
      while (i < n && src[i] !== "\r" && src[i] !== "\n") i++;
      eatNewline();
      continue;
    }
    const record: CsvRecord = { line, fields: [] };
    let endOfRecord = false;
    while (!endOfRecord) {
      const fieldLine = line;
      let k = i;
      while (k < n && (src[k] === " " || src[k] === "\t")) k++;
      if (src[k] === '"') {
        i = k + 1;
        let value = "";
        let closed = false;
        while (i < n) {
          const ch = src[i];
          if (ch === '"') {
            if (src[i + 1] === '"') {
              value += '"';
              i += 2;
              continue;
            }
            i++;
            closed = true;
            break;
          }
          if (ch === "\r" || ch === "\n") {
            const start = i;
            eatNewline();
            value += src.slice(start, i);
            continue;
          }
          value += ch;
          i++;
        }
        if (!closed) {
          errors.push({ line: fieldLine, message: "quoted field is never closed" });
          record.fields.push({ value, line: fieldLine, quoted: true });
          records.push(record);
          return { records, errors };
        }
        while (i < n && (src[i] === " " || src[i] === "\t")) i++;
        if (i < n && src[i] !== "," && src[i] !== "\r" && src[i] !== "\n") {
          errors.push({ line, message: `unexpected character ${JSON.stringify(src[i])} after a closing quote` });
          while (i < n && src[i] !== "," && src[i] !== "\r" && src[i] !== "\n") i++;
        }
        record.fields.push({ value, line: fieldLine, quoted: true });
      } else {
        const start = i;
        while (i < n && src[i] !== "," && src[i] !== "\r" && src[i] !== "\n") i++;
        record.fields.push({ value: src.slice(start, i), line: fieldLine, quoted: false });
      }
      if (i < n && src[i] === ",") {
        i++;
      } else {
        eatNewline();
        endOfRecord = true;
      }
    }
    records.push(record);
  }
  return { records, errors };
}

/**
 * Reader and writer of PostgreSQL's binary COPY format (PostgreSQL documentation, COPY, "Binary Format"):
 *
 *   header   11-byte signature "PGCOPY\n\377\r\n\0", int32 flags, int32 extension length, extension
 *   tuple    int16 field count, then per field int32 byte length (−1 = NULL) and the bytes
 *   trailer  int16 −1
 *
 * All integers are big-endian. The bytes of a field are the type's binary send output (int4: 4 bytes,
 * bytea: the raw bytes). Pure: returns views into `bytes`, never copies or changes it.
 */

const SIGNATURE = [0x50, 0x47, 0x43, 0x4f, 0x50, 0x59, 0x0a, 0xff, 0x0d, 0x0a, 0x00];

/** Fields of each tuple, in order; a NULL field is null. Throws on a malformed stream (a programmer or protocol error). */
export function parseCopyBinary(bytes: Uint8Array): (Uint8Array | null)[][] {
  const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const need = (at: number, n: number): void => {
    if (at + n > bytes.byteLength) throw new RangeError(`binary COPY: stream ends at byte ${bytes.byteLength}, ${n} more needed at ${at}`);
  };
  need(0, SIGNATURE.length + 8);
  for (let i = 0; i < SIGNATURE.length; i++) if (bytes[i] !== SIGNATURE[i]) throw new RangeError("binary COPY: bad signature");
  const flags = dv.getUint32(11, false);
  // Bit 16 (OIDs included) is the only defined flag; the high half must be understood by the reader.
  if (flags & 0xffff0000) throw new RangeError(`binary COPY: unknown critical flags 0x${flags.toString(16)}`);
  let at = 15 + 4 + dv.getUint32(15, false);
  const rows: (Uint8Array | null)[][] = [];
  for (;;) {
    need(at, 2);
    const count = dv.getInt16(at, false);
    at += 2;
    if (count === -1) return rows;
    const fields: (Uint8Array | null)[] = new Array(count);
    for (let f = 0; f < count; f++) {
      need(at, 4);
      const len = dv.getInt32(at, false);
      at += 4;
      if (len === -1) {
        fields[f] = null;
        continue;
      }
      need(at, len);
      fields[f] = bytes.subarray(at, at + len);
      at += len;
    }
    rows.push(fields);
  }
}

/** A 4-byte field (int4 binary send output) as a number. */
export function readInt4(field: Uint8Array): number {
  if (field.byteLength !== 4) throw new RangeError(`binary COPY: int4 field of ${field.byteLength} bytes`);
  return new DataView(field.buffer, field.byteOffset, 4).getInt32(0, false);
}

/** One column of a binary COPY stream: the values of rows [from, to) are written. */
export type CopyColumn =
  | { type: "int4"; values: ArrayLike<number> }
  /** NaN is written as NULL (columns kept in Float64Arrays); other non-finite values are refused. */
  | { type: "float8"; values: ArrayLike<number> }
  | { type: "text"; values: readonly (string | null)[] }
  /** ISO 8601 UTC times with at most millisecond precision (Date.prototype.toISOString's form). */
  | { type: "timestamptz"; values: readonly string[] };

/** Milliseconds from 1970-01-01 to PostgreSQL's epoch, 2000-01-01T00:00:00Z. */
const PG_EPOCH_MS = 946_684_800_000;

/**
 * Builds a binary COPY stream field by field: `tuple(n)`, then n fields, for each row; `finish()`
 * adds the trailer and returns the bytes. Grows as needed from `sizeHint` bytes of tuples.
 */
export class CopyBinaryWriter {
  private buf: Uint8Array;
  private dv: DataView;
  private at = 19;

  constructor(sizeHint = 1 << 16) {
    this.buf = new Uint8Array(19 + Math.max(64, sizeHint) + 2);
    this.dv = new DataView(this.buf.buffer);
    this.buf.set(SIGNATURE, 0);
  }

  private need(n: number): void {
    if (this.at + n + 2 <= this.buf.byteLength) return;
    const next = new Uint8Array(Math.max(2 * this.buf.byteLength, this.at + n + 2));
    next.set(this.buf.subarray(0, this.at));
    this.buf = next;
    this.dv = new DataView(next.buffer);
  }

  tuple(fields: number): void {
    this.need(2);
    this.dv.setInt16(this.at, fields);
    this.at += 2;
  }

  null(): void {
    this.need(4);
    this.dv.setInt32(this.at, -1);
    this.at += 4;
  }

  int4(v: number): void {
    if (!Number.isInteger(v) || v < -2147483648 || v > 2147483647) throw new RangeError(`binary COPY: not an int4: ${v}`);
    this.need(8);
    this.dv.setInt32(this.at, 4);
    this.dv.setInt32(this.at + 4, v);
    this.at += 8;
  }

  /** A finite double; NaN is written as NULL only when `nanIsNull`, else refused like the infinities. */
  float8(v: number, nanIsNull = false): void {
    if (nanIsNull && Number.isNaN(v)) return this.null();
    if (!Number.isFinite(v)) throw new RangeError(`binary COPY: not a finite number: ${v}`);
    this.need(12);
    this.dv.setInt32(this.at, 8);
    this.dv.setFloat64(this.at + 4, v);
    this.at += 12;
  }

  int8(v: bigint): void {
    this.need(12);
    this.dv.setInt32(this.at, 8);
    this.dv.setBigInt64(this.at + 4, v);
    this.at += 12;
  }

  bytes(b: Uint8Array): void {
    this.need(4 + b.byteLength);
    this.dv.setInt32(this.at, b.byteLength);
    this.buf.set(b, this.at + 4);
    this.at += 4 + b.byteLength;
  }

  finish(): Uint8Array {
    this.need(0);
    this.dv.setInt16(this.at, -1);
    return this.buf.subarray(0, this.at + 2);
  }
}

/**
 * Writes rows [from, to) of the columns as one binary COPY stream (header, tuples, trailer), the
 * input of `COPY table (columns…) FROM STDIN (FORMAT binary)`. Field bytes are the types' binary
 * receive input: int4 4 bytes, float8 IEEE 754 8 bytes, text UTF-8, timestamptz int64 microseconds
 * since 2000-01-01 UTC; all big-endian. Throws RangeError on a value the column type cannot hold.
 */
export function writeCopyBinary(columns: readonly CopyColumn[], from: number, to: number): Uint8Array {
  const n = Math.max(0, to - from);
  const utf8 = new TextEncoder();
  const micros = new Map<string, bigint>();
  const microsOf = (iso: string): bigint => {
    let v = micros.get(iso);
    if (v === undefined) {
      const ms = Date.parse(iso);
      if (!Number.isFinite(ms) || /\.\d{4,}/.test(iso)) throw new RangeError(`binary COPY: not a millisecond ISO time: ${iso}`);
      v = BigInt(ms - PG_EPOCH_MS) * 1000n;
      micros.set(iso, v);
    }
    return v;
  };
  // Text values encoded once per distinct string (statuses, a few codes).
  const texts = new Map<string, Uint8Array>();
  const w = new CopyBinaryWriter(n * (2 + columns.length * 12));
  for (let r = from; r < to; r++) {
    w.tuple(columns.length);
    for (const col of columns) {
      if (col.type === "int4") w.int4(col.values[r]);
      else if (col.type === "float8") w.float8(col.values[r], true);
      else if (col.type === "timestamptz") w.int8(microsOf(col.values[r]));
      else {
        const t = col.values[r];
        if (t === null) w.null();
        else {
          let b = texts.get(t);
          if (!b) texts.set(t, (b = utf8.encode(t)));
          w.bytes(b);
        }
      }
    }
  }
  return w.finish();
}

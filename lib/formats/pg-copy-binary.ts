/**
 * Reader of PostgreSQL's binary COPY format (PostgreSQL documentation, COPY, "Binary Format"):
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

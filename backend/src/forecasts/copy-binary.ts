/**
 * Rows in PostgreSQL's binary COPY format. A scoring chunk stores millions of numbers; sent as
 * their eight bytes they need no printing here and no parsing in the database, and each value
 * arrives exactly as the engine computed it.
 */

/** The signature, no flags and no header extension. */
const HEADER = Buffer.concat([Buffer.from('PGCOPY\n\xff\r\n\0', 'latin1'), Buffer.alloc(8)]);
/** A field count of -1 ends the data. */
const TRAILER = Buffer.from([0xff, 0xff]);

export class CopyBinaryWriter {
  private buf = Buffer.allocUnsafe(1 << 16);
  private at = 0;

  constructor() {
    this.raw(HEADER);
  }

  /** Starts a row of `fields` values. */
  row(fields: number): void {
    this.room(2);
    this.at = this.buf.writeInt16BE(fields, this.at);
  }

  /** A value already encoded, with its length (see `field`). */
  raw(bytes: Buffer): void {
    this.room(bytes.length);
    this.at += bytes.copy(this.buf, this.at);
  }

  int4(value: number): void {
    this.room(8);
    this.at = this.buf.writeInt32BE(4, this.at);
    this.at = this.buf.writeInt32BE(value, this.at);
  }

  /** NULL unless finite; -0 is stored as 0. */
  float8(value: number | undefined): void {
    if (value === undefined || !Number.isFinite(value)) return this.null();
    this.room(12);
    this.at = this.buf.writeInt32BE(8, this.at);
    this.at = this.buf.writeDoubleBE(value + 0, this.at);
  }

  null(): void {
    this.room(4);
    this.at = this.buf.writeInt32BE(-1, this.at);
  }

  /** Ends the data: the last bytes to send. */
  end(): void {
    this.raw(TRAILER);
  }

  /** The bytes written since the last take. */
  take(): Buffer {
    const out = Buffer.from(this.buf.subarray(0, this.at));
    this.at = 0;
    return out;
  }

  private room(n: number): void {
    if (this.at + n <= this.buf.length) return;
    const next = Buffer.allocUnsafe(Math.max(this.buf.length * 2, this.at + n));
    this.buf.copy(next, 0, 0, this.at);
    this.buf = next;
  }
}

/** One field as the binary format holds it (length, then bytes), for values repeated on every row. */
export function field(bytes: Buffer): Buffer {
  const out = Buffer.allocUnsafe(4 + bytes.length);
  out.writeInt32BE(bytes.length, 0);
  bytes.copy(out, 4);
  return out;
}

export function textField(value: string): Buffer {
  return field(Buffer.from(value, 'utf8'));
}

export function uuidField(value: string): Buffer {
  return field(Buffer.from(value.replace(/-/g, ''), 'hex'));
}

export function int4Field(value: number): Buffer {
  const out = Buffer.allocUnsafe(4);
  out.writeInt32BE(value, 0);
  return field(out);
}

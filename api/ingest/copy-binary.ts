// Rows in PostgreSQL's binary COPY format (PostgreSQL manual, COPY, "Binary Format"): the server reads
// numbers and times as they are instead of parsing their text, which roughly halves its work per row.

const SIGNATURE = Buffer.from('PGCOPY\n\xff\r\n\0', 'latin1');
/** 2000-01-01T00:00:00Z, the epoch of PostgreSQL's timestamps, in Unix milliseconds. */
const POSTGRES_EPOCH_MS = 946_684_800_000;
const TWO_TO_32 = 4_294_967_296;

/** Strings up to this length are written character by character when they are ASCII: cheaper than a call to the encoder. */
const SHORT_TEXT = 32;

export class BinaryCopyWriter {
  private buf: Buffer;
  private view: DataView;
  private at = 0;

  constructor(expectedBytes = 1 << 16) {
    this.buf = Buffer.allocUnsafe(Math.max(64, expectedBytes));
    this.view = new DataView(this.buf.buffer, this.buf.byteOffset, this.buf.length);
    SIGNATURE.copy(this.buf, 0);
    this.view.setInt32(11, 0); // flags: no OIDs
    this.view.setInt32(15, 0); // no header extension
    this.at = 19;
  }

  private room(bytes: number): void {
    if (this.at + bytes <= this.buf.length) return;
    const bigger = Buffer.allocUnsafe(Math.max(this.buf.length * 2, this.at + bytes));
    this.buf.copy(bigger, 0, 0, this.at);
    this.buf = bigger;
    this.view = new DataView(bigger.buffer, bigger.byteOffset, bigger.length);
  }

  /** Starts a row of `fields` columns, in the order of the COPY column list. */
  row(fields: number): this {
    this.room(2);
    this.view.setInt16(this.at, fields);
    this.at += 2;
    return this;
  }

  /** A field's length word; −1 marks a NULL (PostgreSQL manual, COPY, "Binary Format"). */
  private lengthWord(bytes: number): this {
    this.room(4);
    this.view.setInt32(this.at, bytes);
    this.at += 4;
    return this;
  }

  null(): this {
    return this.lengthWord(-1);
  }

  int4(value: number): this {
    this.room(8);
    this.view.setInt32(this.at, 4);
    this.view.setInt32(this.at + 4, value);
    this.at += 8;
    return this;
  }

  float8(value: number): this {
    this.room(12);
    this.view.setInt32(this.at, 8);
    this.view.setFloat64(this.at + 4, value);
    this.at += 12;
    return this;
  }

  /** A timestamptz from Unix milliseconds: microseconds since 2000-01-01 UTC as a signed 64-bit integer. */
  timestamptz(ms: number | null): this {
    if (ms === null) return this.null();
    const micros = (ms - POSTGRES_EPOCH_MS) * 1000;
    const high = Math.floor(micros / TWO_TO_32);
    this.room(12);
    this.view.setInt32(this.at, 8);
    this.view.setInt32(this.at + 4, high);
    this.view.setUint32(this.at + 8, micros - high * TWO_TO_32);
    this.at += 12;
    return this;
  }

  /** Text (or an enum label) as UTF-8. */
  text(value: string | null): this {
    if (value === null) return this.null();
    const n = value.length;
    if (n <= SHORT_TEXT) {
      this.room(4 + n);
      const start = this.at + 4;
      let i = 0;
      for (; i < n; i++) {
        const c = value.charCodeAt(i);
        if (c > 0x7f) break;
        this.buf[start + i] = c;
      }
      if (i === n) {
        this.view.setInt32(this.at, n);
        this.at = start + n;
        return this;
      }
    }
    const bytes = Buffer.byteLength(value);
    this.room(4 + bytes);
    this.view.setInt32(this.at, bytes);
    this.buf.write(value, this.at + 4, 'utf8');
    this.at += 4 + bytes;
    return this;
  }

  /**
   * The length word of a bytea field whose bytes the caller sends straight after this writer's output
   * (see take()), so a large value goes to the server as it is instead of being copied in here.
   */
  byteaLength(bytes: number): this {
    return this.lengthWord(bytes);
  }

  /** What was written so far (the header first time), as a buffer of its own; the writer starts empty again. */
  take(): Buffer {
    const out = Buffer.from(this.buf.subarray(0, this.at));
    this.at = 0;
    return out;
  }

  /** The end of a COPY stream, to send after the last take(). */
  static readonly trailer: Buffer = Buffer.from([0xff, 0xff]);

  /** The whole COPY stream: header, rows and the trailer. */
  finish(): Buffer {
    this.room(2);
    this.view.setInt16(this.at, -1);
    this.at += 2;
    return this.buf.subarray(0, this.at);
  }
}

/**
 * Rows of sittings that arrived out of order, set aside on disk until the whole file has been read.
 *
 * Strategy for unsorted input: bucket rows by sitting into temporary files. A sitting's number is
 * given in order of first appearance, and bucket b holds sittings b·2^shift to (b+1)·2^shift − 1,
 * so each bucket is small enough to sort in memory, and taking the buckets in order (and the
 * sittings in a bucket in order) visits the sittings in order of first appearance, as a reader of
 * the file would: the duplicates and conflicts found while replaying, and the examples kept of
 * them, do not depend on how the rows were spread over buckets. Compared with reading the whole
 * file again for every batch of sittings that fits in memory, each row is parsed once and written
 * and read back once as a fixed-size binary record; memory holds one write buffer per bucket and
 * one bucket's rows at a time.
 *
 * A record is (k + 3) doubles: the window start (ms), the k raw probabilities (NaN when not
 * estimated), then as 32-bit integers the sitting, the part (a global part number), the line and
 * the UTC offset in minutes.
 */
import { closeSync, openSync, readSync, rmSync, writeSync } from "node:fs";
import { join } from "node:path";

/** Records per write buffer of one bucket (about 64 KiB for six constructs). */
const BUFFER_RECORDS = 910;
/** Bytes read at a time when a bucket is read back. */
const READ_BYTES = 4 << 20;

export class SpillBuckets {
  /** Records written per bucket. */
  readonly counts: number[] = [];
  private readonly buffers: (Float64Array | undefined)[] = [];
  /** The same buffers seen as 32-bit integers. */
  private readonly ints: Int32Array[] = [];
  private readonly fill: number[] = [];
  /** Doubles per record. */
  readonly stride: number;

  constructor(
    private readonly dir: string,
    private readonly k: number,
    readonly shift: number,
  ) {
    this.stride = k + 3;
  }

  /** Sets aside one row; `values` holds the k probabilities. */
  write(
    sitting: number,
    part: number,
    line: number,
    time: number,
    offsetMinutes: number,
    values: Float64Array,
  ): void {
    const b = sitting >> this.shift;
    let buf = this.buffers[b];
    if (!buf) {
      buf = new Float64Array(BUFFER_RECORDS * this.stride);
      this.buffers[b] = buf;
      this.ints[b] = new Int32Array(buf.buffer);
      this.fill[b] = 0;
      this.counts[b] ??= 0;
    }
    const n = this.fill[b]!;
    const at = n * this.stride;
    buf[at] = time;
    for (let c = 0; c < this.k; c++) buf[at + 1 + c] = values[c]!;
    const ints = this.ints[b]!;
    const i = (at + 1 + this.k) * 2;
    ints[i] = sitting;
    ints[i + 1] = part;
    ints[i + 2] = line;
    ints[i + 3] = offsetMinutes;
    this.fill[b] = n + 1;
    this.counts[b]!++;
    if (n + 1 === BUFFER_RECORDS) this.flush(b);
  }

  /** Writes every buffer out (before reading back). */
  flushAll(): void {
    for (let b = 0; b < this.buffers.length; b++) if (this.buffers[b]) this.flush(b);
  }

  get bucketCount(): number {
    return this.counts.length;
  }

  /**
   * Reads bucket b back, in chunks, calling `each` with a view of the chunk and the index (in
   * doubles) where each record starts.
   */
  read(b: number, each: (chunk: Float64Array, ints: Int32Array, at: number) => void): void {
    if (!this.counts[b]) return;
    const recordBytes = this.stride * 8;
    const chunkRecords = Math.max(1, Math.floor(READ_BYTES / recordBytes));
    const chunk = new Float64Array(chunkRecords * this.stride);
    const bytes = new Uint8Array(chunk.buffer);
    const ints = new Int32Array(chunk.buffer);
    const fd = openSync(this.path(b), "r");
    try {
      while (true) {
        let got = 0;
        while (got < bytes.length) {
          const n = readSync(fd, bytes, got, bytes.length - got, null);
          if (n === 0) break;
          got += n;
        }
        const records = Math.floor(got / recordBytes);
        for (let r = 0; r < records; r++) each(chunk, ints, r * this.stride);
        if (got < bytes.length) break;
      }
    } finally {
      closeSync(fd);
    }
  }

  /** Removes the temporary files. */
  remove(): void {
    rmSync(this.dir, { recursive: true, force: true });
  }

  private path(b: number): string {
    return join(this.dir, `bucket-${b}.bin`);
  }

  private flush(b: number): void {
    const n = this.fill[b]!;
    if (n === 0) return;
    const buf = this.buffers[b]!;
    const fd = openSync(this.path(b), "a");
    try {
      const bytes = new Uint8Array(buf.buffer, 0, n * this.stride * 8);
      let done = 0;
      while (done < bytes.length) done += writeSync(fd, bytes, done, bytes.length - done);
    } finally {
      closeSync(fd);
    }
    this.fill[b] = 0;
  }
}

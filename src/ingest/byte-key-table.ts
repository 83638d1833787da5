/**
 * Interns keys made of several fields of a record, read straight from bytes: each distinct key gets
 * a dense number (0, 1, 2, ... in order of first appearance), and looking a key up creates no
 * string. Used to find a row's sitting (student × session) and part (class, school, unit, activity)
 * on every row of an unsorted file, where decoding the ids to strings and hashing those strings in
 * a Map cost more than the rest of the row.
 *
 * Open addressing with linear probing over a power-of-two table (at most half full). The keys'
 * bytes live in one arena, with each field's length beside them, so that fields are compared one by
 * one ("ab" + "c" is not "a" + "bc"). The hash is 32-bit FNV-1a over the bytes, with 0xff (a byte
 * that never occurs in UTF-8) between fields.
 */

const FNV_OFFSET = 0x811c9dc5;
const FNV_PRIME = 0x01000193;

export class ByteKeyTable {
  /** Number of keys. */
  size = 0;
  private arena = Buffer.alloc(1 << 16);
  private used = 0;
  /** Per key: where its bytes start in the arena, and its hash. */
  private keyAt = new Int32Array(1024);
  private keyHash = new Int32Array(1024);
  /** Per key and field: the field's length. */
  private fieldLen: Int32Array;
  private slots = new Int32Array(2048).fill(-1);
  private mask = 2047;
  private lastHash = 0;

  /** `fields` is the number of fields in a key. */
  constructor(private readonly fields: number) {
    this.fieldLen = new Int32Array(1024 * fields);
  }

  /**
   * The number of the key formed by the fields at columns `cols` (a column < 0 is an empty field)
   * of a record whose field c spans bytes starts[c]..ends[c] of `buf`; -1 when the key is new (then
   * `add` with the same arguments adds it).
   */
  find(buf: Uint8Array, starts: Int32Array, ends: Int32Array, cols: Int32Array): number {
    let h = FNV_OFFSET;
    for (let f = 0; f < this.fields; f++) {
      const col = cols[f]!;
      if (col >= 0) {
        const e = ends[col]!;
        for (let i = starts[col]!; i < e; i++) h = Math.imul(h ^ buf[i]!, FNV_PRIME);
      }
      h = Math.imul(h ^ 0xff, FNV_PRIME); // field separator (0xff never occurs in UTF-8)
    }
    this.lastHash = h;
    let slot = h & this.mask;
    while (true) {
      const key = this.slots[slot]!;
      if (key < 0) return -1;
      if (this.keyHash[key] === h && this.matches(key, buf, starts, ends, cols)) return key;
      slot = (slot + 1) & this.mask;
    }
  }

  /** Adds the key last passed to `find` (which returned -1) and returns its number. */
  add(buf: Uint8Array, starts: Int32Array, ends: Int32Array, cols: Int32Array): number {
    const key = this.size++;
    if (key === this.keyAt.length) {
      this.keyAt = grow(this.keyAt, key * 2);
      this.keyHash = grow(this.keyHash, key * 2);
      this.fieldLen = grow(this.fieldLen, key * 2 * this.fields);
    }
    let bytes = 0;
    for (let f = 0; f < this.fields; f++) {
      const col = cols[f]!;
      bytes += col < 0 ? 0 : ends[col]! - starts[col]!;
    }
    if (this.used + bytes > this.arena.length) {
      const bigger = Buffer.alloc(Math.max(this.arena.length * 2, this.used + bytes));
      this.arena.copy(bigger, 0, 0, this.used);
      this.arena = bigger;
    }
    this.keyAt[key] = this.used;
    this.keyHash[key] = this.lastHash;
    for (let f = 0; f < this.fields; f++) {
      const col = cols[f]!;
      const n = col < 0 ? 0 : ends[col]! - starts[col]!;
      if (n > 0) this.arena.set(buf.subarray(starts[col]!, ends[col]!), this.used);
      this.fieldLen[key * this.fields + f] = n;
      this.used += n;
    }
    if (this.size * 2 > this.slots.length) this.rehash();
    else this.place(key);
    return key;
  }

  /** Field f of key `key` as text. */
  text(key: number, f: number): string {
    let at = this.keyAt[key]!;
    for (let g = 0; g < f; g++) at += this.fieldLen[key * this.fields + g]!;
    return this.arena.toString("utf8", at, at + this.fieldLen[key * this.fields + f]!);
  }

  /** Whether the fields at `cols` form key number `key`. */
  matches(key: number, buf: Uint8Array, starts: Int32Array, ends: Int32Array, cols: Int32Array): boolean {
    let at = this.keyAt[key]!;
    const arena = this.arena;
    for (let f = 0; f < this.fields; f++) {
      const col = cols[f]!;
      const n = this.fieldLen[key * this.fields + f]!;
      if (col < 0) {
        if (n !== 0) return false;
        continue;
      }
      const s = starts[col]!;
      if (ends[col]! - s !== n) return false;
      for (let i = 0; i < n; i++) if (buf[s + i] !== arena[at + i]) return false;
      at += n;
    }
    return true;
  }

  private place(key: number): void {
    let slot = this.keyHash[key]! & this.mask;
    while (this.slots[slot]! >= 0) slot = (slot + 1) & this.mask;
    this.slots[slot] = key;
  }

  private rehash(): void {
    this.slots = new Int32Array(this.slots.length * 2).fill(-1);
    this.mask = this.slots.length - 1;
    for (let key = 0; key < this.size; key++) this.place(key);
  }
}

function grow(a: Int32Array, size: number): Int32Array<ArrayBuffer> {
  const b = new Int32Array(size);
  b.set(a);
  return b;
}

/**
 * The benchmark's input files, generated once and kept in bench/data/ (ignored by git), named by
 * their size and seed so that later runs reuse them. Each file is written under a temporary name
 * and renamed when complete, so an interrupted run leaves no half-written file behind.
 */
import {
  closeSync,
  existsSync,
  fstatSync,
  mkdirSync,
  openSync,
  readSync,
  renameSync,
  rmSync,
  statSync,
  writeSync,
} from "node:fs";
import { join } from "node:path";
import { performance } from "node:perf_hooks";
import { demoFiles, demoSimulate, randomModule } from "./dist.js";

export interface WindowsFile {
  readonly path: string;
  readonly card: string;
  readonly rows: number;
  readonly bytes: number;
}

const log = (line: string) => process.stderr.write(`${line}\n`);

/** The demo's card for a seed (it depends on the seed only), from a small demo district. */
async function demoCardFile(dataDir: string, seed: number): Promise<string> {
  const dir = join(dataDir, `card-s${seed}`);
  const card = join(dir, "card.yaml");
  if (existsSync(card)) return card;
  const tmp = `${dir}.tmp`;
  rmSync(tmp, { recursive: true, force: true });
  mkdirSync(tmp, { recursive: true });
  const { writeDemoDistrict } = await demoSimulate();
  await writeDemoDistrict(tmp, { students: 50, seed, mode: "planted" });
  renameSync(tmp, dir);
  return card;
}

class Enough extends Error {}

/**
 * A windows file of exactly `rows` data rows from the demo simulator (sorted by student, session,
 * time): a district large enough for the rows, cut after the last one wanted (the last sitting may
 * end early). About 680 rows and 145 bytes a row per student with the demo's defaults.
 */
export async function windowsFile(dataDir: string, rows: number, seed: number): Promise<WindowsFile> {
  mkdirSync(dataDir, { recursive: true });
  const card = await demoCardFile(dataDir, seed);
  const path = join(dataDir, `windows-${rows}-s${seed}.csv`);
  if (!existsSync(path)) {
    const { simulateDistrict } = await demoSimulate();
    const { ChunkedFileWriter, WindowLineFormatter, WINDOW_COLUMNS, csvLine } = await demoFiles();
    const students = Math.min(100_000, Math.max(50, Math.ceil(rows / 500)));
    const tmp = `${path}.tmp`;
    const start = performance.now();
    log(`generating ${rows.toLocaleString("en-US")} rows (${students} students, seed ${seed}) ...`);
    const writer = new ChunkedFileWriter(tmp);
    let written = 0;
    try {
      writer.write(csvLine(WINDOW_COLUMNS));
      const formatter = new WindowLineFormatter();
      simulateDistrict({ students, seed, mode: "planted" }, (window) => {
        if (written === rows) throw new Enough();
        writer.write(formatter.line(window));
        written++;
      });
    } catch (error) {
      if (!(error instanceof Enough)) throw error;
    } finally {
      writer.close();
    }
    if (written !== rows) throw new Error(`the demo district gave ${written} rows, fewer than ${rows}`);
    renameSync(tmp, path);
    log(`  done in ${((performance.now() - start) / 1000).toFixed(1)} s`);
  }
  return { path, card, rows, bytes: statSync(path).size };
}

/**
 * The same rows in a random order (seeded Fisher–Yates over the lines), header first. Reads the
 * whole file into memory: meant for files of a few GB at most.
 */
export async function shuffledFile(file: WindowsFile, seed: number): Promise<WindowsFile> {
  const path = file.path.replace(/\.csv$/, `-shuffled-s${seed}.csv`);
  if (!existsSync(path)) {
    const start = performance.now();
    log(`shuffling ${file.rows.toLocaleString("en-US")} rows ...`);
    const data = readWhole(file.path);
    const starts = new Float64Array(file.rows + 2);
    let n = 0;
    for (let i = data.indexOf(10); i !== -1 && i < data.length - 1; i = data.indexOf(10, i + 1)) {
      starts[n++] = i + 1;
    }
    if (n !== file.rows) throw new Error(`${file.path}: ${n} data rows, expected ${file.rows}`);
    starts[n] = data.length;
    const order = new Uint32Array(n);
    for (let i = 0; i < n; i++) order[i] = i;
    const random = (await randomModule()).createRandom(seed);
    for (let i = n - 1; i > 0; i--) {
      const j = random.int(i + 1);
      const held = order[i]!;
      order[i] = order[j]!;
      order[j] = held;
    }
    const tmp = `${path}.tmp`;
    const out = new BufferedOut(tmp);
    try {
      out.append(data, 0, starts[0]!);
      for (let i = 0; i < n; i++) {
        const r = order[i]!;
        out.append(data, starts[r]!, starts[r + 1]!);
      }
    } finally {
      out.close();
    }
    renameSync(tmp, path);
    log(`  done in ${((performance.now() - start) / 1000).toFixed(1)} s`);
  }
  return { ...file, path, bytes: statSync(path).size };
}

export interface DemoDistrictFiles {
  readonly students: number;
  readonly windows: string;
  readonly card: string;
  readonly roster: string;
  readonly rows: number;
  readonly bytes: number;
}

/** The demo district's files (windows, card, roster, truth) for a number of students and a seed. */
export async function demoDistrict(
  dataDir: string,
  students: number,
  seed: number,
): Promise<DemoDistrictFiles> {
  const dir = join(dataDir, `demo-${students}-s${seed}`);
  if (!existsSync(dir)) {
    const start = performance.now();
    log(`generating the demo district of ${students.toLocaleString("en-US")} students ...`);
    const tmp = `${dir}.tmp`;
    rmSync(tmp, { recursive: true, force: true });
    mkdirSync(tmp, { recursive: true });
    await (await demoSimulate()).writeDemoDistrict(tmp, { students, seed, mode: "planted" });
    renameSync(tmp, dir);
    log(`  done in ${((performance.now() - start) / 1000).toFixed(1)} s`);
  }
  const windows = join(dir, "windows.csv");
  return {
    students,
    windows,
    card: join(dir, "card.yaml"),
    roster: join(dir, "roster.csv"),
    rows: countLines(windows) - 1,
    bytes: statSync(windows).size,
  };
}

function readWhole(path: string): Buffer {
  const fd = openSync(path, "r");
  try {
    const size = fstatSync(fd).size;
    const data = Buffer.allocUnsafe(size);
    let at = 0;
    while (at < size) {
      const n = readSync(fd, data, at, size - at, at);
      if (n === 0) throw new Error(`${path}: ended early`);
      at += n;
    }
    return data;
  } finally {
    closeSync(fd);
  }
}

export function countLines(path: string): number {
  const fd = openSync(path, "r");
  const buf = Buffer.allocUnsafe(1 << 22);
  let lines = 0;
  try {
    for (let n = readSync(fd, buf); n > 0; n = readSync(fd, buf)) {
      const view = n === buf.length ? buf : buf.subarray(0, n);
      for (let i = view.indexOf(10); i !== -1; i = view.indexOf(10, i + 1)) lines++;
    }
  } finally {
    closeSync(fd);
  }
  return lines;
}

/** Appends byte ranges to a file through one 4 MiB buffer. */
class BufferedOut {
  private readonly fd: number;
  private readonly buf = Buffer.allocUnsafe(1 << 22);
  private used = 0;
  constructor(path: string) {
    this.fd = openSync(path, "w");
  }
  append(data: Buffer, from: number, to: number): void {
    if (this.used + (to - from) > this.buf.length) this.flush();
    if (to - from > this.buf.length) {
      this.write(data.subarray(from, to));
      return;
    }
    this.used += data.copy(this.buf, this.used, from, to);
  }
  close(): void {
    try {
      this.flush();
    } finally {
      closeSync(this.fd);
    }
  }
  private flush(): void {
    this.write(this.buf.subarray(0, this.used));
    this.used = 0;
  }
  private write(bytes: Buffer): void {
    let at = 0;
    while (at < bytes.length) at += writeSync(this.fd, bytes, at, bytes.length - at);
  }
}

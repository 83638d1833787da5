/**
 * Outputs appear whole or not at all. A build writes into a temporary folder beside the target and
 * renames it into place at the end; a failed build removes its temporary folder and leaves any
 * existing output untouched. An existing target is replaced only when it is empty or was itself
 * written by this tool (it holds our manifest.json); anything else is refused.
 */
import { randomBytes } from "node:crypto";
import {
  closeSync,
  existsSync,
  mkdirSync,
  openSync,
  readdirSync,
  readFileSync,
  renameSync,
  rmSync,
  statSync,
  writeSync,
} from "node:fs";
import { open } from "node:fs/promises";
import { basename, dirname, join, resolve } from "node:path";
import { UsageError } from "../errors.js";

export const MANIFEST_TOOL = "engagement-report";

function isOurOutput(dir: string): boolean {
  if (readdirSync(dir).length === 0) return true;
  try {
    const manifest = JSON.parse(readFileSync(join(dir, "manifest.json"), "utf8")) as { tool?: unknown };
    return manifest.tool === MANIFEST_TOOL;
  } catch {
    return false;
  }
}

/** Checks before any work that the target can be written, so a long build does not fail at the end. */
export function checkOutputDir(target: string): void {
  const dir = resolve(target);
  if (!existsSync(dir)) {
    if (!existsSync(dirname(dir)))
      throw new UsageError(`--out ${target}: the folder ${dirname(dir)} does not exist.`);
    return;
  }
  if (!statSync(dir).isDirectory())
    throw new UsageError(`--out ${target}: a file of that name exists; choose a folder name.`);
  if (!isOurOutput(dir)) {
    throw new UsageError(
      `--out ${target}: the folder exists and was not written by engagement-report (no manifest.json of ours); choose another folder or empty it.`,
    );
  }
}

/** Runs `write` on a fresh temporary folder, then puts it in place of `target`. */
export async function writeFolderAtomically<T>(
  target: string,
  write: (tmp: string) => Promise<T> | T,
): Promise<T> {
  const dir = resolve(target);
  checkOutputDir(dir);
  const tag = `${process.pid}-${randomBytes(4).toString("hex")}`;
  const tmp = join(dirname(dir), `.${basename(dir)}.partial-${tag}`);
  mkdirSync(tmp);
  let result: T;
  try {
    result = await write(tmp);
  } catch (error) {
    rmSync(tmp, { recursive: true, force: true });
    throw error;
  }
  if (existsSync(dir)) {
    const old = join(dirname(dir), `.${basename(dir)}.old-${tag}`);
    renameSync(dir, old);
    try {
      renameSync(tmp, dir);
    } catch (error) {
      renameSync(old, dir);
      rmSync(tmp, { recursive: true, force: true });
      throw error;
    }
    rmSync(old, { recursive: true, force: true });
  } else {
    renameSync(tmp, dir);
  }
  return result;
}

function writeChunk(fd: number, chunk: string | Uint8Array): void {
  if (typeof chunk === "string") {
    writeSync(fd, chunk);
    return;
  }
  let at = 0;
  while (at < chunk.length) at += writeSync(fd, chunk, at, chunk.length - at);
}

/** Writes text chunks (or bytes) to a file (large outputs are never one string). */
export function writeChunks(
  path: string,
  content: string | Uint8Array | Iterable<string | Uint8Array>,
): void {
  const fd = openSync(path, "w");
  try {
    if (typeof content === "string") writeSync(fd, content);
    else if (content instanceof Uint8Array) writeSync(fd, content);
    else for (const chunk of content) writeChunk(fd, chunk);
  } finally {
    closeSync(fd);
  }
}

/** Chunks handed to the file system and not yet written, at most (see writeChunksOverlapped). */
const WRITES_AHEAD = 4;

/**
 * writeChunks with the writing overlapped with making the next chunks: each chunk is written at
 * its position by libuv's thread pool while this thread goes on with the generator, and this
 * thread waits only when WRITES_AHEAD chunks are still being written. For a large sessions.csv
 * the writing (a tenth of a second per hundred megabytes) then hides behind the formatting.
 */
export async function writeChunksOverlapped(
  path: string,
  content: Iterable<string | Uint8Array>,
): Promise<void> {
  const handle = await open(path, "w");
  const pending: Promise<void>[] = [];
  try {
    let position = 0;
    for (const chunk of content) {
      const bytes = typeof chunk === "string" ? Buffer.from(chunk, "utf8") : chunk;
      if (bytes.length === 0) continue;
      const at = position;
      position += bytes.length;
      const write = (async () => {
        let done = 0;
        while (done < bytes.length) {
          const { bytesWritten } = await handle.write(bytes, done, bytes.length - done, at + done);
          done += bytesWritten;
        }
      })();
      // Awaited below; a failure is never left unhandled meanwhile.
      write.catch(() => {});
      pending.push(write);
      if (pending.length >= WRITES_AHEAD) await pending.shift();
    }
    await Promise.all(pending);
  } finally {
    // Writes still in flight (when the content failed) end before the file is closed.
    await Promise.allSettled(pending);
    await handle.close();
  }
}

/** writeFileAtomically, with the writing overlapped with making the chunks (writeChunksOverlapped). */
export async function writeFileAtomicallyOverlapped(
  target: string,
  content: Iterable<string | Uint8Array>,
): Promise<void> {
  const { file, tmp } = atomicTarget(target);
  try {
    await writeChunksOverlapped(tmp, content);
    renameSync(tmp, file);
  } catch (error) {
    rmSync(tmp, { force: true });
    throw error;
  }
}

/** The file and its temporary name for writing `target` atomically, after checking the folder. */
function atomicTarget(target: string): { file: string; tmp: string } {
  const file = resolve(target);
  if (!existsSync(dirname(file)))
    throw new UsageError(`--out ${target}: the folder ${dirname(file)} does not exist.`);
  if (existsSync(file) && statSync(file).isDirectory())
    throw new UsageError(`--out ${target}: that is a folder; give a file name.`);
  const tmp = join(
    dirname(file),
    `.${basename(file)}.partial-${process.pid}-${randomBytes(4).toString("hex")}`,
  );
  return { file, tmp };
}

/** Writes one file through a temporary name in the same folder, then renames it into place. */
export function writeFileAtomically(
  target: string,
  content: string | Uint8Array | Iterable<string | Uint8Array>,
): void {
  const { file, tmp } = atomicTarget(target);
  try {
    writeChunks(tmp, content);
    renameSync(tmp, file);
  } catch (error) {
    rmSync(tmp, { force: true });
    throw error;
  }
}

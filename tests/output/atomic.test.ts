/**
 * Outputs appear whole or not at all (src/output/atomic.ts): a failed write leaves neither the
 * output nor a temporary folder; a folder that is not ours is never deleted or replaced.
 */
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { UsageError } from "../../src/errors.js";
import {
  MANIFEST_TOOL,
  writeFileAtomically,
  writeFileAtomicallyOverlapped,
  writeFolderAtomically,
} from "../../src/output/atomic.js";

function parent(): string {
  return mkdtempSync(join(tmpdir(), "er-atomic-"));
}

/** A folder's files and their contents, for before/after comparisons. */
function snapshot(dir: string): Record<string, string> {
  const out: Record<string, string> = {};
  for (const entry of readdirSync(dir, { recursive: true, withFileTypes: true })) {
    if (entry.isFile()) {
      const full = join(entry.parentPath, entry.name);
      out[full.slice(dir.length)] = readFileSync(full, "utf8");
    }
  }
  return out;
}

const manifest = (tool: string) => `${JSON.stringify({ tool, version: "0.0.0", files: [] })}\n`;

async function writeReport(target: string, body = "new"): Promise<string> {
  return writeFolderAtomically(target, (tmp) => {
    mkdirSync(join(tmp, "data"));
    writeFileSync(join(tmp, "data", "sessions.csv"), body);
    writeFileSync(join(tmp, "manifest.json"), manifest(MANIFEST_TOOL));
    return "done";
  });
}

describe("writeFolderAtomically", () => {
  it("writes a new folder and leaves nothing else beside it", async () => {
    const dir = parent();
    await expect(writeReport(join(dir, "report"))).resolves.toBe("done");
    expect(readdirSync(dir)).toEqual(["report"]);
    expect(readFileSync(join(dir, "report", "data", "sessions.csv"), "utf8")).toBe("new");
  });

  it("a failing writer (thrown or rejected) leaves no output folder and no temporary folder", async () => {
    const dir = parent();
    const target = join(dir, "report");
    await expect(
      writeFolderAtomically(target, (tmp) => {
        writeFileSync(join(tmp, "half.csv"), "partial");
        throw new Error("renderer failed");
      }),
    ).rejects.toThrow("renderer failed");
    await expect(
      writeFolderAtomically(target, async (tmp) => {
        writeFileSync(join(tmp, "half.csv"), "partial");
        await Promise.resolve();
        throw new Error("async renderer failed");
      }),
    ).rejects.toThrow("async renderer failed");
    expect(readdirSync(dir)).toEqual([]);
  });

  it("a failing writer leaves an existing output of ours exactly as it was", async () => {
    const dir = parent();
    const target = join(dir, "report");
    await writeReport(target, "old");
    const before = snapshot(target);
    await expect(
      writeFolderAtomically(target, () => {
        throw new Error("renderer failed");
      }),
    ).rejects.toThrow("renderer failed");
    expect(snapshot(target)).toEqual(before);
    expect(readdirSync(dir)).toEqual(["report"]);
  });

  it("never deletes or replaces a non-empty folder without our manifest, and says why", async () => {
    const dir = parent();
    const cases: [string, (target: string) => void][] = [
      ["no manifest", (t) => writeFileSync(join(t, "thesis.docx"), "years of work")],
      ["someone else's manifest", (t) => writeFileSync(join(t, "manifest.json"), manifest("another-tool"))],
      ["a manifest that is not JSON", (t) => writeFileSync(join(t, "manifest.json"), "{ not json")],
      [
        "our manifest only in a subfolder",
        (t) => {
          mkdirSync(join(t, "inner"));
          writeFileSync(join(t, "inner", "manifest.json"), manifest(MANIFEST_TOOL));
        },
      ],
    ];
    expect.assertions(cases.length * 5);
    for (const [name, fill] of cases) {
      const target = join(dir, name.replaceAll(" ", "-"));
      mkdirSync(target);
      fill(target);
      const before = snapshot(target);
      let writerRan = false;
      const attempt = writeFolderAtomically(target, () => {
        writerRan = true;
      });
      await expect(attempt, name).rejects.toThrow(UsageError);
      await expect(attempt, name).rejects.toThrow(
        /the folder exists and was not written by engagement-report/,
      );
      expect(writerRan, name).toBe(false);
      expect(snapshot(target), name).toEqual(before);
      expect(
        readdirSync(dir).filter((f) => f.startsWith(".")),
        name,
      ).toEqual([]);
    }
  });

  it("replaces a folder holding our manifest, and an empty folder", async () => {
    const dir = parent();
    const ours = join(dir, "ours");
    await writeReport(ours, "old");
    writeFileSync(join(ours, "stale.html"), "from the previous build");
    await writeReport(ours, "new");
    expect(snapshot(ours)).toEqual({
      "/data/sessions.csv": "new",
      "/manifest.json": manifest(MANIFEST_TOOL),
    });
    const empty = join(dir, "empty");
    mkdirSync(empty);
    await writeReport(empty, "new");
    expect(readFileSync(join(empty, "data", "sessions.csv"), "utf8")).toBe("new");
    expect(readdirSync(dir).sort()).toEqual(["empty", "ours"]);
  });

  it("refuses a target that is a file, or whose parent folder does not exist", async () => {
    const dir = parent();
    writeFileSync(join(dir, "report"), "a file");
    await expect(writeReport(join(dir, "report"))).rejects.toThrow(UsageError);
    expect(readFileSync(join(dir, "report"), "utf8")).toBe("a file");
    await expect(writeReport(join(dir, "missing", "report"))).rejects.toThrow(/does not exist/);
    expect(readdirSync(dir)).toEqual(["report"]);
  });
});

describe("writeFileAtomically", () => {
  it("replaces a file whole", () => {
    const dir = parent();
    const target = join(dir, "sessions.csv");
    writeFileSync(target, "old\n");
    writeFileAtomically(target, ["a,b\n", "1,2\n"]);
    expect(readFileSync(target, "utf8")).toBe("a,b\n1,2\n");
    expect(readdirSync(dir)).toEqual(["sessions.csv"]);
  });

  it("leaves the old file intact and no temporary file when writing fails midway", () => {
    const dir = parent();
    const target = join(dir, "sessions.csv");
    writeFileSync(target, "old contents\n");
    function* failing(): Generator<string> {
      yield "student_id,construct\n";
      yield "s1,bored\n";
      throw new Error("summaries failed");
    }
    expect(() => writeFileAtomically(target, failing())).toThrow("summaries failed");
    expect(readFileSync(target, "utf8")).toBe("old contents\n");
    expect(readdirSync(dir)).toEqual(["sessions.csv"]);
    expect(() => writeFileAtomically(join(dir, "new.csv"), failing())).toThrow("summaries failed");
    expect(existsSync(join(dir, "new.csv"))).toBe(false);
    expect(readdirSync(dir)).toEqual(["sessions.csv"]);
  });

  it("refuses a folder as target, and a missing parent folder", () => {
    const dir = parent();
    mkdirSync(join(dir, "out"));
    expect(() => writeFileAtomically(join(dir, "out"), "x")).toThrow(UsageError);
    expect(() => writeFileAtomically(join(dir, "nope", "s.csv"), "x")).toThrow(/does not exist/);
    expect(readdirSync(dir)).toEqual(["out"]);
    expect(readdirSync(join(dir, "out"))).toEqual([]);
  });
});

describe("writeFileAtomicallyOverlapped", () => {
  it("writes every chunk at its place, however many are in flight", async () => {
    const dir = parent();
    const target = join(dir, "sessions.csv");
    writeFileSync(target, "old\n");
    const chunks: (string | Uint8Array)[] = [];
    let expected = "";
    for (let i = 0; i < 200; i++) {
      // Strings, bytes and empty chunks of different sizes, some with multi-byte characters.
      const text = i % 17 === 0 ? "" : `${i}:${"é".repeat(i % 5)}${"x".repeat((i * 7919) % 70_000)}\n`;
      chunks.push(i % 2 === 0 ? text : Buffer.from(text, "utf8"));
      expected += text;
    }
    await writeFileAtomicallyOverlapped(target, chunks);
    expect(readFileSync(target, "utf8")).toBe(expected);
    expect(readdirSync(dir)).toEqual(["sessions.csv"]);
  });

  it("leaves the old file intact and no temporary file when making the chunks fails midway", async () => {
    const dir = parent();
    const target = join(dir, "sessions.csv");
    writeFileSync(target, "old contents\n");
    function* failing(): Generator<string> {
      for (let i = 0; i < 10; i++) yield `s${i},bored\n`.repeat(10_000);
      throw new Error("summaries failed");
    }
    await expect(writeFileAtomicallyOverlapped(target, failing())).rejects.toThrow("summaries failed");
    expect(readFileSync(target, "utf8")).toBe("old contents\n");
    expect(readdirSync(dir)).toEqual(["sessions.csv"]);
    await expect(writeFileAtomicallyOverlapped(join(dir, "nope", "s.csv"), ["x"])).rejects.toThrow(
      /does not exist/,
    );
  });
});

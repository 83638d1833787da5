import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { expect } from "vitest";
import { SettingsError } from "../../src/errors.js";

const dir = mkdtempSync(join(tmpdir(), "er-config-"));
let count = 0;

/** Writes YAML text to a fresh file and returns its path. */
export function yamlFile(text: string): string {
  count++;
  const path = join(dir, `file-${count}.yaml`);
  writeFileSync(path, text);
  return path;
}

/** Loads `text` with `load`, which must throw a SettingsError; returns the file's path and the message. */
export function loadFailure(
  load: (path: string) => unknown,
  text: string,
): { path: string; message: string } {
  const path = yamlFile(text);
  let thrown: unknown;
  try {
    load(path);
  } catch (error) {
    thrown = error;
  }
  expect(thrown).toBeInstanceOf(SettingsError);
  return { path, message: (thrown as Error).message };
}

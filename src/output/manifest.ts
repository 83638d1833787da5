/** manifest.json: what was built, from what, with which card and settings, and which files. */
import { createHash } from "node:crypto";
import { readdirSync, readFileSync, statSync } from "node:fs";
import { join, relative } from "node:path";
import { cardAsUsed } from "../config/card.js";
import { settingsAsUsed } from "../config/settings.js";
import type { Card, Settings } from "../config/types.js";
import type { InputFile } from "../pipeline/inputs.js";
import { MANIFEST_TOOL } from "./atomic.js";

export interface ManifestInput {
  readonly version: string;
  readonly buildTime: string;
  readonly inputs: readonly InputFile[];
  readonly card: Card;
  readonly settings: Settings;
  readonly command: string;
}

function listFiles(root: string, dir = root): string[] {
  const out: string[] = [];
  for (const entry of readdirSync(dir, { withFileTypes: true }).sort((a, b) => (a.name < b.name ? -1 : 1))) {
    const full = join(dir, entry.name);
    if (entry.isDirectory()) out.push(...listFiles(root, full));
    else out.push(relative(root, full).split("\\").join("/"));
  }
  return out;
}

/** The manifest of a finished output folder: call after every other file is written. */
export function manifestFor(folder: string, m: ManifestInput): string {
  const files = listFiles(folder)
    .filter((f) => f !== "manifest.json")
    .map((path) => {
      const full = join(folder, path);
      return {
        path,
        bytes: statSync(full).size,
        sha256: createHash("sha256").update(readFileSync(full)).digest("hex"),
      };
    });
  const manifest = {
    tool: MANIFEST_TOOL,
    version: m.version,
    command: m.command,
    build_time: m.buildTime,
    inputs: m.inputs.map((f) => ({ role: f.role, name: f.name, bytes: f.bytes, sha256: f.sha256 })),
    card: cardAsUsed(m.card),
    settings: settingsAsUsed(m.settings),
    files: [...files, { path: "manifest.json", bytes: null, sha256: null }],
  };
  return `${JSON.stringify(manifest, null, 2)}\n`;
}

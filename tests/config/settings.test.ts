/**
 * loadSettings: every problem names file:line:col, the key path, what was expected and the value
 * found; every setting has a default with its reason. Columns are counted by hand in the YAML
 * text of each case (1-based, as editors show them).
 */
import { readFileSync } from "node:fs";
import { Ajv } from "ajv";
import { describe, expect, it } from "vitest";
import { stringify } from "yaml";
import { DEFAULT_REASONS, DEFAULT_SETTINGS } from "../../src/config/defaults.js";
import { loadSettings, settingsAsUsed } from "../../src/config/settings.js";
import { PATTERN_TEXT } from "../../src/messages.js";
import { loadFailure, yamlFile } from "./load-failure.js";

const fail = (text: string) => loadFailure(loadSettings, text);

interface SchemaNode {
  type?: string | string[];
  properties?: Record<string, SchemaNode>;
  default?: unknown;
}

const schema = JSON.parse(
  readFileSync(new URL("../../schemas/settings.schema.json", import.meta.url), "utf8"),
) as SchemaNode;

/** Dotted paths of the leaves of a schema (objects with properties are branches; all else is a leaf). */
function schemaLeaves(node: SchemaNode, prefix = ""): Map<string, SchemaNode> {
  const out = new Map<string, SchemaNode>();
  for (const [key, child] of Object.entries(node.properties ?? {})) {
    const path = prefix === "" ? key : `${prefix}.${key}`;
    if (child.properties) for (const [p, n] of schemaLeaves(child, path)) out.set(p, n);
    else out.set(path, child);
  }
  return out;
}

/** Dotted paths of the leaves of a plain object (arrays, null and scalars are leaves). */
function valueLeaves(value: unknown, prefix = ""): Map<string, unknown> {
  const out = new Map<string, unknown>();
  for (const [key, child] of Object.entries(value as Record<string, unknown>)) {
    const path = prefix === "" ? key : `${prefix}.${key}`;
    if (child !== null && typeof child === "object" && !Array.isArray(child)) {
      for (const [p, v] of valueLeaves(child, path)) out.set(p, v);
    } else out.set(path, child);
  }
  return out;
}

const camel = (dotted: string) => dotted.replace(/_([a-z])/g, (_, c: string) => c.toUpperCase());
/** The text as a regular expression that matches it literally. */
const esc = (text: string) => text.replace(/[.*+?^${}()|[\]\\]/g, "\\$&");
const sorted = (keys: Iterable<string>) => [...keys].sort();

describe("loadSettings messages", () => {
  it("wrong type: location, key path, expected type and value", () => {
    const a = fail("confidence: high\n");
    expect(a.message).toBe(`${a.path}:1:13: confidence: expected a number, found "high"`);
    const b = fail("title: Spring\nevidence:\n  min_sessions: 2.5\n");
    expect(b.message).toBe(`${b.path}:3:17: evidence.min_sessions: expected a whole number, found 2.5`);
    // YAML 1.2 (the yaml package's default core schema) reads `yes` as text, not as true.
    const c = fail("strict: yes\n");
    expect(c.message).toBe(`${c.path}:1:9: strict: expected true or false, found "yes"`);
    const d = fail("evidence: 3\n");
    expect(d.message).toBe(`${d.path}:1:11: evidence: expected a mapping of keys, found 3`);
    const e = fail("audiences: [counselors, parents]\n");
    expect(e.message).toBe(
      `${e.path}:1:25: audiences.1: expected one of counselors, content, support, about, found "parents"`,
    );
  });

  it("unknown keys: location of the key, its path, and the keys allowed there", () => {
    const a = fail("title: Spring\ntitel: x\n");
    expect(a.message).toMatch(new RegExp(`^${esc(a.path)}:2:1: unknown key "titel"; allowed here: title, `));
    const b = fail("evidence:\n  min_session: 3\n");
    expect(b.message).toBe(
      `${b.path}:2:3: unknown key "evidence.min_session"; allowed here: min_minutes, min_sessions, min_days, min_students. Check the spelling.`,
    );
  });

  it("out-of-range values, and a suppression size below 5 is refused", () => {
    const a = fail("suppression_size: 4\n");
    expect(a.message).toBe(`${a.path}:1:19: suppression_size: expected at least 5, found 4`);
    expect(loadSettings(yamlFile("suppression_size: 5\n")).suppressionSize).toBe(5);
    const b = fail("confidence: 1.5\n");
    expect(b.message).toBe(`${b.path}:1:13: confidence: expected at most 0.999, found 1.5`);
    const c = fail("period:\n  from: 2026-02-30\n");
    expect(c.message).toBe(`${c.path}:2:9: period.from: "2026-02-30" is not a valid date.`);
    const d = fail("period:\n  from: 2026-03-01\n  to: 2026-02-01\n");
    expect(d.message).toBe(`${d.path}:2:9: period.from (2026-03-01) is after period.to (2026-02-01).`);
    const e = fail("pseudonymise:\n  key_env: REPORT_KEY\n  key_file: key.txt\n");
    expect(e.message).toBe(`${e.path}:3:3: pseudonymise: give key_env or key_file, not both.`);
  });

  it("lists every problem of a file, one per line", () => {
    const a = fail("confidence: high\nseed: -1\n");
    expect(a.message.split("\n")).toEqual([
      `${a.path}:1:13: confidence: expected a number, found "high"`,
      `${a.path}:2:7: seed: expected at least 0, found -1`,
    ]);
  });

  it("text that is not YAML, or not a mapping", () => {
    const a = fail("title: [unclosed\n");
    expect(a.message).toMatch(new RegExp(`^${esc(a.path)}:2:1: not valid YAML: `));
    const b = fail("title: a: b\n");
    expect(b.message).toMatch(new RegExp(`^${esc(b.path)}:1:8: not valid YAML: `));
    const c = fail("just some words\n");
    expect(c.message).toBe(
      `${c.path}:1:1: the settings: expected a mapping of keys, found "just some words"`,
    );
    const d = fail("- title\n- seed\n");
    expect(d.message).toBe(`${d.path}:1:1: the settings: expected a mapping of keys, found a list`);
    const e = fail("title: x\nseed: *nowhere\n");
    expect(e.message).toMatch(new RegExp(`^${esc(e.path)}:2:7: not valid YAML: Unresolved alias`));
  });

  it("duplicate keys: location of the second one and its key path", () => {
    const a = fail("title: a\ntitle: b\n");
    expect(a.message).toBe(
      `${a.path}:2:1: not valid YAML: the key "title" appears more than once; keep one.`,
    );
    const b = fail("evidence:\n  min_days: 2\n  min_days: 3\n");
    expect(b.message).toBe(
      `${b.path}:3:3: not valid YAML: the key "evidence.min_days" appears more than once; keep one.`,
    );
  });

  it("several YAML documents in one file: where the second starts, and what to do", () => {
    const a = fail("title: a\n---\ntitle: b\n");
    expect(a.message).toBe(`${a.path}:2:1: the file holds several YAML documents (---); keep one.`);
    // A document start marker before the first document is not a second document.
    expect(loadSettings(yamlFile("---\ntitle: a\n")).title).toBe("a");
  });

  it("text that must have a form: the form in words, never a regular expression", () => {
    const a = fail("build_time: yesterday\n");
    expect(a.message).toBe(
      `${a.path}:1:13: build_time: expected a date-time with offset such as 2026-09-01T08:00:00Z, found "yesterday"`,
    );
    // No offset: the same message (a build time without one is ambiguous).
    const b = fail("build_time: 2026-11-30T12:00:00\n");
    expect(b.message).toBe(
      `${b.path}:1:13: build_time: expected a date-time with offset such as 2026-09-01T08:00:00Z, found "2026-11-30T12:00:00"`,
    );
    // The right form but no such day (Date.parse alone would read February 30 as March 2).
    const c = fail("build_time: 2026-02-30T08:00:00Z\n");
    expect(c.message).toBe(
      `${c.path}:1:13: build_time: "2026-02-30T08:00:00Z" is not a real date and time; expected a date-time with offset such as 2026-09-01T08:00:00Z.`,
    );
    const d = fail("period:\n  to: 30/11/2026\n");
    expect(d.message).toBe(
      `${d.path}:2:7: period.to: expected a date such as 2026-09-01, found "30/11/2026"`,
    );
    const e = fail("pseudonymise:\n  key_env: REPORT-KEY\n");
    expect(e.message).toBe(
      `${e.path}:2:12: pseudonymise.key_env: expected the name of an environment variable (letters, digits and _, not starting with a digit), found "REPORT-KEY"`,
    );
    for (const m of [a, b, d, e].map((x) => x.message)) expect(m).not.toMatch(/\\d|\^|\$/);
  });

  it("every text pattern in the schemas has plain words in the messages", () => {
    const patterns = new Set<string>();
    const collect = (node: unknown): void => {
      if (node === null || typeof node !== "object") return;
      for (const [key, value] of Object.entries(node)) {
        if (key === "pattern" && typeof value === "string") patterns.add(value);
        else collect(value);
      }
    };
    for (const name of ["settings.schema.json", "card.schema.json"])
      collect(JSON.parse(readFileSync(new URL(`../../schemas/${name}`, import.meta.url), "utf8")));
    expect(patterns.size).toBeGreaterThanOrEqual(4);
    for (const pattern of patterns) expect(Object.keys(PATTERN_TEXT), pattern).toContain(pattern);
  });

  it("no file, an empty file or only comments: the defaults", () => {
    expect(loadSettings(undefined)).toEqual(DEFAULT_SETTINGS);
    expect(loadSettings(yamlFile(""))).toEqual(DEFAULT_SETTINGS);
    expect(loadSettings(yamlFile("# nothing set\n"))).toEqual(DEFAULT_SETTINGS);
  });
});

describe("settings defaults and their reasons", () => {
  it("every leaf of DEFAULT_SETTINGS has a reason, and every reason a setting", () => {
    expect(sorted(valueLeaves(DEFAULT_SETTINGS).keys())).toEqual(sorted(Object.keys(DEFAULT_REASONS)));
    for (const [key, reason] of Object.entries(DEFAULT_REASONS))
      expect(reason.length, key).toBeGreaterThan(20);
  });

  it("every property of settings.schema.json has a reason, and every reason a property", () => {
    const leaves = [...schemaLeaves(schema).keys()].map(camel);
    expect(leaves.length).toBeGreaterThan(10);
    expect(sorted(leaves)).toEqual(sorted(Object.keys(DEFAULT_REASONS)));
  });

  it("the settings as used (manifest) have the schema's keys, and schema defaults equal DEFAULT_SETTINGS", () => {
    const used = valueLeaves(settingsAsUsed(DEFAULT_SETTINGS));
    const leaves = schemaLeaves(schema);
    expect(sorted(used.keys())).toEqual(sorted(leaves.keys()));
    const withDefault = [...leaves].filter(([, node]) => "default" in node);
    for (const [path, node] of withDefault) expect(node.default, path).toEqual(used.get(path));
  });

  it("the settings as used, empty values (null) included, validate and load back to DEFAULT_SETTINGS", () => {
    const asUsed = settingsAsUsed(DEFAULT_SETTINGS);
    // These five are empty by default and written as null in the manifest.
    const nulls = [...valueLeaves(asUsed)].filter(([, v]) => v === null).map(([k]) => k);
    expect(sorted(nulls)).toEqual(
      sorted(["period.from", "period.to", "pseudonymise.key_env", "pseudonymise.key_file", "build_time"]),
    );
    // Against the schema alone (Ajv 8, the validator the tool uses), then through the loader, as
    // YAML and as the manifest's JSON (which YAML 1.2 reads as well).
    const validate = new Ajv({ allowUnionTypes: true }).compile(schema);
    expect(validate(asUsed), JSON.stringify(validate.errors)).toBe(true);
    const yamlText = stringify(asUsed);
    expect(yamlText).toContain("build_time: null");
    expect(loadSettings(yamlFile(yamlText))).toEqual(DEFAULT_SETTINGS);
    expect(loadSettings(yamlFile(JSON.stringify(asUsed, null, 2)))).toEqual(DEFAULT_SETTINGS);
  });

  it("a file that writes out every default value is valid and gives DEFAULT_SETTINGS", () => {
    // Empty defaults (null) mean "not set" and are left out; everything else must pass the schema.
    const asUsed = settingsAsUsed(DEFAULT_SETTINGS);
    const text = stringify(asUsed, (_, v: unknown) => (v === null ? undefined : v));
    expect(text).toContain("suppression_size: 10");
    expect(loadSettings(yamlFile(text))).toEqual(DEFAULT_SETTINGS);
  });
});

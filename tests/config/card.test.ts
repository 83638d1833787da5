/**
 * loadCard: every problem names file:line:col, the key path, what was expected and the value found.
 * Line and column numbers are counted by hand in the YAML text below (1-based, as editors show them).
 */
import { describe, expect, it } from "vitest";
import { loadCard } from "../../src/config/card.js";
import { loadFailure, yamlFile } from "./load-failure.js";

/** A valid card; the comments give line numbers, and lines added by `plus` start at 11. */
const BASE = [
  "window_seconds: 20", // 1
  "constructs:", // 2
  "  bored:", // 3
  "    label: Boredom", // 4
  "    kind: affect", // 5
  "    higher_is: concern", // 6
  "    auc: 0.71", // 7
  "    auc_positives: 140", // 8
  "    auc_negatives: 1100", // 9
  "    threshold: 0.5", // 10
].join("\n");

const fail = (text: string) => loadFailure(loadCard, text);
const esc = (text: string) => text.replace(/[.*+?^${}()|[\]\\]/g, "\\$&");
/** BASE with one line replaced (or removed when `by` is null), or with lines added at the end. */
const edit = (line: string, by: string | null) =>
  `${BASE.split("\n")
    .filter((l) => by !== null || l !== line)
    .map((l) => (l === line && by !== null ? by : l))
    .join("\n")}\n`;
const plus = (...lines: string[]) => `${BASE}\n${lines.join("\n")}\n`;

describe("loadCard", () => {
  it("fills the card's defaults: floor .60, two-minute sustained run, no calibration", () => {
    const card = loadCard(yamlFile(`${BASE}\n`));
    expect(card.aucFloor).toBe(0.6);
    expect(card.validatedSettings).toEqual([]);
    // ceil(120 s / 20 s) = 6 windows
    expect(card.constructs.map((c) => [c.key, c.sustainedMinWindows, c.calibration.kind])).toEqual([
      ["bored", 6, "none"],
    ]);
  });

  it("wrong type: location of the value, key path, expected type and value found", () => {
    const a = fail(edit("    auc: 0.71", "    auc: high"));
    expect(a.message).toBe(`${a.path}:7:10: constructs.bored.auc: expected a number, found "high"`);
    const b = fail(edit("    auc_positives: 140", "    auc_positives: 140.5"));
    expect(b.message).toBe(
      `${b.path}:8:20: constructs.bored.auc_positives: expected a whole number, found 140.5`,
    );
    const c = fail(edit("    kind: affect", "    kind: mood"));
    expect(c.message).toBe(
      `${c.path}:5:11: constructs.bored.kind: expected one of affect, behaviour, found "mood"`,
    );
    const d = fail(edit("window_seconds: 20", "window_seconds: [20]"));
    expect(d.message).toBe(`${d.path}:1:17: window_seconds: expected a number, found a list`);
  });

  it("unknown keys: location of the key, its path and the keys allowed there", () => {
    const a = fail(plus("windows_seconds: 20"));
    expect(a.message).toBe(
      `${a.path}:11:1: unknown key "windows_seconds"; allowed here: window_seconds, validated_settings, auc_floor, constructs. Check the spelling.`,
    );
    const b = fail(plus("    treshold: 0.4"));
    expect(b.message).toMatch(
      new RegExp(
        `^${esc(b.path)}:11:5: unknown key "constructs\\.bored\\.treshold"; allowed here: .*threshold`,
      ),
    );
    const c = fail(edit("  bored:", "  Bored:"));
    expect(c.message).toMatch(new RegExp(`^${esc(c.path)}:3:3: constructs: construct key "Bored" must be`));
  });

  it("out-of-range values", () => {
    const a = fail(edit("    auc: 0.71", "    auc: 1.2"));
    expect(a.message).toBe(`${a.path}:7:10: constructs.bored.auc: expected at most 1, found 1.2`);
    const b = fail(edit("    threshold: 0.5", "    threshold: 0"));
    expect(b.message).toBe(`${b.path}:10:16: constructs.bored.threshold: expected more than 0, found 0`);
    const c = fail(plus("    sustained_min_windows: 1"));
    expect(c.message).toBe(
      `${c.path}:11:28: constructs.bored.sustained_min_windows: expected at least 2, found 1`,
    );
    const d = fail("window_seconds: 20\nconstructs: {}\n");
    expect(d.message).toBe(`${d.path}:2:13: constructs: expected at least one entry, found a mapping`);
  });

  it("missing required keys: where the mapping that lacks them starts, the key path and what it needs", () => {
    const add = "Add it to the mapping that starts here.";
    const a = fail(edit("    threshold: 0.5", null));
    expect(a.message).toBe(
      `${a.path}:4:5: missing required key "constructs.bored.threshold": expected a number. ${add}`,
    );
    const b = fail(edit("window_seconds: 20", null));
    expect(b.message).toBe(`${b.path}:1:1: missing required key "window_seconds": expected a number. ${add}`);
    // auc is a reference to the schema's shared "probability" definition; its type is followed there.
    const c = fail(edit("    auc: 0.71", null));
    expect(c.message).toBe(
      `${c.path}:4:5: missing required key "constructs.bored.auc": expected a number. ${add}`,
    );
    const d = fail(edit("    kind: affect", null));
    expect(d.message).toBe(
      `${d.path}:4:5: missing required key "constructs.bored.kind": expected one of affect, behaviour. ${add}`,
    );
    const e = fail(edit("    auc_positives: 140", null));
    expect(e.message).toBe(
      `${e.path}:4:5: missing required key "constructs.bored.auc_positives": expected a whole number. ${add}`,
    );
    const f = fail("window_seconds: 20\n");
    expect(f.message).toBe(
      `${f.path}:1:1: missing required key "constructs": expected a mapping of keys. ${add}`,
    );
  });

  it("calibration: the three accepted forms, and the rules between bins", () => {
    const a = fail(plus("    calibration: linear"));
    expect(a.message).toBe(
      `${a.path}:11:18: constructs.bored.calibration: expected none, {platt: {a: number, b: number}} or {bins: [[upper_p, rate], ...]}, found "linear".`,
    );
    const b = fail(plus("    calibration:", "      platt: {a: 1}"));
    expect(b.message).toMatch(
      new RegExp(`^${esc(b.path)}:12:7: constructs\\.bored\\.calibration: expected none`),
    );
    const c = fail(plus("    calibration:", "      bins: [[0.5, 0.2], [0.4, 0.3], [1, 0.9]]"));
    expect(c.message).toBe(
      `${c.path}:12:7: constructs.bored.calibration.bins: the upper bounds must increase from one bin to the next.`,
    );
    const d = fail(plus("    calibration:", "      bins: [[0.5, 0.2], [0.9, 0.3]]"));
    expect(d.message).toBe(
      `${d.path}:12:7: constructs.bored.calibration.bins: the last bin's upper bound must be 1.`,
    );
    const ok = loadCard(yamlFile(plus("    calibration:", "      platt: {a: 0.9, b: -0.2}")));
    expect(ok.constructs[0]!.calibration).toEqual({ kind: "platt", a: 0.9, b: -0.2 });
  });

  it("a validation figure given without its partner", () => {
    const a = fail(plus("    sensitivity: 0.6"));
    expect(a.message).toBe(
      `${a.path}:11:5: constructs.bored: sensitivity is given but specificity is not; give both or neither.`,
    );
  });

  it("text that is not YAML, duplicate keys, an empty file", () => {
    const a = fail(plus("  confused: [unclosed"));
    expect(a.message).toMatch(new RegExp(`^${esc(a.path)}:12:1: not valid YAML: `));
    const b = fail(plus("    auc: 0.8"));
    expect(b.message).toBe(
      `${b.path}:11:5: not valid YAML: the key "constructs.bored.auc" appears more than once; keep one.`,
    );
    const c = fail(plus("  bored:", "    label: Again"));
    expect(c.message).toBe(
      `${c.path}:11:3: not valid YAML: the key "constructs.bored" appears more than once; keep one.`,
    );
    // A second document after "---" (line 11): the whole message, not the parser's advice to programmers.
    const g = fail(`${BASE}\n---\n${BASE}\n`);
    expect(g.message).toBe(`${g.path}:11:1: the file holds several YAML documents (---); keep one.`);
    const d = fail("");
    expect(d.message).toBe(`${d.path}: the detector card is empty.`);
    const e = fail("a card\n");
    expect(e.message).toBe(`${e.path}:1:1: the card: expected a mapping of keys, found "a card"`);
  });
});

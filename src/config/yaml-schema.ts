/**
 * Reads a YAML file and validates it against a JSON Schema shipped in `schemas/`. Every problem is
 * reported with file:line:column, the key path, what was expected and the value found.
 */
import { isUtf8 } from "node:buffer";
import { readFileSync } from "node:fs";
import { Ajv, type ErrorObject, type ValidateFunction } from "ajv";
import { isMap, isPair, isScalar, isSeq, LineCounter, type Node, parseDocument, visit } from "yaml";
import { SettingsError } from "../errors.js";
import { expectedText, msg } from "../messages.js";

// verbose: errors carry their parent schema, which names the keys allowed beside an unknown one.
const ajv = new Ajv({ allErrors: true, strict: true, allowUnionTypes: true, verbose: true });
const compiled = new Map<string, { validate: ValidateFunction; schema: SchemaNode }>();

/** The parts of a JSON Schema node that messages read. */
interface SchemaNode {
  readonly $ref?: string;
  readonly type?: string | readonly string[];
  readonly enum?: readonly unknown[];
  readonly const?: unknown;
  readonly properties?: Readonly<Record<string, SchemaNode>>;
}

function validatorFor(schemaName: string): { validate: ValidateFunction; schema: SchemaNode } {
  let entry = compiled.get(schemaName);
  if (!entry) {
    const url = new URL(`../../schemas/${schemaName}`, import.meta.url);
    const schema = JSON.parse(readFileSync(url, "utf8")) as SchemaNode;
    entry = { validate: ajv.compile(schema), schema };
    compiled.set(schemaName, entry);
  }
  return entry;
}

/** Follows a local reference ("#/definitions/probability") to the node it names. */
function resolveRef(node: SchemaNode, root: SchemaNode): SchemaNode {
  let n = node;
  for (let hops = 0; n.$ref?.startsWith("#/") && hops < 10; hops++) {
    let target: unknown = root;
    for (const part of n.$ref.slice(2).split("/")) target = (target as Record<string, unknown>)[part];
    n = target as SchemaNode;
  }
  return n;
}

/** What a schema node asks for, in words ("a number", "one of affect, behaviour"). */
function describeExpected(node: SchemaNode | undefined, root: SchemaNode): string {
  if (node === undefined) return "a value";
  const n = resolveRef(node, root);
  if (n.enum) return `one of ${n.enum.map(String).join(", ")}`;
  if ("const" in n) return String(n.const);
  if (n.type !== undefined) return expectedText(typeof n.type === "string" ? [n.type] : n.type);
  return "a value";
}

/** Where a key path sits in the YAML text, for messages. */
export type Locator = (path: readonly (string | number)[], keyItself?: boolean) => string;

export interface LoadedYaml {
  readonly data: unknown;
  readonly locate: Locator;
}

export function readTextFile(path: string, what: string): string {
  let bytes: Buffer;
  try {
    bytes = readFileSync(path);
  } catch (error) {
    throw new SettingsError(msg.cannotRead(path, what, error));
  }
  // A binary or wrongly encoded file would be decoded with replacement characters and end in a
  // schema message quoting that junk; say plainly that it is not UTF-8 text, and where it stops being.
  if (!isUtf8(bytes)) {
    const text = bytes.toString("utf8");
    const bad = text.indexOf("\uFFFD");
    const before = text.slice(0, Math.max(0, bad)).split("\n");
    throw new SettingsError(msg.notUtf8Text(path, what, before.length, [...before.at(-1)!].length + 1));
  }
  return bytes.toString("utf8");
}

export function loadYaml(path: string, what: string): LoadedYaml {
  const text = readTextFile(path, what);
  const lineCounter = new LineCounter();
  const doc = parseDocument(text, { lineCounter, uniqueKeys: true, prettyErrors: false });
  if (doc.errors.length > 0) {
    const lines = doc.errors.slice(0, 5).map((e) => {
      // Without prettyErrors the parser gives offsets only; the line counter turns them into line:col.
      const { line, col } = lineCounter.linePos(e.pos[0]);
      // The parser's own wording for these two speaks to programmers; say what to do with the file.
      if (e.code === "MULTIPLE_DOCS") return msg.severalDocuments(path, line, col);
      if (e.code === "DUPLICATE_KEY") {
        const keyPath = keyPathAt(doc.contents, e.pos[0]);
        return msg.duplicateKey(path, line, col, keyPath === null ? null : keyPath.join("."));
      }
      return msg.yamlSyntax(path, line, col, e.message.split("\n")[0] ?? e.message);
    });
    throw new SettingsError(lines.join("\n"));
  }
  let data: unknown;
  try {
    data = doc.toJS({ maxAliasCount: 100 });
  } catch (error) {
    // An alias without its anchor, or aliases expanding beyond the limit: point at the first
    // alias that does not resolve, else at the first alias.
    let first: number | undefined;
    let broken: number | undefined;
    visit(doc, {
      Alias(_, node) {
        const at = node.range?.[0] ?? 0;
        first ??= at;
        if (node.resolve(doc) !== undefined) return undefined;
        broken = at;
        return visit.BREAK;
      },
    });
    const { line, col } = lineCounter.linePos(broken ?? first ?? 0);
    throw new SettingsError(msg.yamlSyntax(path, line, col, (error as Error).message));
  }
  const locate: Locator = (keyPath, keyItself = false) => {
    let node: unknown = doc.contents;
    let keyNode: Node | undefined;
    for (const key of keyPath) {
      if (!isMap(node) && !(node && typeof node === "object" && "items" in node)) break;
      const items = (node as { items: unknown[] }).items;
      const next = isMap(node)
        ? items.find((p) => isPair(p) && isScalar(p.key) && String(p.key.value) === String(key))
        : items[Number(key)];
      if (next === undefined) break;
      if (isPair(next)) {
        keyNode = next.key as Node;
        node = next.value;
      } else {
        keyNode = undefined;
        node = next;
      }
    }
    const target = keyItself && keyNode ? keyNode : ((node as Node | null | undefined) ?? keyNode);
    const offset = target?.range?.[0] ?? 0;
    const { line, col } = lineCounter.linePos(offset);
    return `${path}:${line}:${col}`;
  };
  return { data, locate };
}

/** The key path of the mapping key that starts at `offset`, or null. */
function keyPathAt(node: unknown, offset: number, prefix: readonly string[] = []): string[] | null {
  if (isMap(node)) {
    for (const pair of node.items) {
      const key = isScalar(pair.key) ? String(pair.key.value) : String(pair.key);
      if (isScalar(pair.key) && pair.key.range?.[0] === offset) return [...prefix, key];
      const inner = keyPathAt(pair.value, offset, [...prefix, key]);
      if (inner) return inner;
    }
  } else if (isSeq(node)) {
    for (let i = 0; i < node.items.length; i++) {
      const inner = keyPathAt(node.items[i], offset, [...prefix, String(i)]);
      if (inner) return inner;
    }
  }
  return null;
}

function describeValue(value: unknown): string {
  if (value === undefined) return "nothing";
  if (value === null) return "an empty value";
  if (typeof value === "string")
    return JSON.stringify(value.length > 60 ? `${value.slice(0, 57)}...` : value);
  if (Array.isArray(value)) return "a list";
  if (typeof value === "object") return "a mapping";
  return String(value);
}

function valueAt(data: unknown, path: readonly string[]): unknown {
  let v: unknown = data;
  for (const key of path) {
    if (v === null || typeof v !== "object") return undefined;
    v = (v as Record<string, unknown>)[key];
  }
  return v;
}

function expectation(error: ErrorObject): string {
  const p = error.params as Record<string, unknown>;
  switch (error.keyword) {
    case "type":
      return `expected ${expectedText(String(p.type).split(","))}`;
    case "enum":
      return `expected one of ${(p.allowedValues as unknown[]).map(String).join(", ")}`;
    case "const":
      return `expected ${String(p.allowedValue)}`;
    case "minimum":
      return `expected at least ${String(p.limit)}`;
    case "maximum":
      return `expected at most ${String(p.limit)}`;
    case "exclusiveMinimum":
      return `expected more than ${String(p.limit)}`;
    case "exclusiveMaximum":
      return `expected less than ${String(p.limit)}`;
    case "minItems":
      return `expected at least ${String(p.limit)} item(s)`;
    case "maxItems":
      return `expected at most ${String(p.limit)} item(s)`;
    case "minLength":
      return "expected non-empty text";
    case "maxLength":
      return `expected at most ${String(p.limit)} characters`;
    case "pattern":
      return `expected ${msg.patternText(String(p.pattern))}`;
    case "uniqueItems":
      return "expected each item once";
    case "minProperties":
      return "expected at least one entry";
    default:
      return error.message ?? "invalid";
  }
}

/** Validates `data` with a schema from `schemas/`; throws one SettingsError listing every problem. */
export function validateWithSchema(loaded: LoadedYaml, schemaName: string, topKeyHint: string): void {
  const { validate, schema } = validatorFor(schemaName);
  if (validate(loaded.data)) return;
  const problems: string[] = [];
  const seen = new Set<string>();
  const errors = (validate.errors ?? []).filter(
    // Inside a oneOf the individual branch failures say little; keep the summary error only.
    (e) => !(e.schemaPath.includes("/oneOf/") && e.keyword !== "oneOf"),
  );
  for (const error of errors) {
    const path = error.instancePath
      .split("/")
      .slice(1)
      .map((s) => s.replace(/~1/g, "/").replace(/~0/g, "~"));
    const dotted = path.length > 0 ? path.join(".") : topKeyHint;
    const p = error.params as Record<string, unknown>;
    let text: string;
    let where: string;
    if (error.keyword === "additionalProperties") {
      const key = String(p.additionalProperty);
      const allowed = Object.keys(
        (error.parentSchema as { properties?: Record<string, unknown> }).properties ?? {},
      );
      where = loaded.locate([...path, key], true);
      text = msg.unknownKey(path.length > 0 ? `${dotted}.${key}` : key, allowed);
    } else if (error.keyword === "required") {
      const key = String(p.missingProperty);
      const parent = error.parentSchema as SchemaNode;
      where = loaded.locate(path);
      text = msg.missingKey(
        path.length > 0 ? `${dotted}.${key}` : key,
        describeExpected(parent.properties?.[key], schema),
      );
    } else if (error.keyword === "propertyNames") {
      const name = String(p.propertyName);
      where = loaded.locate([...path, name], true);
      text = msg.badKeyName(dotted, name);
    } else if (error.keyword === "oneOf") {
      where = loaded.locate(path);
      text = msg.badCalibration(dotted, describeValue(valueAt(loaded.data, path)));
    } else if (error.keyword === "pattern" && error.propertyName !== undefined) {
      continue; // reported by the propertyNames error
    } else {
      where = loaded.locate(path);
      text = `${dotted}: ${expectation(error)}, found ${describeValue(valueAt(loaded.data, path))}`;
    }
    const line = `${where}: ${text}`;
    if (!seen.has(line)) {
      seen.add(line);
      problems.push(line);
    }
  }
  throw new SettingsError(problems.join("\n"));
}

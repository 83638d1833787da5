import { parse, type Runtime } from "vega";
import { compile, type TopLevelSpec } from "vega-lite";
import { collectingLogger } from "./logger.js";

/**
 * Compiled chart runtimes, one per chart kind (and scale type). Compiling a vega-lite spec and
 * parsing the vega spec costs about 12 ms; a view built from a parsed runtime renders in under 3 ms,
 * so each kind is compiled once per process and its runtime reused for every chart of that kind.
 * What varies between charts (data, titles, domains, reference lines) reaches the view as data and
 * signals, never by recompiling.
 *
 * The cache is a memo of pure results: a spec is a function of the key alone.
 */
const runtimes = new Map<string, Runtime>();
let compiled = 0;

export function runtimeFor(key: string, buildSpec: () => TopLevelSpec): Runtime {
  const cached = runtimes.get(key);
  if (cached !== undefined) return cached;
  const warnings: string[] = [];
  const vegaSpec = compile(buildSpec(), { logger: collectingLogger(warnings) }).spec;
  if (warnings.length > 0)
    throw new Error(`chart spec "${key}" compiled with warnings: ${warnings.join("; ")}`);
  const runtime = parse(vegaSpec);
  compiled += 1;
  runtimes.set(key, runtime);
  return runtime;
}

/** How many specs this process has compiled (for tests that check the reuse). */
export function chartCompileCount(): number {
  return compiled;
}

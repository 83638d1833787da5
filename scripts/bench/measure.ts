/**
 * Runs a child process and measures its wall time (spawn to exit, seen from here) and its peak
 * resident memory: from /usr/bin/time -v ("Maximum resident set size") when present, else from a
 * preload that prints process.resourceUsage().maxRSS as the child exits. Both are the kernel's
 * high-water mark for the process (getrusage ru_maxrss).
 */
import { spawnSync } from "node:child_process";
import { existsSync } from "node:fs";
import { performance } from "node:perf_hooks";
import { fileURLToPath } from "node:url";

const TIME = "/usr/bin/time";
const PRELOAD = fileURLToPath(new URL("./max-rss.mjs", import.meta.url));
const RSS_LINE = /Maximum resident set size \(kbytes\): (\d+)/;
const PRELOAD_LINE = /^bench-max-rss-kb (\d+)$/m;
const USER_LINE = /User time \(seconds\): ([\d.]+)/;
const SYSTEM_LINE = /System time \(seconds\): ([\d.]+)/;
const PRELOAD_CPU = /^bench-cpu-ms ([\d.]+)$/m;

export const memorySource = existsSync(TIME)
  ? "/usr/bin/time -v (Maximum resident set size)"
  : "process.resourceUsage().maxRSS in the child";

export interface Measured {
  readonly ms: number;
  readonly maxRssKb: number;
  /** CPU time of the child (user + system), ms: less sensitive than wall time to other load on the machine. */
  readonly cpuMs: number;
  readonly stdout: string;
  readonly stderr: string;
}

/** Runs `node ...args`; throws when it fails. */
export function runNode(
  args: readonly string[],
  options: { cwd?: string; env?: NodeJS.ProcessEnv } = {},
): Measured {
  const useTime = existsSync(TIME);
  const command = useTime ? TIME : process.execPath;
  const argv = useTime ? ["-v", process.execPath, ...args] : ["--import", PRELOAD, ...args];
  const start = performance.now();
  const result = spawnSync(command, argv, {
    cwd: options.cwd,
    env: options.env ?? process.env,
    encoding: "utf8",
    maxBuffer: 256 * 1024 * 1024,
    stdio: ["ignore", "pipe", "pipe"],
  });
  const ms = performance.now() - start;
  if (result.error) throw result.error;
  const stderr = result.stderr ?? "";
  const rss = (useTime ? RSS_LINE : PRELOAD_LINE).exec(stderr);
  if (result.status !== 0) {
    throw new Error(`node ${args.join(" ")} exited with ${result.status}:\n${stderr.slice(-4000)}`);
  }
  if (!rss) throw new Error(`no peak memory reported by node ${args.join(" ")}`);
  const cpuMs = useTime
    ? 1000 *
      (Number(USER_LINE.exec(stderr)?.[1] ?? Number.NaN) +
        Number(SYSTEM_LINE.exec(stderr)?.[1] ?? Number.NaN))
    : Number(PRELOAD_CPU.exec(stderr)?.[1] ?? Number.NaN);
  const own = useTime ? stderr.slice(0, stderr.lastIndexOf("\tCommand being timed")) : stderr;
  return { ms, maxRssKb: Number(rss[1]), cpuMs, stdout: result.stdout ?? "", stderr: own };
}

export function median(values: readonly number[]): number {
  if (values.length === 0) return Number.NaN;
  const sorted = [...values].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 === 1 ? sorted[mid]! : (sorted[mid - 1]! + sorted[mid]!) / 2;
}

export interface Repeated {
  /** Median wall time, ms. */
  readonly ms: number;
  readonly runs: readonly number[];
  /** Median CPU time (user + system), ms. */
  readonly cpuMs: number;
  /** Largest peak resident memory over the runs, KB. */
  readonly maxRssKb: number;
  readonly last: Measured;
}

/** Runs `node ...args` `times` times (after `before`, when given, each time). */
export function repeat(times: number, args: () => readonly string[], before?: () => void): Repeated {
  const results: Measured[] = [];
  for (let i = 0; i < times; i++) {
    before?.();
    results.push(runNode(args()));
  }
  return {
    ms: median(results.map((r) => r.ms)),
    runs: results.map((r) => r.ms),
    cpuMs: median(results.map((r) => r.cpuMs)),
    maxRssKb: Math.max(...results.map((r) => r.maxRssKb)),
    last: results[results.length - 1]!,
  };
}

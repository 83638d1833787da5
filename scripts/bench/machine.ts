/** What the benchmark ran on: CPU, cores, memory, software versions, date. */
import { spawnSync } from "node:child_process";
import { readFileSync } from "node:fs";
import { availableParallelism, release, totalmem } from "node:os";
import { join } from "node:path";
import { ROOT } from "./dist.js";

export interface Machine {
  readonly cpu: string;
  readonly cores: number;
  readonly memoryGb: number;
  readonly kernel: string;
  readonly node: string;
  readonly duckdb: string;
  readonly chromium: string;
  readonly date: string;
}

function cpuModel(): string {
  try {
    const match = /^model name\s*:\s*(.+)$/m.exec(readFileSync("/proc/cpuinfo", "utf8"));
    return match?.[1]?.trim() ?? "unknown";
  } catch {
    return "unknown";
  }
}

function packageVersion(name: string): string {
  try {
    const pkg = JSON.parse(readFileSync(join(ROOT, "node_modules", name, "package.json"), "utf8"));
    return String(pkg.version);
  } catch {
    return "not installed";
  }
}

export function describeMachine(chromium: string | null): Machine {
  const browser = chromium
    ? (spawnSync(chromium, ["--version"], { encoding: "utf8" }).stdout ?? "").trim() || chromium
    : "none found";
  return {
    cpu: cpuModel(),
    cores: availableParallelism(),
    memoryGb: totalmem() / 1e9,
    kernel: `Linux ${release()}`,
    node: process.version,
    duckdb: `@duckdb/node-api ${packageVersion("@duckdb/node-api")}`,
    chromium: `${browser} (puppeteer ${packageVersion("puppeteer")})`,
    date: new Date().toISOString(),
  };
}

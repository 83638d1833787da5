/**
 * Preload for benchmark children when /usr/bin/time is missing: prints the process's peak resident
 * memory (KB) and CPU time (ms) on stderr as it exits. Usage: node --import ./scripts/bench/max-rss.mjs ...
 */
process.on("exit", () => {
  const usage = process.resourceUsage();
  process.stderr.write(`bench-max-rss-kb ${usage.maxRSS}\n`);
  process.stderr.write(`bench-cpu-ms ${(usage.userCPUTime + usage.systemCPUTime) / 1000}\n`);
});

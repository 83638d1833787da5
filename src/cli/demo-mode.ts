import type { DemoMode } from "../demo/simulate.js";

export function demoModeFrom(nullMode: boolean): DemoMode {
  return nullMode ? "null" : "planted";
}

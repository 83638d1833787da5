import { createRequire } from "node:module";

/**
 * The independent reference library the demo's tests check against: jstat 1.9.6 (a dev
 * dependency), typed here for the few functions used, so that no global module declaration is needed.
 */
interface JStat {
  normal: {
    inv(p: number, mean: number, sd: number): number;
    cdf(x: number, mean: number, sd: number): number;
    pdf(x: number, mean: number, sd: number): number;
  };
  centralF: { inv(p: number, df1: number, df2: number): number };
}

const require = createRequire(import.meta.url);
export const jStat = (require("jstat") as { jStat: JStat }).jStat;

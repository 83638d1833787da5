// Minimal types for the parts of jstat 1.9.6 used as an independent reference in these tests.
declare module "jstat" {
  interface JStat {
    normal: {
      inv(p: number, mean: number, sd: number): number;
      cdf(x: number, mean: number, sd: number): number;
    };
    chisquare: { inv(p: number, dof: number): number };
    studentt: { inv(p: number, dof: number): number };
    beta: { inv(p: number, a: number, b: number): number };
    ibeta(x: number, a: number, b: number): number;
    gammaln(x: number): number;
    lowRegGamma(a: number, x: number): number;
    gammapinv(p: number, a: number): number;
    quantiles(values: number[], probabilities: number[], alphap?: number, betap?: number): number[];
  }
  const jStat: JStat;
  export default jStat;
}

// jStat 1.9.6 ships no types and no named ESM export; only the members stats/distributions.ts uses are declared.
declare module "jstat" {
  interface JStatContinuousInverse {
    inv(p: number, ...parameters: number[]): number;
    cdf(x: number, ...parameters: number[]): number;
    pdf(x: number, ...parameters: number[]): number;
  }
  interface JStatStatic {
    studentt: JStatContinuousInverse;
    centralF: JStatContinuousInverse;
    chisquare: JStatContinuousInverse;
    normal: JStatContinuousInverse;
    gammaln(x: number): number;
  }
  const jstat: JStatStatic;
  export default jstat;
}

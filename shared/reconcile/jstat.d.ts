/**
 * Minimal typings for the parts of jstat (1.9.x, ships no types) that the reconciliation uses.
 * jstat's CommonJS export is the jStat function object, which also carries itself as `.jStat`.
 */
declare module 'jstat' {
  interface JStatDistribution {
    /** cumulative distribution function */
    cdf(x: number, ...params: number[]): number;
    /** quantile (inverse of the cdf) */
    inv(p: number, ...params: number[]): number;
  }
  export const jStat: {
    chisquare: {
      cdf(x: number, dof: number): number;
      inv(p: number, dof: number): number;
      pdf(x: number, dof: number): number;
    };
    normal: {
      cdf(x: number, mean: number, sd: number): number;
      inv(p: number, mean: number, sd: number): number;
      pdf(x: number, mean: number, sd: number): number;
    };
    studentt: JStatDistribution;
  };
}

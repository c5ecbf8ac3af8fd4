// Minimal typings for the parts of jstat 1.9.6 that lib/stats uses (the package ships none).
declare module "jstat" {
  interface StudentTDistribution {
    /** Lower-tail probability P(T <= x) for `dof` degrees of freedom. */
    cdf(x: number, dof: number): number;
    /** Quantile: the x with P(T <= x) = p. */
    inv(p: number, dof: number): number;
  }

  interface NormalDistribution {
    /** Lower-tail probability P(X <= x) for X ~ N(mean, std²). */
    cdf(x: number, mean: number, std: number): number;
    /** Quantile: the x with P(X <= x) = p. */
    inv(p: number, mean: number, std: number): number;
  }

  interface JStatStatic {
    readonly studentt: StudentTDistribution;
    readonly normal: NormalDistribution;
  }

  const jStat: JStatStatic;
  export default jStat;
}

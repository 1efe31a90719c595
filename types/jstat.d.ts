// Minimal typings for the parts of jstat that Leadline uses (jstat ships no types).
declare module 'jstat' {
  interface ContinuousDist {
    cdf(x: number, ...params: number[]): number;
    inv(p: number, ...params: number[]): number;
    pdf(x: number, ...params: number[]): number;
  }
  export const jStat: {
    studentt: ContinuousDist;
    normal: ContinuousDist;
    chisquare: ContinuousDist;
    centralF: ContinuousDist;
    /** Noncentral t: cdf(x, dof, ncp) (used by a test as the reference for the benchmark's power). */
    noncentralt: Pick<ContinuousDist, 'cdf'>;
    ibeta(x: number, a: number, b: number): number;
    gammap(a: number, x: number): number;
    gammaln(x: number): number;
  };
  const _default: { jStat: typeof jStat };
  export default _default;
}

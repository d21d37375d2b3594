// jstat 1.9.6 ships no type declarations; these cover the special functions the statistics core calls.
declare module 'jstat' {
  interface JStatStatic {
    /** Regularized incomplete beta function I_x(a, b). */
    ibeta(x: number, a: number, b: number): number;
    /** Inverse of I_x(a, b) in x. */
    ibetainv(p: number, a: number, b: number): number;
    studentt: { cdf(x: number, dof: number): number; inv(p: number, dof: number): number };
    centralF: { cdf(x: number, df1: number, df2: number): number; inv(p: number, df1: number, df2: number): number };
    chisquare: { cdf(x: number, dof: number): number; inv(p: number, dof: number): number };
    normal: { cdf(x: number, mean: number, sd: number): number; inv(p: number, mean: number, sd: number): number };
  }
  const jStat: JStatStatic;
  export default jStat;
}

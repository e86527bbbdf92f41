// Types for the parts of the untyped jstat package that the engine uses.

declare module "jstat" {
  interface JStat {
    studentt: {
      inv(p: number, dof: number): number;
      cdf(x: number, dof: number): number;
    };
    centralF: {
      cdf(x: number, df1: number, df2: number): number;
      inv(p: number, df1: number, df2: number): number;
    };
    normal: {
      inv(p: number, mean: number, sd: number): number;
      cdf(x: number, mean: number, sd: number): number;
    };
  }
  const jStat: JStat;
  export default jStat;
}

// ml-regression ships no types; only its multivariate linear regression is used, by a test.
declare module "ml-regression" {
  export class MultivariateLinearRegression {
    constructor(x: number[][], y: number[][], options?: { intercept?: boolean; statistics?: boolean });
    weights: number[][];
    stdErrors: number[];
  }
}

// Types for the parts of untyped packages the engine and its tests use.

declare module "jstat" {
  interface JStat {
    studentt: {
      inv(p: number, dof: number): number;
      cdf(x: number, dof: number): number;
    };
    normal: {
      inv(p: number, mean: number, sd: number): number;
      cdf(x: number, mean: number, sd: number): number;
    };
  }
  const jStat: JStat;
  export default jStat;
}

declare module "odex" {
  export class Solver {
    constructor(n: number);
    absoluteTolerance: number | number[];
    relativeTolerance: number | number[];
    maxSteps: number;
    denseOutput: boolean;
    solve(
      f: (x: number, y: number[]) => number[],
      x0: number,
      y0: number[],
      xEnd: number,
      out?: (n: number, xOld: number, x: number, y: number[]) => boolean | void,
    ): { y: number[]; outcome: number; nStep: number; xEnd: number };
  }
}

// Hand-written declaration for odex 2.0.4, which ships its .ts source and no .d.ts.
// Only type-checkers see this file (tsconfig.check.json, tsconfig.engine.json map `odex` here);
// at run time the package's own src/odex.js is loaded.
declare module 'odex' {
  export type Derivative = (x: number, y: number[]) => number[];
  export type OutputFunction = (
    nr: number,
    xold: number,
    x: number,
    y: number[],
    dense?: (c: number, x: number) => number
  ) => boolean | void;
  export enum Outcome {
    Converged = 0,
    MaxStepsExceeded = 1,
    EarlyReturn = 2
  }
  export class Solver {
    constructor(n: number);
    n: number;
    maxSteps: number;
    initialStepSize: number;
    maxStepSize: number;
    denseOutput: boolean;
    denseComponents: number[] | undefined;
    relativeTolerance: number | number[];
    absoluteTolerance: number | number[];
    solve(
      f: Derivative,
      x: number,
      y0: number[],
      xEnd: number,
      solOut?: OutputFunction
    ): { y: number[]; outcome: Outcome; nStep: number; xEnd: number; nAccept: number; nReject: number; nEval: number };
  }
}

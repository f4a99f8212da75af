// Types for the parts of package odex 2.0.4 that flow.ts uses (see odex-solver.js for why).
export declare enum Outcome { Converged = 0, MaxStepsExceeded = 1, EarlyReturn = 2 }
export type Derivative = (x: number, y: number[]) => number[];
export type OutputFunction = (
  nr: number, xOld: number, x: number, y: number[], dense?: (c: number, x: number) => number,
) => boolean | void;
export declare class Solver {
  constructor(n: number);
  n: number;
  maxSteps: number;
  initialStepSize: number;
  maxStepSize: number;
  denseOutput: boolean;
  relativeTolerance: number | number[];
  absoluteTolerance: number | number[];
  solve(f: Derivative, x: number, y0: number[], xEnd: number, solOut?: OutputFunction): {
    y: number[]; outcome: Outcome; nStep: number; xEnd: number; nAccept: number; nReject: number; nEval: number;
  };
}

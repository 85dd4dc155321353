// Minimal declarations for the parts of odex 2.0.4 that plenum uses (the package ships TS
// sources that do not compile under strict settings; see DEVELOPERS.md).
export type Derivative = (x: number, y: number[]) => number[];
export type OutputFunction = (
  nr: number,
  xold: number,
  x: number,
  y: number[],
  dense?: (c: number, x: number) => number,
) => boolean | void;
export declare enum Outcome { Converged = 0, MaxStepsExceeded = 1, EarlyReturn = 2 }
export declare class Solver {
  constructor(n: number);
  n: number;
  maxSteps: number;
  initialStepSize: number;
  maxStepSize: number;
  denseOutput: boolean;
  /** IWORK(4): how often the stability check runs in a line of the extrapolation table (default 1; 0 switches it off). */
  stabilityCheckCount: number;
  denseComponents: number[] | undefined;
  relativeTolerance: number | number[];
  absoluteTolerance: number | number[];
  solve(f: Derivative, x: number, y0: number[], xEnd: number, solOut?: OutputFunction): {
    y: number[]; outcome: Outcome; nStep: number; xEnd: number; nAccept: number; nReject: number; nEval: number;
  };
}

// fmin 0.0.2 ships no types; only what Parley's tests and bench use.
declare module 'fmin' {
  interface NelderMeadParameters {
    maxIterations?: number;
    nonZeroDelta?: number;
    zeroDelta?: number;
    minErrorDelta?: number;
    minTolerance?: number;
  }
  export function nelderMead(f: (x: number[]) => number, x0: number[], parameters?: NelderMeadParameters): { fx: number; x: number[] };
  const fmin: { nelderMead: typeof nelderMead };
  export default fmin;
}

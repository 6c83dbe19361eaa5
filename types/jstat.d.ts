// jstat 1.9.6 ships no types; only what Parley's tests use.
declare module 'jstat' {
  const jstat: { jStat: { chisquare: { cdf(x: number, df: number): number } } };
  export default jstat;
}

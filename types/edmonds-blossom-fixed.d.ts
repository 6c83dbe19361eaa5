// edmonds-blossom-fixed 1.0.1 ships no types. A port of Van Rantwijk's mwmatching.py: edges as
// [u, v, weight]; returns mate[v] (−1 when unmatched); maxCardinality first maximises the size.
declare module 'edmonds-blossom-fixed' {
  function maxWeightMatching(edges: [number, number, number][], maxCardinality?: boolean): number[];
  export default maxWeightMatching;
}

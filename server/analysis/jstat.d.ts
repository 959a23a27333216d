// Only the part of jstat the statistics engine uses; the package ships no types.
declare module 'jstat' {
  const jstat: {
    jStat: {
      tukey: {
        /** P(Q ≤ q) for the studentized range of nmeans means with df degrees of freedom. */
        cdf(q: number, nmeans: number, df: number): number
      }
    }
  }
  export default jstat
}

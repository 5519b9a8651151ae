/** The slice of jstat 1.9.6 (npm, no bundled types) that the numeric core uses. */
declare module 'jstat' {
  interface JStatDistributionF {
    inv(p: number, df1: number, df2: number): number;
    cdf(x: number, df1: number, df2: number): number;
  }
  interface JStatStatic {
    centralF: JStatDistributionF;
    ibetainv(p: number, a: number, b: number): number;
    ibeta(x: number, a: number, b: number): number;
  }
  const jstat: JStatStatic & { jStat: JStatStatic };
  export default jstat;
}

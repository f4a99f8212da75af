declare module 'newton-raphson-method' {
  interface NewtonRaphsonOptions {
    tolerance?: number;
    epsilon?: number;
    maxIterations?: number;
    h?: number;
    verbose?: boolean;
  }
  /** Returns the root, or false when the iteration failed. */
  function newtonRaphson(
    f: (x: number) => number,
    fp: (x: number) => number,
    x0: number,
    options?: NewtonRaphsonOptions,
  ): number | false;
  export default newtonRaphson;
}

// The few parts of autocannon (no bundled types) the procedures benchmark uses.
declare module "autocannon" {
  type Histogram = { mean: number; p50: number; p97_5: number; p99: number; average: number; total: number };
  namespace autocannon {
    type Result = { latency: Histogram; requests: Histogram; errors: number; timeouts: number; non2xx: number };
    type Options = {
      url: string;
      connections?: number;
      duration?: number;
      amount?: number;
      headers?: Record<string, string>;
      timeout?: number;
      setupClient?: (client: { setHeaders(h: Record<string, string>): void }) => void;
    };
    type Instance = {
      on(event: "response", fn: (client: unknown, statusCode: number, resBytes: number, responseTime: number) => void): void;
    };
  }
  function autocannon(opts: autocannon.Options, cb: (err: Error | null, result: autocannon.Result) => void): autocannon.Instance;
  export default autocannon;
}

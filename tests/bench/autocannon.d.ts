// The part of autocannon's API the benchmarks use (it ships no types).
declare module "autocannon" {
  import type { EventEmitter } from "node:events";

  namespace autocannon {
    interface Options {
      url: string;
      connections?: number;
      duration?: number;
      headers?: Record<string, string>;
      method?: string;
      body?: string;
    }
    interface Result {
      requests: { total: number; average: number };
      latency: { p50: number; p90: number; p99: number };
      non2xx: number;
      errors: number;
      timeouts: number;
    }
    type Instance = EventEmitter;
  }

  function autocannon(options: autocannon.Options, callback: (error: Error | null, result: autocannon.Result) => void): autocannon.Instance;
  export default autocannon;
}

// The part of autocannon 8's programmatic API (README "API") that bench/load.bench.ts uses;
// the package ships no types and @types/autocannon would be one more dependency.
declare module "autocannon" {
  export interface Options {
    url: string;
    connections?: number;
    /** Seconds. */
    duration?: number;
    headers?: Record<string, string>;
    /** Seconds a request may take before it counts as a timeout (default 10). */
    timeout?: number;
  }
  export interface Histogram {
    average: number;
    p50: number;
    p97_5: number;
    p99: number;
    max: number;
  }
  export interface Result {
    requests: Histogram;
    latency: Histogram;
    throughput: Histogram;
    /** Answers with a 2xx status. */
    "2xx": number;
    errors: number;
    timeouts: number;
    non2xx: number;
    resets: number;
    statusCodeStats: Record<string, { count: number }>;
  }
  function autocannon(options: Options): Promise<Result>;
  export default autocannon;
}

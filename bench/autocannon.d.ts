// The few parts of autocannon 9 used by bench/http.ts (no @types package is installed).
declare module 'autocannon' {
  namespace autocannon {
    interface Histogram {
      average: number;
      p50: number;
      p99: number;
      max: number;
      total: number;
    }
    interface Result {
      requests: Histogram;
      latency: Histogram;
      non2xx: number;
      errors: number;
      connections: number;
    }
    interface Options {
      url: string;
      method?: string;
      headers?: Record<string, string>;
      body?: string | Buffer;
      connections?: number;
      duration?: number;
      overallRate?: number;
      workers?: number;
    }
  }
  function autocannon(opts: autocannon.Options): Promise<autocannon.Result>;
  export default autocannon;
}

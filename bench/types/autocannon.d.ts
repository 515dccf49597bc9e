// Just what the benchmarks use of autocannon (it ships no types).
declare module 'autocannon' {
  interface Options {
    url: string;
    connections?: number;
    duration?: number;
    headers?: Record<string, string>;
    requests?: { method?: string; path: string; headers?: Record<string, string>; body?: string; setupRequest?: (req: any) => any }[]; // eslint-disable-line @typescript-eslint/no-explicit-any
  }
  interface Result {
    requests: { average: number; total: number };
    latency: Record<string, number>;
    errors: number;
    timeouts: number;
    non2xx?: number;
  }
  interface Instance extends PromiseLike<Result> {
    on(event: 'response', cb: (client: unknown, statusCode: number, bytes: number, responseTime: number) => void): void;
  }
  function autocannon(options: Options): Instance;
  namespace autocannon {
    export type { Result };
  }
  export default autocannon;
}

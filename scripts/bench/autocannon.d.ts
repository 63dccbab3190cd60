/** The parts of autocannon 9 (which ships no types) that scripts/bench/load.ts uses. */
declare module 'autocannon' {
  namespace autocannon {
    interface Options {
      url: string;
      connections?: number;
      duration?: number;
      timeout?: number;
      method?: string;
      headers?: Record<string, string>;
      body?: string;
      requests?: Array<{ setupRequest?: (req: Record<string, unknown>) => Record<string, unknown> }>;
    }
    interface Result {
      requests: { total: number; average: number };
      non2xx: number;
      errors: number;
      timeouts: number;
    }
    interface Instance extends PromiseLike<Result> {
      on(event: 'response', fn: (client: unknown, status: number, bytes: number, responseTime: number) => void): void;
    }
  }
  function autocannon(opts: autocannon.Options): autocannon.Instance;
  export default autocannon;
}

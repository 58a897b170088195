// autocannon 8 ships no typings: the part of its API the benchmarks use.
declare module 'autocannon' {
  import type { EventEmitter } from 'node:events';

  namespace autocannon {
  interface RequestSpec {
    method?: string;
    path?: string;
    headers?: Record<string, string>;
    body?: string;
  }
  interface AutocannonRequest extends RequestSpec {
    setupRequest?: (req: RequestSpec, context: Record<string, unknown>) => RequestSpec;
    onResponse?: (status: number, body: string, context: Record<string, unknown>) => void;
  }
  interface Options extends RequestSpec {
    url: string;
    connections?: number;
    pipelining?: number;
    duration?: number;
    amount?: number;
    overallRate?: number;
    timeout?: number;
    requests?: AutocannonRequest[];
  }
  interface Result {
    errors: number;
    timeouts: number;
    non2xx: number;
    requests: { total: number };
  }
  interface Instance extends EventEmitter, PromiseLike<Result> {
    stop(): void;
  }
  }
  function autocannon(options: autocannon.Options): autocannon.Instance;
  export = autocannon;
}

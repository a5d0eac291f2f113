// The parts of autocannon 9's API (its README) that the load script uses; the package ships no types.
declare module 'autocannon' {
  import type { EventEmitter } from 'node:events';

  namespace autocannon {
    interface Request {
      method?: 'GET' | 'POST' | 'PUT' | 'DELETE';
      path?: string;
      headers?: Record<string, string>;
      body?: string;
      setupRequest?: (request: Request) => Request;
    }
    interface Client extends EventEmitter {
      setRequests(requests: Request[]): void;
    }
    interface Options extends Request {
      url: string;
      connections?: number;
      duration?: number;
      setupClient?: (client: Client) => void;
    }
    interface Result {
      requests: { total: number; average: number };
      latency: Record<string, number>;
      errors: number;
      timeouts: number;
      non2xx: number;
    }
    interface Instance extends EventEmitter, PromiseLike<Result> {}
  }
  function autocannon(options: autocannon.Options): autocannon.Instance;
  export = autocannon;
}

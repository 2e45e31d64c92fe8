/** The part of autocannon's programmatic API (v8) the load benchmarks use; the package ships no types. */
declare module 'autocannon' {
  interface AutocannonRequest {
    method?: string;
    path?: string;
    headers?: Record<string, string>;
    body?: string | Buffer;
    setupRequest?: (req: AutocannonRequest, context: Record<string, unknown>) => AutocannonRequest | null | undefined;
    onResponse?: (status: number, body: string, context: Record<string, unknown>, headers: Record<string, string>) => void;
  }
  interface AutocannonOptions {
    url: string;
    method?: string;
    headers?: Record<string, string>;
    body?: string;
    connections?: number;
    pipelining?: number;
    duration?: number;
    amount?: number;
    maxOverallRequests?: number;
    overallRate?: number;
    connectionRate?: number;
    timeout?: number;
    requests?: AutocannonRequest[];
    setupClient?: (client: unknown) => void;
  }
  interface Histogram {
    average: number;
    mean: number;
    stddev: number;
    min: number;
    max: number;
    total: number;
    sent: number;
    p50: number;
    p90: number;
    p99: number;
  }
  interface AutocannonResult {
    duration: number;
    requests: Histogram;
    latency: Histogram;
    throughput: Histogram;
    errors: number;
    timeouts: number;
    non2xx: number;
    '2xx': number;
    '5xx': number;
    statusCodeStats: Record<string, { count: number }>;
  }
  function autocannon(opts: AutocannonOptions): Promise<AutocannonResult>;
  export default autocannon;
}

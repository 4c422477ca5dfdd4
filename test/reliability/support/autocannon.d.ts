// The part of autocannon's programmatic API the load test uses (the package ships no types).
declare module "autocannon" {
  export type AutocannonRequest = {
    method?: string;
    path?: string;
    headers?: Record<string, string>;
    body?: string;
    onResponse?: (status: number, body: string, context: Record<string, unknown>, headers: Record<string, string>) => void;
  };
  export type AutocannonClient = { setRequests(requests: AutocannonRequest[]): void };
  export type AutocannonResult = {
    requests: { total: number; average: number };
    latency: { p50: number; p90: number; p97_5: number; p99: number; max: number; average: number };
    errors: number;
    timeouts: number;
    non2xx: number;
    duration: number;
    statusCodeStats?: Record<string, { count: number }>;
  };
  export type AutocannonOptions = {
    url: string;
    connections?: number;
    duration?: number;
    timeout?: number;
    maxConnectionRequests?: number;
    method?: string;
    headers?: Record<string, string>;
    requests?: AutocannonRequest[];
    setupClient?: (client: AutocannonClient) => void;
  };
  export type Instance = Promise<AutocannonResult> & {
    on(event: "response", cb: (client: AutocannonClient, statusCode: number, resBytes: number, responseTimeMs: number) => void): void;
    stop(): void;
  };
  function autocannon(opts: AutocannonOptions): Instance;
  export default autocannon;
}

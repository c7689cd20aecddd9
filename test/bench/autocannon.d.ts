// The part of autocannon's programmatic API the server bench uses (the package ships no types).
declare module 'autocannon' {
  interface Histogram {
    p50: number;
    p90: number;
    p99: number;
    average: number;
    max: number;
  }
  interface Result {
    latency: Histogram;
    requests: Histogram & { total: number };
    errors: number;
    non2xx: number;
  }
  function autocannon(opts: { url: string; connections?: number; duration?: number; amount?: number }): Promise<Result>;
  export default autocannon;
}

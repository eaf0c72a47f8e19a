// Warm requests per second over HTTP: the service listening on 127.0.0.1, driven from the same process by node's
// fetch with a fixed number of requests in flight. Client and server share the event loop's core, so these are
// lower bounds on what a separate client would see.
import { performance } from "node:perf_hooks";
import type { AddressInfo } from "node:net";
import { buildApp } from "../http/app.js";

export interface HttpBenchRow {
  name: string;
  requests: number;
  inFlight: number;
  requestsPerSecond: number;
  /** One request at a time (the latency a lone client sees), median of 50. */
  sequentialMedianMs: number;
  /** With IN_FLIGHT requests outstanding. */
  medianLatencyMs: number;
  bytes: number;
}

const IN_FLIGHT = 8;
const REQUESTS = 2000;

export async function benchHttp(workers = 2): Promise<HttpBenchRow[]> {
  const app = await buildApp({ config: { workers, cacheDir: "", rateLimitPerMinute: 0, host: "127.0.0.1" } });
  await app.listen({ host: "127.0.0.1", port: 0 });
  const base = `http://127.0.0.1:${(app.server.address() as AddressInfo).port}`;
  const cases = [
    { name: "warm default profile, JSON (POST /v1/profile `{}`)", url: `${base}/v1/profile` },
    { name: "warm default profile, PNG strip (POST /v1/profile?format=png `{}`)", url: `${base}/v1/profile?format=png` },
  ];
  const rows: HttpBenchRow[] = [];
  try {
    for (const c of cases) {
      const post = async () => {
        const t0 = performance.now();
        const res = await fetch(c.url, { method: "POST", headers: { "content-type": "application/json" }, body: "{}" });
        const body = new Uint8Array(await res.arrayBuffer());
        if (res.status !== 200) throw new Error(`${c.url}: HTTP ${res.status}`);
        return { ms: performance.now() - t0, bytes: body.length };
      };
      // The first request computes (cold); the following ones are the warm case measured.
      const first = await post();
      const sequential: number[] = [];
      for (let i = 0; i < 50; i++) sequential.push((await post()).ms);
      sequential.sort((a, b) => a - b);
      const latencies: number[] = [];
      let next = 0;
      const t0 = performance.now();
      await Promise.all(
        Array.from({ length: IN_FLIGHT }, async () => {
          while (next++ < REQUESTS) latencies.push((await post()).ms);
        }),
      );
      const seconds = (performance.now() - t0) / 1000;
      latencies.sort((a, b) => a - b);
      rows.push({
        name: c.name,
        requests: REQUESTS,
        inFlight: IN_FLIGHT,
        requestsPerSecond: REQUESTS / seconds,
        sequentialMedianMs: sequential[25],
        medianLatencyMs: latencies[latencies.length >> 1],
        bytes: first.bytes,
      });
    }
  } finally {
    await app.close();
  }
  return rows;
}

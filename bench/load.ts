// npm run load: HTTP load on a server in a child process on 127.0.0.1 (a random port), with autocannon, while
// /healthz is polled every 100 ms. Prints requests/s and latency percentiles per scenario and writes them into
// BENCHMARKS.md between <!-- load:start --> and <!-- load:end --> (the rest of the file is left as it is).
import { fork, type ChildProcess } from "node:child_process";
import { createRequire } from "node:module";
import { fileURLToPath } from "node:url";
import { buildApp } from "../http/app.js";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";

const SECONDS_PER_SCENARIO = 10;
const HEALTH_INTERVAL_MS = 100;
const HEALTH_TIMEOUT_MS = 10_000;

interface Histogram {
  average: number;
  p50: number;
  p97_5: number;
  p99: number;
  max: number;
}
interface AutocannonResult {
  requests: Histogram & { total: number };
  latency: Histogram;
  non2xx: number;
  errors: number;
  timeouts: number;
  statusCodeStats: Record<string, { count: number }>;
}
interface AutocannonRequest {
  method?: string;
  path?: string;
  headers?: Record<string, string>;
  body?: string;
  setupRequest?: (req: AutocannonRequest) => AutocannonRequest;
}
type Autocannon = (opts: {
  url: string;
  connections: number;
  duration: number;
  method?: string;
  headers?: Record<string, string>;
  body?: string;
  requests?: AutocannonRequest[];
  timeout?: number;
}) => Promise<AutocannonResult>;

// autocannon is CommonJS without type declarations; the shape used here is typed above.
const autocannon = createRequire(import.meta.url)("autocannon") as Autocannon;

/** Child mode: the service with its defaults, except no rate limit (the load would only measure 429s). */
async function serve(): Promise<void> {
  const app = await buildApp({ config: { rateLimitPerMinute: 0, cacheDir: "" } });
  await app.listen({ host: "127.0.0.1", port: 0 });
  const address = app.server.address();
  process.send!({ port: typeof address === "object" && address ? address.port : 0 });
  process.on("message", (message) => {
    if (message === "close") void app.close().then(() => process.exit(0));
  });
}

function startServer(): Promise<{ child: ChildProcess; port: number }> {
  const child = fork(fileURLToPath(import.meta.url), ["--serve"], { stdio: ["ignore", "inherit", "inherit", "ipc"] });
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error("the server did not start within 60 s")), 60_000);
    child.once("message", (m) => {
      clearTimeout(timer);
      resolve({ child, port: (m as { port: number }).port });
    });
    child.once("exit", (code) => reject(new Error(`the server exited with code ${code}`)));
  });
}

/** Polls /healthz every 100 ms until stopped; returns the worst latency seen (a timeout counts as its limit). */
function pollHealth(base: string) {
  let running = true;
  let worstMs = 0;
  let polls = 0;
  let failures = 0;
  const done = (async () => {
    while (running) {
      const t0 = performance.now();
      try {
        const res = await fetch(`${base}/healthz`, { signal: AbortSignal.timeout(HEALTH_TIMEOUT_MS) });
        await res.arrayBuffer();
        if (res.status !== 200) failures++;
      } catch {
        failures++;
      }
      const ms = performance.now() - t0;
      worstMs = Math.max(worstMs, ms);
      polls++;
      await new Promise((resolve) => setTimeout(resolve, Math.max(0, HEALTH_INTERVAL_MS - ms)));
    }
  })();
  return async () => {
    running = false;
    await done;
    return { worstMs, polls, failures };
  };
}

interface Scenario {
  name: string;
  connections: number;
  path: string;
  body: () => string;
}

let elevationCounter = 0;
const scenarios: Scenario[] = [
  { name: "cached profile, JSON (POST /v1/profile {})", connections: 10, path: "/v1/profile", body: () => "{}" },
  { name: "cached PNG strip (POST /v1/profile?format=png {})", connections: 10, path: "/v1/profile?format=png", body: () => "{}" },
  {
    name: "cold render, result cache missed (sun elevation varied; kernels warm)",
    connections: 4,
    path: "/v1/profile",
    // Every request asks for a new sun elevation, so its content hash is new and the result cache misses.
    body: () => JSON.stringify({ sun: { elevationDeg: 5 + ((elevationCounter++ * 0.000_123) % 40) } }),
  },
];

interface Row {
  scenario: Scenario;
  result: AutocannonResult;
  health: { worstMs: number; polls: number; failures: number };
}

async function run(): Promise<void> {
  const { child, port } = await startServer();
  const base = `http://127.0.0.1:${port}`;
  const rows: Row[] = [];
  try {
    for (const scenario of scenarios) {
      // Warm-up: fills the result cache (cached scenarios) or the kernel cache (cold scenario).
      const warm = await fetch(base + scenario.path, { method: "POST", headers: { "content-type": "application/json" }, body: scenario.body() });
      await warm.arrayBuffer();
      if (warm.status !== 200) throw new Error(`warm-up of ${scenario.path} gave ${warm.status}`);
      const stopHealth = pollHealth(base);
      const result = await autocannon({
        url: base,
        connections: scenario.connections,
        duration: SECONDS_PER_SCENARIO,
        timeout: 30,
        requests: [
          {
            method: "POST",
            path: scenario.path,
            headers: { "content-type": "application/json" },
            setupRequest: (req) => ({ ...req, body: scenario.body() }),
          },
        ],
      });
      const health = await stopHealth();
      rows.push({ scenario, result, health });
      console.log(
        `${scenario.name}: ${result.requests.average.toFixed(1)} req/s (${result.requests.total} in ${SECONDS_PER_SCENARIO} s, ${scenario.connections} connections), ` +
          `latency p50 ${result.latency.p50} ms, p97.5 ${result.latency.p97_5} ms, p99 ${result.latency.p99} ms; ` +
          `non-2xx ${result.non2xx}, errors ${result.errors}, timeouts ${result.timeouts}; ` +
          `/healthz worst ${health.worstMs.toFixed(1)} ms over ${health.polls} polls (${health.failures} failed)`,
      );
    }
  } finally {
    child.send("close");
    await new Promise((resolve) => {
      const kill = setTimeout(() => child.kill(), 15_000);
      child.once("exit", () => resolve(clearTimeout(kill)));
    });
  }
  writeSection(rows);
}

function writeSection(rows: Row[]): void {
  writeMarkedSection("load", [
    "## HTTP load",
    "",
    `Written by \`npm run load\` (bench/load.ts), ${benchDate()}; ${machineLine()}. The server runs in a child process with its defaults`,
    `(worker threads = cores, 512 MiB cache) except no rate limit and no disk cache; autocannon runs ${SECONDS_PER_SCENARIO} s per row from`,
    "the same machine (so client and server share the cores), while /healthz is polled every 100 ms.",
    "",
    "| scenario | connections | req/s | p50 ms | p97.5 ms | p99 ms | non-2xx | errors | /healthz worst ms |",
    "| --- | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: |",
    ...rows.map(
      ({ scenario, result, health }) =>
        `| ${scenario.name} | ${scenario.connections} | ${result.requests.average.toFixed(1)} | ${result.latency.p50} | ${result.latency.p97_5} | ${result.latency.p99} | ${result.non2xx} | ${result.errors + result.timeouts} | ${health.worstMs.toFixed(1)} |`,
    ),
  ]);
}

if (process.argv.includes("--serve")) await serve();
else await run();

// npm run hostile: sends at least 10,000 structurally hostile requests (bench/hostile-inputs.ts, over every endpoint
// with a body or a query) to the service as deployed — dist/http/main.js in a child process, listening on
// 127.0.0.1 — plus raw-socket ones (headers too large, bytes that are not HTTP). Counts the answers by status and
// by kind of hostility, the largest answer, the longest log line the server wrote, and /healthz latency while idle
// and while under the hostile load, in the same run. Writes the figures into BENCHMARKS.md between
// <!-- hostile:start --> and <!-- hostile:end -->; exits 1 when any answer was a 5xx or larger than the bound.
// Options: --requests N (default 12,000), --seed S (default fixed; "random" for a new one), --server PATH (another
// build's dist/http/main.js, e.g. of an older commit, for comparison: figures are printed, BENCHMARKS.md is left alone).
import { spawn, type ChildProcess } from "node:child_process";
import { connect } from "node:net";
import { existsSync, readFileSync, writeFileSync } from "node:fs";
import { cpus, loadavg, totalmem } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import fc from "fast-check";
import { repoPath } from "../pipeline/config/resources.js";
import { hostileRequest, hostileTargets, MAX_ERROR_BYTES, HOSTILE_STATUSES, type HostileRequest } from "./hostile-inputs.js";
import { LOG_LINE_BYTES } from "../http/plugins/bounded-logs.js";
import { freePort } from "../test/helpers/free-port.js";

const START = "<!-- hostile:start -->";
const END = "<!-- hostile:end -->";
const CONCURRENCY = 8;
/** Generated in batches so that at most this many bodies (some near 1 MiB) are held at once. */
const BATCH = 250;
const HEALTH_INTERVAL_MS = 50;
const IDLE_MS = 5_000;
const RAW_SOCKET_REQUESTS = 200;

const argument = (name: string) => {
  const at = process.argv.indexOf(name);
  return at >= 0 ? process.argv[at + 1] : undefined;
};
const TOTAL = Number(argument("--requests") ?? 12_000);
const OTHER_SERVER = argument("--server");
const SEED = argument("--seed") === "random" ? Math.floor(Math.random() * 2 ** 31) : Number(argument("--seed") ?? 20261203);

interface Server {
  child: ChildProcess;
  port: number;
  log: { lines: number; longest: number; longestText: string };
}

async function startServer(): Promise<Server> {
  const port = await freePort();
  const main = OTHER_SERVER ?? fileURLToPath(new URL("../http/main.js", import.meta.url));
  // As deployed, but without the per-client rate limit (every request here comes from one address) and without a disk cache.
  const env = { ...process.env, PORT: String(port), HOST: "127.0.0.1", RATE_LIMIT_PER_MINUTE: "0", CACHE_DIR: "", LOG_LEVEL: "info" };
  const child = spawn(process.execPath, [main], { env, stdio: ["ignore", "pipe", "inherit"] });
  const log = { lines: 0, longest: 0, longestText: "" };
  let pending = "";
  child.stdout!.on("data", (chunk: Buffer) => {
    pending += chunk.toString("utf8");
    let newline: number;
    while ((newline = pending.indexOf("\n")) >= 0) {
      const line = pending.slice(0, newline);
      pending = pending.slice(newline + 1);
      log.lines++;
      const bytes = Buffer.byteLength(line);
      if (bytes > log.longest) {
        log.longest = bytes;
        log.longestText = line.slice(0, 300);
      }
    }
  });
  await new Promise<void>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error("the server did not listen within 120 s")), 120_000);
    const poll = setInterval(async () => {
      try {
        if ((await fetch(`http://127.0.0.1:${port}/healthz`)).ok) {
          clearInterval(poll);
          clearTimeout(timer);
          resolve();
        }
      } catch {
        /* not listening yet */
      }
    }, 200);
    child.once("exit", (code) => reject(new Error(`the server exited (${code}) before listening`)));
  });
  return { child, port, log };
}

/** Polls /healthz until stopped; returns every latency in ms. */
function pollHealth(base: string) {
  let running = true;
  const latencies: number[] = [];
  let failures = 0;
  const loop = (async () => {
    while (running) {
      const started = performance.now();
      try {
        const res = await fetch(`${base}/healthz`, { signal: AbortSignal.timeout(10_000) });
        await res.arrayBuffer();
        if (!res.ok) failures++;
      } catch {
        failures++;
      }
      latencies.push(performance.now() - started);
      await new Promise((r) => setTimeout(r, HEALTH_INTERVAL_MS));
    }
  })();
  return async () => {
    running = false;
    await loop;
    return { latencies, failures };
  };
}

const percentile = (sorted: number[], p: number) => sorted[Math.min(sorted.length - 1, Math.floor(p * sorted.length))] ?? NaN;
const summary = (values: number[]) => {
  const sorted = [...values].sort((a, b) => a - b);
  return { n: sorted.length, median: percentile(sorted, 0.5), p99: percentile(sorted, 0.99), max: sorted[sorted.length - 1] ?? NaN };
};

interface Tally {
  sent: number;
  byStatus: Map<number, number>;
  byKind: Map<string, Map<number, number>>;
  inJobByKind: Map<string, number>;
  largestAnswer: number;
  largestAnswerKind: string;
  notJson: number;
  failures: string[];
}

function count(tally: Tally, kind: string, status: number, bytes: number, json: boolean, what: string): void {
  tally.sent++;
  tally.byStatus.set(status, (tally.byStatus.get(status) ?? 0) + 1);
  const k = tally.byKind.get(kind) ?? new Map<number, number>();
  k.set(status, (k.get(status) ?? 0) + 1);
  tally.byKind.set(kind, k);
  if (bytes > tally.largestAnswer) {
    tally.largestAnswer = bytes;
    tally.largestAnswerKind = kind;
  }
  if (!json) tally.notJson++;
  if ((status >= 500 || bytes > MAX_ERROR_BYTES || !json || !HOSTILE_STATUSES.includes(status)) && tally.failures.length < 20) tally.failures.push(`${status} ${bytes} B: ${what}`);
}

/** "deep-array@drops.radii" → "deep-array"; "job-body:long-key@x" → "long-key" (counted as inside a job too). */
const kindOf = (label: string) => label.split("@")[0].replace(/^job-(body|query):/, "");
const inJob = (label: string) => /^job-(body|query):/.test(label);

async function sendOne(base: string, req: HostileRequest, tally: Tally): Promise<void> {
  const what = `${req.label} ${req.method} ${req.url.slice(0, 120)} ${req.payload?.subarray(0, 120).toString("latin1") ?? ""}`;
  try {
    const res = await fetch(base + req.url, {
      method: req.method,
      headers: req.contentType ? { "content-type": req.contentType } : {},
      body: req.payload ? new Uint8Array(req.payload) : undefined,
      signal: AbortSignal.timeout(60_000),
    });
    const body = Buffer.from(await res.arrayBuffer());
    let json = false;
    try {
      const parsed = JSON.parse(body.toString("utf8")) as { error?: unknown };
      json = typeof parsed.error === "string";
    } catch {
      json = false;
    }
    count(tally, kindOf(req.label), res.status, body.length, json, what);
    if (inJob(req.label)) tally.inJobByKind.set(kindOf(req.label), (tally.inJobByKind.get(kindOf(req.label)) ?? 0) + 1);
  } catch (error) {
    count(tally, kindOf(req.label), 0, 0, false, `${what}: ${(error as Error).message}`);
  }
}

/** Requests fetch cannot send: raw bytes on a socket. Returns the status line's code and the body's size. */
function rawRequest(port: number, bytes: string): Promise<{ status: number; bytes: number; json: boolean }> {
  return new Promise((resolve) => {
    const socket = connect(port, "127.0.0.1", () => socket.end(bytes));
    let out = "";
    socket.setTimeout(30_000, () => socket.destroy());
    socket.on("data", (d) => (out += d.toString("latin1")));
    socket.on("close", () => {
      const status = Number(/^HTTP\/1\.1 (\d{3})/.exec(out)?.[1] ?? 0);
      const body = out.slice(out.indexOf("\r\n\r\n") + 4);
      let json = false;
      try {
        json = typeof (JSON.parse(body) as { error?: unknown }).error === "string";
      } catch {
        json = false;
      }
      resolve({ status, bytes: Buffer.byteLength(body, "latin1"), json });
    });
    socket.on("error", () => undefined);
  });
}

/** The service's OpenAPI document; retried while a freshly started server still answers 503 (workers warming up). */
async function openApiOf(base: string): Promise<Parameters<typeof hostileTargets>[0]> {
  for (let attempt = 0; ; attempt++) {
    const res = await fetch(`${base}/openapi.json`);
    if (res.ok) return (await res.json()) as Parameters<typeof hostileTargets>[0];
    if (attempt >= 60) throw new Error(`/openapi.json answered ${res.status}`);
    await new Promise((r) => setTimeout(r, 1000));
  }
}

async function run(): Promise<void> {
  const server = await startServer();
  const base = `http://127.0.0.1:${server.port}`;
  const tally: Tally = { sent: 0, byStatus: new Map(), byKind: new Map(), inJobByKind: new Map(), largestAnswer: 0, largestAnswerKind: "", notJson: 0, failures: [] };
  const loadStart = loadavg()[0];
  let idle: ReturnType<typeof summary>;
  let busy: ReturnType<typeof summary>;
  let busyFailures = 0;
  let seconds = 0;
  try {
    const targets = hostileTargets(await openApiOf(base));
    const arbitrary = hostileRequest(targets);

    const stopIdle = pollHealth(base);
    await new Promise((r) => setTimeout(r, IDLE_MS));
    idle = summary((await stopIdle()).latencies);

    const stopBusy = pollHealth(base);
    const started = performance.now();
    for (let batch = 0; batch * BATCH < TOTAL; batch++) {
      const requests = fc.sample(arbitrary, { seed: SEED + batch, numRuns: Math.min(BATCH, TOTAL - batch * BATCH) });
      let next = 0;
      await Promise.all(
        Array.from({ length: CONCURRENCY }, async () => {
          while (next < requests.length) await sendOne(base, requests[next++], tally);
        }),
      );
      if (batch % 8 === 7) console.log(`${tally.sent} sent, ${((performance.now() - started) / 1000).toFixed(0)} s`);
    }
    const raws = [
      { kind: "raw:headers-too-large", bytes: `GET /healthz HTTP/1.1\r\nhost: x\r\nx-big: ${"h".repeat(20_000)}\r\n\r\n` },
      { kind: "raw:not-http", bytes: "\x00\x01\x02 not http at all\r\n\r\n" },
      { kind: "raw:bad-chunked-body", bytes: "POST /v1/profile HTTP/1.1\r\nhost: x\r\ncontent-type: application/json\r\ntransfer-encoding: chunked\r\n\r\nzz\r\n{}\r\n0\r\n\r\n" },
      { kind: "raw:content-length-mismatch", bytes: "POST /v1/profile HTTP/1.1\r\nhost: x\r\ncontent-type: application/json\r\ncontent-length: 2\r\ncontent-length: 3\r\n\r\n{}" },
    ];
    for (let i = 0; i < RAW_SOCKET_REQUESTS; i++) {
      const raw = raws[i % raws.length];
      const res = await rawRequest(server.port, raw.bytes);
      count(tally, raw.kind, res.status, res.bytes, res.json, raw.kind);
    }
    seconds = (performance.now() - started) / 1000;
    const busyHealth = await stopBusy();
    busy = summary(busyHealth.latencies);
    busyFailures = busyHealth.failures;
  } finally {
    server.child.kill("SIGTERM");
    await new Promise((resolve) => server.child.once("exit", resolve));
  }
  const fiveHundreds = [...tally.byStatus].filter(([s]) => s >= 500 || s === 0).reduce((a, [, n]) => a + n, 0);
  const report = { tally, idle, busy, busyFailures, seconds, log: server.log, fiveHundreds, loadStart, loadEnd: loadavg()[0] };
  console.log(
    `${tally.sent} hostile requests in ${seconds.toFixed(0)} s; statuses ${JSON.stringify(Object.fromEntries(tally.byStatus))}; ` +
      `largest answer ${tally.largestAnswer} B (${tally.largestAnswerKind}); log: ${server.log.lines} lines, longest ${server.log.longest} B; ` +
      `/healthz idle median ${idle.median.toFixed(1)} ms p99 ${idle.p99.toFixed(1)} ms (${idle.n}), under load median ${busy.median.toFixed(1)} ms p99 ${busy.p99.toFixed(1)} ms max ${busy.max.toFixed(1)} ms (${busy.n}, ${busyFailures} failed)`,
  );
  for (const failure of tally.failures) console.log(`  ${failure}`);
  if (OTHER_SERVER) console.log(`(against ${OTHER_SERVER}: BENCHMARKS.md left as it is)`);
  else writeSection(report);
  const bad = fiveHundreds > 0 || tally.largestAnswer > MAX_ERROR_BYTES || tally.notJson > 0 || server.log.longest > LOG_LINE_BYTES;
  if (bad) console.log("FAILED: a 5xx, an answer over the bound, an answer not in the error shape, or a log line over the bound");
  process.exitCode = bad ? 1 : 0;
}

function writeSection(r: {
  tally: Tally;
  idle: ReturnType<typeof summary>;
  busy: ReturnType<typeof summary>;
  busyFailures: number;
  seconds: number;
  log: Server["log"];
  fiveHundreds: number;
  loadStart: number;
  loadEnd: number;
}): void {
  const file = join(dirname(repoPath("package.json")), "BENCHMARKS.md");
  const machine = `${cpus()[0]?.model ?? "unknown CPU"}, ${cpus().length} cores, ${Math.round(totalmem() / 2 ** 30)} GiB, Node ${process.version}`;
  const date = new Date().toISOString().slice(0, 16).replace("T", " ") + " UTC";
  const statuses = (m: Map<number, number>) => [...m].sort(([a], [b]) => a - b).map(([s, n]) => `${s}: ${n}`).join(", ");
  const ms = (v: number) => v.toFixed(1);
  const lines = [
    START,
    "## Hostile requests",
    "",
    `Written by \`npm run hostile\` (bench/hostile-requests.ts), ${date}; ${machine}; one-minute load average ${r.loadStart.toFixed(2)} at the`,
    `start, ${r.loadEnd.toFixed(2)} at the end. The deployed server (dist/http/main.js, its defaults but no rate limit and no disk cache) runs in a`,
    `child process; ${CONCURRENCY} concurrent clients on the same machine send requests generated by bench/hostile-inputs.ts (seed ${SEED}) to every`,
    "endpoint with a body or a query, then raw-socket requests; /healthz is polled every 50 ms, first idle for 5 s, then during the run.",
    "",
    `- Sent: **${r.tally.sent}** hostile requests in ${r.seconds.toFixed(0)} s; 5xx or no answer: **${r.fiveHundreds}**.`,
    `- Statuses: ${statuses(r.tally.byStatus)}.`,
    `- Largest answer: ${r.tally.largestAnswer} bytes (bound ${MAX_ERROR_BYTES}); answers not in the JSON error shape: ${r.tally.notJson}.`,
    `- Server log: ${r.log.lines} lines, the longest ${r.log.longest} bytes (bound ${LOG_LINE_BYTES}).`,
    "",
    "| /healthz | polls | median ms | p99 ms | max ms | failed |",
    "| --- | ---: | ---: | ---: | ---: | ---: |",
    `| idle | ${r.idle.n} | ${ms(r.idle.median)} | ${ms(r.idle.p99)} | ${ms(r.idle.max)} | 0 |`,
    `| during the hostile requests | ${r.busy.n} | ${ms(r.busy.median)} | ${ms(r.busy.p99)} | ${ms(r.busy.max)} | ${r.busyFailures} |`,
    "",
    "| kind of hostility | sent | of which inside a job's body or query | statuses |",
    "| --- | ---: | ---: | --- |",
    ...[...r.tally.byKind]
      .sort(([a], [b]) => (a < b ? -1 : 1))
      .map(([kind, m]) => `| ${kind} | ${[...m.values()].reduce((a, b) => a + b, 0)} | ${r.tally.inJobByKind.get(kind) ?? 0} | ${statuses(m)} |`),
    END,
  ].join("\n");
  const text = existsSync(file) ? readFileSync(file, "utf8") : "";
  const start = text.indexOf(START);
  const end = text.indexOf(END);
  const next = start >= 0 && end > start ? text.slice(0, start) + lines + text.slice(end + END.length) : `${text}${text.endsWith("\n") ? "" : "\n"}\n${lines}\n`;
  writeFileSync(file, next);
  console.log(`wrote the hostile section of ${file}`);
}

await run();

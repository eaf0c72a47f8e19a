// npm run bench:outage: the service through Redis faults, with a redis-server of its own (never a shared one), API
// and worker processes from dist/ as deployed. Measures (1) synchronous cold renders with Redis away against the
// same renders with Redis up, interleaved in one run; (2) the outcome of every job queued or running when Redis is
// killed (SIGKILL) and restarted, with the append-only file and without persistence; (3) SIGTERM → exit of API and
// worker processes while Redis is away. Prints the figures and writes the "outage" section of BENCHMARKS.md.
import { spawn, type ChildProcess } from "node:child_process";
import { mkdtemp, rm } from "node:fs/promises";
import { loadavg, tmpdir } from "node:os";
import { join } from "node:path";
import { ownRedis, redisServerPresent, type OwnRedis } from "./own-redis.js";
import { freePort } from "./free-port.js";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";
import { repoPath } from "../pipeline/config/resources.js";

/** Rounds of (healthy cold render, outage cold render): each render with its own water temperature, so always cold. */
const ROUNDS = 5;
/** Jobs across a crash: one long Lorenz–Mie LUT (running at the crash) and small profiles queued behind it. */
const QUEUED_PROFILES = 5;
const JOB_DEADLINE_MS = 240_000;

const LONG_LUT = {
  scenario: { method: "mie", spectral: { fromNm: 400, toNm: 700, stepNm: 20 } },
  angles: { fromDeg: 36, toDeg: 56, texels: 64 },
  sizes: { kind: "radius", fromUm: 300, toUm: 2500, texels: 10 },
};
const smallProfile = (radiusUm: number) => ({
  drops: { kind: "monodisperse", radiusUm },
  spectral: { fromNm: 400, toNm: 700, stepNm: 20 },
  angles: { fromDeg: 36, toDeg: 56, stepDeg: 0.2 },
});

interface Service {
  name: string;
  child: ChildProcess;
  lines: string[];
  exited: Promise<number | string>;
}

const services: Service[] = [];

function start(name: string, script: string, env: Record<string, string>): Service {
  const child = spawn(process.execPath, [repoPath(script)], {
    env: { ...process.env, LOG_LEVEL: "warn", RATE_LIMIT_PER_MINUTE: "0", MAX_EVENT_LOOP_DELAY_MS: "600000", ...env },
    stdio: ["ignore", "pipe", "pipe"],
  });
  const lines: string[] = [];
  const keep = (chunk: Buffer) => lines.push(...chunk.toString("utf8").split("\n").filter(Boolean));
  child.stdout!.on("data", keep);
  child.stderr!.on("data", keep);
  const exited = new Promise<number | string>((resolve) => child.once("exit", (code, signal) => resolve(code ?? signal ?? "?")));
  const service = { name, child, lines, exited };
  services.push(service);
  return service;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function until<T>(what: string, probe: () => Promise<T | undefined>, timeoutMs = 60_000): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const value = await probe().catch(() => undefined);
    if (value !== undefined) return value;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await sleep(100);
  }
}

const statusOf = async (url: string) => (await fetch(url).catch(() => undefined))?.status ?? 0;
const readiness = (base: string, status: number) => until(`readiness ${status}`, async () => ((await statusOf(`${base}/readyz`)) === status ? true : undefined));
const post = (url: string, body: unknown) => fetch(url, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(body) });

interface Deployment {
  redis: OwnRedis;
  folder: string;
  apis: { service: Service; base: string }[];
  workers: Service[];
}

async function deploy(options: { appendOnly: boolean; apis: number; workers: number }): Promise<Deployment> {
  const redis = await ownRedis({ appendOnly: options.appendOnly });
  await redis.start();
  const folder = await mkdtemp(join(tmpdir(), "antisolar-outage-"));
  const env = { REDIS_URL: redis.url, CACHE_DIR: folder };
  const apis = [];
  for (let k = 0; k < options.apis; k++) {
    const port = await freePort();
    apis.push({ service: start(`api-${k}`, "dist/http/main.js", { ...env, PORT: String(port), HOST: "127.0.0.1" }), base: `http://127.0.0.1:${port}` });
  }
  const workers = Array.from({ length: options.workers }, (_, k) => start(`worker-${k}`, "dist/pipeline/jobs/worker-main.js", env));
  for (const api of apis) await readiness(api.base, 200);
  for (const worker of workers) await until("a worker", async () => (worker.lines.some((l) => l.includes('"worker ready"')) ? true : undefined));
  return { redis, folder, apis, workers };
}

async function teardown(d: Deployment): Promise<void> {
  for (const s of [...d.apis.map((a) => a.service), ...d.workers]) if (s.child.exitCode === null && s.child.signalCode === null) s.child.kill("SIGKILL");
  await d.redis.dispose();
  await rm(d.folder, { recursive: true, force: true });
}

const median = (values: number[]) => [...values].sort((a, b) => a - b)[Math.floor(values.length / 2)];

/** (1) Cold default profiles (`{}` with a new water temperature each) with Redis up and with Redis killed, interleaved. */
async function renderDuringOutage() {
  const d = await deploy({ appendOnly: false, apis: 1, workers: 0 });
  const { base } = d.apis[0];
  const render = async (temperatureC: number) => {
    const t0 = performance.now();
    const res = await post(`${base}/v1/profile?format=png`, { water: { temperatureC, salinityPsu: 0 } });
    await res.arrayBuffer();
    if (res.status !== 200) throw new Error(`render answered ${res.status}`);
    return performance.now() - t0;
  };
  await render(4); // JIT and thread warm-up, not measured
  const healthy: number[] = [];
  const outage: number[] = [];
  for (let k = 0; k < ROUNDS; k++) {
    healthy.push(await render(10 + 2 * k));
    await sleep(1500); // the kernel packs' writes to Redis end after the answer
    await d.redis.kill();
    await readiness(base, 503);
    outage.push(await render(11 + 2 * k));
    await d.redis.start();
    await readiness(base, 200);
  }
  await teardown(d);
  return { healthy, outage, ratio: median(outage) / median(healthy) };
}

type Outcome = "done, synchronous answer" | "done, other answer" | "lost (404)" | "failed" | "cancelled" | "not finished";

/** (2) Every job queued or running when Redis is killed: what became of it once Redis is back. */
async function jobsAcrossCrash(appendOnly: boolean) {
  const d = await deploy({ appendOnly, apis: 1, workers: 1 });
  const { base } = d.apis[0];
  const jobs: { endpoint: string; body: unknown; format: string; id: string }[] = [];
  const submit = async (endpoint: string, body: unknown, format: string) => {
    const res = await post(`${base}/v1/jobs`, { endpoint, body, format });
    jobs.push({ endpoint, body, format, id: ((await res.json()) as { id: string }).id });
  };
  await submit("lut", LONG_LUT, "json");
  for (let k = 0; k < QUEUED_PROFILES; k++) await submit("profile", smallProfile(40 + k), "png");
  await until("the LUT job to run", async () => {
    const job = (await (await fetch(`${base}/v1/jobs/${jobs[0].id}`)).json()) as { state: string; progress: { fraction: number } };
    return job.state === "running" && job.progress.fraction > 0 ? true : undefined;
  });
  await d.redis.kill();
  await sleep(2000);
  await d.redis.start();
  const restarted = performance.now();
  await readiness(base, 200);

  const comparable = (endpoint: string, bytes: Buffer) => {
    if (endpoint !== "lut") return bytes.toString("base64");
    const lut = JSON.parse(bytes.toString("utf8")) as { manifest: { computeMs?: number } };
    delete lut.manifest.computeMs; // how long it took: the one field that differs between runs
    return JSON.stringify(lut);
  };
  const outcomes: Outcome[] = [];
  for (const job of jobs) {
    const end = await until(`job ${job.id}`, async () => {
      const res = await fetch(`${base}/v1/jobs/${job.id}`);
      if (res.status === 404) return { state: "lost", lost: ((await res.json()) as { lost?: boolean }).lost === true };
      const view = (await res.json()) as { state: string };
      return ["done", "failed", "cancelled"].includes(view.state) ? { state: view.state, lost: false } : undefined;
    }, JOB_DEADLINE_MS).catch(() => ({ state: "not finished", lost: false }));
    if (end.state === "done") {
      const result = Buffer.from(await (await fetch(`${base}/v1/jobs/${job.id}/result`)).arrayBuffer());
      const sync = Buffer.from(await (await post(`${base}/v1/${job.endpoint}?format=${job.format}`, job.body)).arrayBuffer());
      outcomes.push(comparable(job.endpoint, result) === comparable(job.endpoint, sync) ? "done, synchronous answer" : "done, other answer");
    } else if (end.state === "lost") outcomes.push(end.lost ? "lost (404)" : "not finished");
    else outcomes.push(end.state as Outcome);
  }
  const settledS = (performance.now() - restarted) / 1000;
  const workerDone = d.workers[0].lines.filter((l) => l.includes('"msg":"job done"')).length;
  await teardown(d);
  return { appendOnly, outcomes, settledS, workerDone };
}

/** (3) SIGTERM → exit while Redis is away: idle processes, an API with a long request in flight, a worker with a job in hand. */
async function shutdownDuringOutage() {
  const d = await deploy({ appendOnly: true, apis: 2, workers: 2 });
  const [idleApi, busyApi] = d.apis;
  const res = await post(`${busyApi.base}/v1/jobs`, { endpoint: "lut", body: { ...LONG_LUT, sizes: { ...LONG_LUT.sizes, texels: 24 } }, format: "json" });
  const { id } = (await res.json()) as { id: string };
  const busyWorker = await until("a worker to take the job", async () => d.workers.find((w) => w.lines.some((l) => l.includes('"job started"') && l.includes(id))));
  const idleWorker = d.workers.find((w) => w !== busyWorker)!;
  const inFlight = post(`${busyApi.base}/v1/lut?format=json`, LONG_LUT).then((r) => r.status, () => "cut off");
  await sleep(500);
  await d.redis.kill();
  await readiness(idleApi.base, 503);
  const timeExit = async (service: Service) => {
    const t0 = performance.now();
    service.child.kill("SIGTERM");
    const code = await service.exited;
    return { name: service.name, seconds: (performance.now() - t0) / 1000, code };
  };
  const rows = [
    { what: "API process, idle", ...(await timeExit(idleApi.service)) },
    { what: "worker process, idle", ...(await timeExit(idleWorker)) },
  ];
  const [api, worker] = await Promise.all([timeExit(busyApi.service), timeExit(busyWorker)]);
  rows.push({ what: `API process, a synchronous Lorenz–Mie LUT in flight (answered: ${await inFlight})`, ...api });
  const gaveBack = busyWorker.lines.find((l) => /"job (given back|left to its lease|done)"/.test(l)) ?? "";
  rows.push({ what: `worker process, a 24-row Lorenz–Mie LUT job in hand (${/"msg":"([^"]+)"/.exec(gaveBack)?.[1] ?? "no job event"})`, ...worker });
  await teardown(d);
  return rows;
}

if (!redisServerPresent) {
  console.error("bench:outage needs redis-server on PATH (Debian: apt-get install redis-server)");
  process.exit(2);
}
process.once("exit", () => {
  for (const s of services) if (s.child.exitCode === null && s.child.signalCode === null) s.child.kill("SIGKILL");
});

const machine = machineLine();
const date = benchDate();
const loadBefore = loadavg()[0];
console.log(`machine: ${machine}; load average ${loadBefore.toFixed(2)}`);

const renders = await renderDuringOutage();
console.log(`cold default profile: healthy ${renders.healthy.map((v) => v.toFixed(0)).join(", ")} ms; Redis away ${renders.outage.map((v) => v.toFixed(0)).join(", ")} ms; ratio of medians ${renders.ratio.toFixed(2)}`);
const crashes = [await jobsAcrossCrash(true), await jobsAcrossCrash(false)];
for (const c of crashes) console.log(`crash ${c.appendOnly ? "with AOF" : "without persistence"}: ${c.outcomes.join("; ")} (settled ${c.settledS.toFixed(1)} s after the restart)`);
const exits = await shutdownDuringOutage();
for (const e of exits) console.log(`SIGTERM → exit, ${e.what}: ${e.seconds.toFixed(2)} s, exit code ${e.code}`);
const loadAfter = loadavg()[0];

const tally = (outcomes: Outcome[]) => {
  const counts = new Map<Outcome, number>();
  for (const o of outcomes) counts.set(o, (counts.get(o) ?? 0) + 1);
  return [...counts].map(([o, n]) => `${n} ${o}`).join(", ");
};
writeMarkedSection("outage", [
  "## Redis outage",
  "",
  `Written by \`npm run bench:outage\` (bench/outage.ts), ${date}; ${machine}; one-minute load average ${loadBefore.toFixed(2)} at the`,
  `start, ${loadAfter.toFixed(2)} at the end. A redis-server of the benchmark's own, killed with SIGKILL and started again on the same port;`,
  "API and worker processes from dist/ with their defaults (kernel threads = cores, SHUTDOWN_GRACE_MS 20 s), CACHE_DIR set.",
  "",
  "Synchronous cold renders of the default profile (`{}` with a new water temperature each time, so that no kernel is",
  "cached), Redis up and Redis killed in turn, in one API process:",
  "",
  "| Redis | renders (ms) | median (ms) |",
  "| --- | --- | ---: |",
  `| up | ${renders.healthy.map((v) => v.toFixed(0)).join(", ")} | ${median(renders.healthy).toFixed(0)} |`,
  `| killed | ${renders.outage.map((v) => v.toFixed(0)).join(", ")} | ${median(renders.outage).toFixed(0)} |`,
  "",
  `Redis killed ÷ Redis up (medians): **${renders.ratio.toFixed(2)}**.`,
  "",
  `Jobs across a crash: one Lorenz–Mie LUT running (10 rows) and ${QUEUED_PROFILES} small profiles queued behind it on one worker when`,
  "Redis is killed; Redis is started again 2 s later. A done job's result is compared with the synchronous endpoint's answer.",
  "",
  "| Redis | outcomes | all settled after the restart (s) | `job done` lines of the worker |",
  "| --- | --- | ---: | ---: |",
  ...crashes.map((c) => `| ${c.appendOnly ? "append-only file" : "no persistence"} | ${tally(c.outcomes)} | ${c.settledS.toFixed(1)} | ${c.workerDone} |`),
  "",
  "SIGTERM → exit with Redis killed (SHUTDOWN_GRACE_MS 20 s; the platform's SIGKILL would come at 30 s):",
  "",
  "| process | seconds | exit code |",
  "| --- | ---: | ---: |",
  ...exits.map((e) => `| ${e.what} | ${e.seconds.toFixed(2)} | ${e.code} |`),
  "",
]);
process.exit(0);

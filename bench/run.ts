// npm run bench [-- --quick]: times the Mie kernel (W1–W3), whole profiles (P1–P3; --quick leaves out P3, which
// takes minutes) and warm HTTP requests in one run, prints the figures and rewrites BENCHMARKS.md.
import { existsSync, readFileSync, writeFileSync } from "node:fs";
import { cpus, loadavg, totalmem } from "node:os";
import { benchMie, mieKernelName } from "./mie.js";
import { benchProfile, P1, P1_DISK, P2, P2_ONE_SIZE, P3, STARTED_WAIT_MS, type ProfileBenchRow } from "./profiles.js";
import { benchHttp } from "./http.js";
import { repoPath } from "../pipeline/config/resources.js";
import { keptSections } from "./sections.js";

const quick = process.argv.includes("--quick");
const machine = `${cpus()[0]?.model ?? "unknown CPU"}, ${cpus().length} cores, ${Math.round(totalmem() / 2 ** 30)} GiB, Node ${process.version}`;
const date = new Date().toISOString().slice(0, 16).replace("T", " ") + " UTC";
const loadBefore = loadavg()[0];
const M = (v: number) => `${(v / 1e6).toFixed(0)} M`;

console.log(`machine: ${machine}; load average ${loadBefore.toFixed(2)}; Mie kernel: ${mieKernelName}`);
const mie = benchMie();
for (const r of mie) {
  console.log(
    `${r.workload.name}: ${r.nTerms} terms × ${r.angles} angles, coefficients ${r.coefficientsMs.toFixed(2)} ms, amplitudes ${r.amplitudesMs.toFixed(1)} ms ` +
      `(scalar ${r.scalarMs.toFixed(1)} ms), ${M(r.termAnglesPerSecond)} term-angles/s/core (scalar ${M(r.scalarTermAnglesPerSecond)})`,
  );
}
const profiles: ProfileBenchRow[] = [];
for (const w of quick ? [P1, P1_DISK, P2, P2_ONE_SIZE] : [P1, P1_DISK, P2, P2_ONE_SIZE, P3]) {
  for (const r of await benchProfile(w, { first: w === P1 })) {
    profiles.push(r);
    console.log(
      `${r.name}, ${r.workers} workers: cold ${r.coldMs.toFixed(0)} ms` +
        (r.firstMs === null ? "" : `, first on new threads ${r.firstMs.toFixed(0)} ms`) +
        (r.startedMs === null ? "" : `, on threads warmed up at start ${r.startedMs.toFixed(0)} ms`) +
        (r.fromDiskMs === null ? "" : `, from disk after a restart ${r.fromDiskMs.toFixed(0)} ms`) +
        (r.warmMs === null ? "" : `, warm ${r.warmMs.toFixed(1)} ms`) +
        `, ${r.mieTermAngles.toExponential(2)} Mie term-angles, ${r.coldCores.toFixed(2)} cores busy, kernel cache ${(r.kernelBytes / 2 ** 20).toFixed(1)} MiB`,
    );
  }
}
const http = await benchHttp(2);
for (const r of http) {
  console.log(`${r.name}: ${r.requestsPerSecond.toFixed(0)} requests/s (${r.inFlight} in flight), lone request ${r.sequentialMedianMs.toFixed(2)} ms`);
}
const loadAfter = loadavg()[0];

const p3 = profiles.filter((r) => r.name === P3.name);
const p3Scaling = p3.length === 2 ? p3[0].coldMs / p3[1].coldMs : null;
const compute = (r: (typeof mie)[number]) => (r.coefficientsMs + r.amplitudesMs) / 1000;
const anchored = mie.filter((r) => r.workload.anchors);

const lines = [
  "# Benchmarks",
  "",
  "Written by `npm run bench` (bench/run.ts; `-- --quick` leaves out P3). Medians after warm-up, inside one Node process.",
  "Machines are noisy: compare ratios between rows of one run, not absolute times between runs.",
  "",
  `Machine: ${machine}. Date: ${date}. One-minute load average ${loadBefore.toFixed(2)} at the start, ${loadAfter.toFixed(2)} at the end` +
    (Math.max(loadBefore, loadAfter) > cpus().length ? " (above the core count: other processes shared the cores, so times are inflated)" : "") +
    `. Mie kernel: ${mieKernelName}.`,
  "",
  "## Lorenz–Mie kernel, one core",
  "",
  "W1: m = 1.333, Θ = 0–180° by 0.1° (1,801 angles). W2: m = 1.333, x = 3,000, Θ = 120–150° by 0.01° (3,001 angles).",
  "W3: m = 1.333 + 1e-8 i, x = 50,000, Θ = 130–145° by 0.05° (301 angles). Term-angles: partial waves × angles per",
  "second in the amplitude loop. The scalar column is the TypeScript reference kernel on the same inputs.",
  "",
  "| workload | terms | angles | coefficients (ms) | amplitudes (ms) | scalar amplitudes (ms) | term-angles/s | scalar term-angles/s |",
  "|---|---|---|---|---|---|---|---|",
  ...mie.map(
    (r) =>
      `| ${r.workload.name} | ${r.nTerms} | ${r.angles} | ${r.coefficientsMs.toFixed(2)} | ${r.amplitudesMs.toFixed(1)} | ${r.scalarMs.toFixed(1)} | ${M(r.termAnglesPerSecond)} | ${M(r.scalarTermAnglesPerSecond)} |`,
  ),
  "",
  "### Against other programs",
  "",
  "The anchors are whole-process times of other programs measured elsewhere, on another machine: start-up, input,",
  "output and the computation. Ours are in-process compute times on this machine (coefficients + amplitudes, warm",
  "JIT, no start-up, no output). The ratio (anchor ÷ ours, > 1 means ours is faster) is therefore an optimistic",
  "comparison of the computation only and says nothing about the machines' relative speed.",
  "",
  "| workload | ours (s) | MIEV0 0.044 / 0.060 s | scattnlay 0.173 / 0.285 s | miepython 6.1 / 10.0 s |",
  "|---|---|---|---|---|",
  ...anchored.map((r) => {
    const a = r.workload.anchors!;
    const ours = compute(r);
    return `| ${r.workload.name} | ${ours.toFixed(4)} | ${(a.miev0 / ours).toFixed(2)}× | ${(a.scattnlay / ours).toFixed(1)}× | ${(a.miepython / ours).toFixed(0)}× |`;
  }),
  "",
  "## Whole profiles through the kernel cache (in-process: no HTTP)",
  "",
  "Worker threads as the service runs them (KernelService + createWorkerPool). Cold: an empty kernel cache, on threads",
  "that have already served one other request (the default profile with the water 1 °C warmer: other kernels, warm JIT).",
  "First: an empty cache on a pool created for the request with no warm-up (thread start-up and JIT included).",
  `Started: an empty cache on a pool started ${STARTED_WAIT_MS / 1000} s earlier, whose threads ran the service's start-up warm-up`,
  "(WORKER_WARM_UP_ROUNDS, lib/bow/warm-up.ts) — a freshly started service's first request. The disk-tier row",
  "starts on an empty cache folder (cold: computing while packs are written after the answer); from disk: an empty",
  "memory reading that folder, as after a restart. Warm: the same",
  "request again on the filled cache (median of 5). Cores: the process's CPU time (all threads) during the cold",
  "request over its wall time — below the worker count when other processes held the cores. Mie rate: Mie",
  "term-angles per second of cold wall time. Kernel cache: bytes held after the request.",
  "",
  "| workload | workers | cold (ms) | cores busy | Mie rate | first (ms) | started (ms) | from disk (ms) | warm (ms) | Mie term-angles | kernel cache (MiB) |",
  "|---|---|---|---|---|---|---|---|---|---|---|",
  ...profiles.map(
    (r) =>
      `| ${r.name} | ${r.workers} | ${r.coldMs.toFixed(0)} | ${r.coldCores.toFixed(2)} | ${M(r.mieTermAngles / (r.coldMs / 1000))} | ${r.firstMs === null ? "–" : r.firstMs.toFixed(0)} | ${r.startedMs === null ? "–" : r.startedMs.toFixed(0)} | ${r.fromDiskMs === null ? "–" : r.fromDiskMs.toFixed(0)} | ${r.warmMs === null ? "–" : r.warmMs.toFixed(1)} | ${r.mieTermAngles.toExponential(2)} | ${(r.kernelBytes / 2 ** 20).toFixed(1)} |`,
  ),
  "",
  p3Scaling === null ? "P3 not run (`--quick`)." : `P3 speed-up from 1 to 2 workers: ${p3Scaling.toFixed(2)}×.`,
  "",
  "## HTTP, warm (result cache filled)",
  "",
  "The service (2 kernel workers, no rate limit) on 127.0.0.1, driven from the same process with node's fetch: the",
  "client shares the server's event loop, so requests/s is a lower bound. The first request computes; 50 sequential",
  "requests follow (lone-request latency), then requests with a fixed number in flight.",
  "",
  "| request | requests | in flight | requests/s | lone request (ms) | latency in flight (ms) | body bytes |",
  "|---|---|---|---|---|---|---|",
  ...http.map(
    (r) =>
      `| ${r.name} | ${r.requests} | ${r.inFlight} | ${r.requestsPerSecond.toFixed(0)} | ${r.sequentialMedianMs.toFixed(2)} | ${r.medianLatencyMs.toFixed(2)} | ${r.bytes} |`,
  ),
  "",
];
// bench/load.ts and bench/outage.ts keep their own sections between markers: carry them over unchanged.
const target = repoPath("BENCHMARKS.md");
const previous = existsSync(target) ? readFileSync(target, "utf8") : "";
for (const kept of keptSections(previous)) lines.push(kept, "");
writeFileSync(target, lines.join("\n"));
console.log("wrote BENCHMARKS.md");

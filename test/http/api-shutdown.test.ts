// SIGTERM to the API process (`node dist/http/main.js`, no Redis): a request in flight is answered, and the process
// exits as soon as it is, not at the end of its grace; a second signal exits at once.
import { describe, it, expect, afterEach } from "vitest";
import { freePort } from "../helpers/free-port.js";
import { API_MAIN, startService, statusOf, waitFor, type ServiceProcess } from "../helpers/service-process.js";

const GRACE_MS = 20_000;
/** When work still in flight would be abandoned: a quarter of the grace, at most 3 s, before its end (shutdown.ts). */
const ABANDON_AFTER_MS = GRACE_MS - 3000;

let api: ServiceProcess | undefined;
afterEach(() => {
  if (api?.running()) api.process.kill("SIGKILL");
});

async function startApi(): Promise<string> {
  const port = await freePort();
  api = startService("api", API_MAIN, { PORT: String(port), CACHE_DIR: "", SHUTDOWN_GRACE_MS: String(GRACE_MS), LOG_LEVEL: "info" });
  const base = `http://127.0.0.1:${port}`;
  // /readyz, not /healthz: it is answered only once the load-shedding check has its first sample.
  await waitFor("the API", async () => ((await statusOf(`${base}/readyz`)) === 200 ? true : undefined), [api], 30_000);
  return base;
}

/** Resolves once the API has logged the render request's arrival (so that the signal comes while it is in flight). */
async function arrived(): Promise<void> {
  await waitFor("the request to arrive", () => (api!.lines.some((l) => l.includes('"incoming request"') && l.includes("/v1/profile")) ? true : undefined), [api!]);
}

/** A cold default profile: long enough to be in flight when the signal comes. */
function render(base: string): Promise<number | string> {
  return fetch(`${base}/v1/profile?format=png`, { method: "POST", headers: { "content-type": "application/json" }, body: "{}" }).then(
    async (res) => (await res.arrayBuffer(), res.status),
    () => "cut off",
  );
}

describe("SIGTERM to the API process", () => {
  it("answers the request in flight, then exits at once (its kept-alive connection does not hold it open)", async () => {
    const base = await startApi();
    const inFlight = render(base);
    await arrived();
    const started = performance.now();
    api!.process.kill("SIGTERM");
    const status = await inFlight;
    const answeredMs = performance.now() - started;
    const code = await api!.exited;
    const exitedMs = performance.now() - started;
    expect(status).toBe(200);
    expect(code).toBe(0);
    // It did not wait for the abandon time of the grace: it stopped once the answer was out.
    if (answeredMs < ABANDON_AFTER_MS) expect(exitedMs).toBeLessThan(ABANDON_AFTER_MS);
  }, 60_000);

  it("exits at once on a second signal, with a request in flight", async () => {
    const base = await startApi();
    const inFlight = render(base);
    await arrived();
    const started = performance.now();
    api!.process.kill("SIGTERM");
    api!.process.kill("SIGINT");
    expect(await api!.exited).toBe(130);
    expect(performance.now() - started).toBeLessThan(ABANDON_AFTER_MS);
    await inFlight;
  }, 60_000);
});

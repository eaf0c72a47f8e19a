// API and worker processes as deployed (`node dist/...`, built by `npm test`), with their output kept for
// assertions and for the message of a test that times out.
import { spawn, type ChildProcess } from "node:child_process";
import { join } from "node:path";
import { fileURLToPath } from "node:url";

export const repo = fileURLToPath(new URL("../..", import.meta.url));
export const API_MAIN = "dist/http/main.js";
export const WORKER_MAIN = "dist/pipeline/jobs/worker-main.js";

export interface ServiceProcess {
  name: string;
  process: ChildProcess;
  lines: string[];
  /** Resolves with the exit code (or signal name) when the process has ended. */
  exited: Promise<number | string>;
  running(): boolean;
  /** Lines that are JSON log events with this msg (and, if given, this job id). */
  events(msg: string, id?: string): Record<string, unknown>[];
}

export function startService(name: string, script: string, env: Record<string, string>): ServiceProcess {
  const child = spawn(process.execPath, [join(repo, script)], {
    cwd: repo,
    env: {
      ...process.env,
      WORKERS: "1",
      HOST: "127.0.0.1",
      LOG_LEVEL: "warn",
      // Load shedding and rate limits must not answer for the machinery under test.
      MAX_EVENT_LOOP_DELAY_MS: "600000",
      RATE_LIMIT_PER_MINUTE: "0",
      WORKER_WARM_UP_ROUNDS: "0",
      ...env,
    },
    stdio: ["ignore", "pipe", "pipe"],
  });
  const lines: string[] = [];
  let rest = "";
  const collect = (chunk: Buffer) => {
    rest += chunk.toString("utf8");
    const parts = rest.split("\n");
    rest = parts.pop()!;
    lines.push(...parts);
  };
  child.stdout!.on("data", collect);
  child.stderr!.on("data", collect);
  const exited = new Promise<number | string>((resolve) => child.once("exit", (code, signal) => resolve(code ?? signal ?? "?")));
  const service: ServiceProcess = {
    name,
    process: child,
    lines,
    exited,
    running: () => child.exitCode === null && child.signalCode === null,
    events: (msg, id) =>
      lines.flatMap((line) => {
        if (!line.startsWith("{")) return [];
        try {
          const event = JSON.parse(line) as Record<string, unknown>;
          return event.msg === msg && (id === undefined || event.id === id) ? [event] : [];
        } catch {
          return [];
        }
      }),
  };
  process.once("exit", () => {
    if (service.running()) child.kill("SIGKILL");
  });
  return service;
}

/** Polls until probe gives a value; on timeout the error shows the last lines of each process. */
export async function waitFor<T>(what: string, probe: () => Promise<T | undefined> | T | undefined, services: ServiceProcess[], timeoutMs = 20_000): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const value = await probe();
    if (value !== undefined) return value;
    if (Date.now() > end) {
      const logs = services.map((s) => `--- ${s.name}\n${s.lines.slice(-15).join("\n")}`).join("\n");
      throw new Error(`timed out waiting for ${what}\n${logs}`);
    }
    await new Promise((r) => setTimeout(r, 100));
  }
}

/** The status of GET url, or 0 when nothing answers. */
export async function statusOf(url: string): Promise<number> {
  return (await fetch(url).catch(() => undefined))?.status ?? 0;
}

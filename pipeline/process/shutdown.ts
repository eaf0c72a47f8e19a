// SIGTERM and SIGINT for the API and worker processes: the first starts an orderly stop that must end within the
// grace time (SHUTDOWN_GRACE_MS), whatever Redis does; a second signal, or the end of the grace, exits at once.

export interface ShutdownDeadlines {
  /** When work still in hand is abandoned (a worker gives its job back, the API aborts requests in flight). */
  abandonAt: number;
  /** When the process exits whatever is still open. */
  exitAt: number;
}

/**
 * The least time kept at the end of the grace: what a stopping worker may spend after it abandons its job, each step
 * bounded (pipeline/jobs/redis-worker.ts): the give-back's two Redis commands and, when the job stays in hand (a
 * finished render waiting for an absent Redis to store it), dropping the connection, 0.5 s each, then 0.25 s kept
 * before the exit for stopping the kernel threads; 2 s leaves room for the event loop (our choice).
 */
export const LEAST_CLOSING_RESERVE_MS = 2000;

/**
 * The time kept at the end of the grace for giving work back and closing connections: a quarter of the grace, at
 * least LEAST_CLOSING_RESERVE_MS and at most 3 s (our choice), never more than the grace itself.
 */
export function deadlines(graceMs: number, startedAt: number = Date.now()): ShutdownDeadlines {
  const reserveMs = Math.min(graceMs, Math.min(3000, Math.max(LEAST_CLOSING_RESERVE_MS, graceMs / 4)));
  return { abandonAt: startedAt + graceMs - reserveMs, exitAt: startedAt + graceMs };
}

export function exitOnSignals(options: {
  graceMs: number;
  log: (event: Record<string, unknown>) => void;
  /** The orderly stop; the process exits with 0 when it resolves (1 if it throws). */
  stop: (deadlines: ShutdownDeadlines) => Promise<void>;
}): void {
  let stopping = false;
  const onSignal = (signal: NodeJS.Signals) => {
    if (stopping) {
      options.log({ msg: "second signal: exiting at once", signal });
      process.exit(130);
    }
    stopping = true;
    const plan = deadlines(options.graceMs);
    options.log({ msg: "shutting down", signal, graceMs: options.graceMs });
    setTimeout(() => {
      options.log({ msg: "grace time over: exiting with work still open" });
      process.exit(1);
    }, options.graceMs);
    options.stop(plan).then(
      () => process.exit(0),
      (error: unknown) => {
        options.log({ msg: "error while shutting down", error: String(error) });
        process.exit(1);
      },
    );
  };
  process.on("SIGTERM", onSignal);
  process.on("SIGINT", onSignal);
}

// Requests that share one caller signal put one "abort" listener on it, not one each, and take it off when they end.
// Node warns (MaxListenersExceededWarning) past 10 listeners on one signal (Node.js docs, events.defaultMaxListeners).
import { describe, it, expect } from "vitest";
import { getEventListeners } from "node:events";
import { linkAbort } from "../../../pipeline/kernels/abort-link.js";
import { KernelService, type KernelCompute } from "../../../pipeline/kernels/kernel-service.js";
import { createInlinePool } from "../../../pipeline/kernels/worker-pool.js";
import { computeProfile } from "../../../pipeline/compute/profile.js";
import { profileRequestSchema } from "../../../schemas/profile.js";

const listeners = (signal: AbortSignal) => getEventListeners(signal, "abort").length;

describe("linkAbort", () => {
  it("one listener for any number of links; none once all are unlinked", () => {
    const caller = new AbortController();
    const unlinks = Array.from({ length: 50 }, () => linkAbort(caller.signal, new AbortController()));
    expect(listeners(caller.signal)).toBe(1);
    unlinks.forEach((unlink) => unlink());
    expect(listeners(caller.signal)).toBe(0);
    // A second unlink changes nothing, and a new link adds the listener again.
    unlinks[0]();
    const again = linkAbort(caller.signal, new AbortController());
    expect(listeners(caller.signal)).toBe(1);
    again();
    expect(listeners(caller.signal)).toBe(0);
  });

  it("aborting the caller aborts the linked controllers with its reason, not the unlinked ones", () => {
    const caller = new AbortController();
    const [a, b, c] = [new AbortController(), new AbortController(), new AbortController()];
    linkAbort(caller.signal, a);
    const unlinkB = linkAbort(caller.signal, b);
    linkAbort(caller.signal, c);
    unlinkB();
    const reason = new Error("client gone");
    caller.abort(reason);
    expect(a.signal.reason).toBe(reason);
    expect(c.signal.reason).toBe(reason);
    expect(b.signal.aborted).toBe(false);
    expect(listeners(caller.signal)).toBe(0);
  });

  it("no signal, or one already aborted, links nothing", () => {
    const done = new AbortController();
    done.abort();
    const own = new AbortController();
    linkAbort(done.signal, own)();
    linkAbort(undefined, own)();
    expect(own.signal.aborted).toBe(false);
  });
});

describe("kernel requests sharing one signal", () => {
  it("twenty profiles at once on one signal: at most one listener on it while they run, none after, no warning", async () => {
    const caller = new AbortController();
    const inline = createInlinePool();
    let most = 0;
    // Every kernel task looks at the caller's signal while the twenty requests are under way.
    const compute: KernelCompute = async (task, signal) => {
      most = Math.max(most, listeners(caller.signal));
      await new Promise((resolve) => setImmediate(resolve));
      return inline.compute(task, signal);
    };
    const kernels = new KernelService({ memoryBudgetBytes: 2 ** 26, compute });
    const warnings: Error[] = [];
    const onWarning = (w: Error) => warnings.push(w);
    process.on("warning", onWarning);
    try {
      const bodies = Array.from({ length: 20 }, (_, k) =>
        profileRequestSchema.parse({
          drops: { kind: "monodisperse", radiusUm: 5 + k },
          angles: { fromDeg: 40, toDeg: 43, stepDeg: 0.5 },
          spectral: { fromNm: 500, toNm: 600, stepNm: 20 },
          method: "mie",
        }),
      );
      await Promise.all(bodies.map((body) => computeProfile(body, { kernels, limits: { maxTermAngles: Infinity }, signal: caller.signal })));
      await new Promise((resolve) => setImmediate(resolve));
    } finally {
      process.off("warning", onWarning);
    }
    expect(most).toBe(1);
    expect(listeners(caller.signal)).toBe(0);
    expect(warnings.filter((w) => w.name === "MaxListenersExceededWarning")).toEqual([]);
  });
});

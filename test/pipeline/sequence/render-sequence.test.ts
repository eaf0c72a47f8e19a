import { describe, expect, it } from "vitest";
import { extract } from "tar-stream";
import { Readable } from "node:stream";
import { createHash } from "node:crypto";
import { builtInRenderers } from "../../../pipeline/jobs/renderers.js";
import { renderSequence, frameMoments } from "../../../pipeline/sequence/render-sequence.js";
import { asSequenceJob } from "../../../pipeline/sequence/sequence-job.js";
import { KernelService } from "../../../pipeline/kernels/kernel-service.js";
import { createInlinePool } from "../../../pipeline/kernels/worker-pool.js";
import { ClientError } from "../../../pipeline/requests/client-error.js";
import type { JobRequest } from "../../../schemas/jobs.js";
import { openFrame, sealFrame, type FrameStore } from "../../../pipeline/sequence/frame-store.js";
import type { RenderOutput } from "../../../pipeline/render/render-output.js";
import type { RendererRegistry } from "../../../pipeline/jobs/renderers.js";

/** Frames kept in memory, sealed as the Redis store keeps them; `renders` counts the frames rendered. */
function memoryStore(held = new Map<number, Buffer>()): FrameStore & { held: Map<number, Buffer> } {
  return {
    held,
    kept: async () => new Map([...held].flatMap(([k, sealed]): [number, RenderOutput][] => {
      const output = openFrame(sealed);
      return output ? [[k, output]] : [];
    })),
    keep: async (k, output) => void held.set(k, sealFrame(output)),
    discard: async () => held.clear(),
  };
}

function counting(registry: RendererRegistry, endpoint: string): { registry: RendererRegistry; renders: () => number } {
  let renders = 0;
  const inner = registry[endpoint];
  return { registry: { ...registry, [endpoint]: { ...inner, render: (b, q, d) => (renders++, inner.render(b, q, d)) } }, renders: () => renders };
}

async function untar(archive: Buffer): Promise<Map<string, Buffer>> {
  const files = new Map<string, Buffer>();
  const ex = extract();
  ex.on("entry", (header, stream, next) => {
    const chunks: Buffer[] = [];
    stream.on("data", (c: unknown) => chunks.push(c as Buffer));
    stream.on("end", () => {
      files.set(header.name, Buffer.concat(chunks));
      next();
    });
  });
  await new Promise<void>((resolve, reject) => {
    ex.on("finish", resolve);
    ex.on("error", reject);
    Readable.from(archive).pipe(ex);
  });
  return files;
}

// An invented hillside at 47.2° N, 8.4° E on an evening with the sun setting (about 19:25 UTC) during the span.
const at = { utc: "2026-06-21T18:00:00Z", latitudeDeg: 47.2, longitudeDeg: 8.4 };
const quick = { angles: { fromDeg: 36, toDeg: 56, stepDeg: 0.5 }, spectral: { fromNm: 400, toNm: 700, stepNm: 20 }, sun: { at } };
const kernels = new KernelService({ memoryBudgetBytes: 2 ** 27, compute: createInlinePool().compute });
const deps = { kernels, maxTermAngles: Infinity };

describe("sequences", () => {
  it("frame k of a sequence equals the single render at that moment, byte for byte; the manifest states times, positions and hashes", { timeout: 120_000 }, async () => {
    const job = asSequenceJob({ endpoint: "profile", body: quick, query: { format: "png", height: 4 }, sequence: { fromUtc: "2026-06-21T18:00:00Z", toUtc: "2026-06-21T20:00:00Z", frames: 3 } } as unknown as JobRequest, builtInRenderers);
    const progress: string[] = [];
    const out = await renderSequence(job.body, builtInRenderers, { ...deps, onProgress: (p) => progress.push(p.stage) });
    expect(out.contentType).toBe("application/x-tar");
    const files = await untar(out.body);
    expect([...files.keys()]).toEqual(["frame-0001.png", "frame-0002.png", "frame-0003.png", "manifest.json"]);
    const manifest = JSON.parse(files.get("manifest.json")!.toString("utf8"));
    expect(manifest.frames.map((f: { utc: string }) => f.utc)).toEqual(["2026-06-21T18:00:00.000Z", "2026-06-21T19:00:00.000Z", "2026-06-21T20:00:00.000Z"]);
    // The sun sinks through the span and is below the horizon at 20:00 UTC: that frame is black, not an error.
    const elevations = manifest.frames.map((f: { sourcePosition: { elevationDeg: number } }) => f.sourcePosition.elevationDeg);
    expect(elevations[0]).toBeGreaterThan(elevations[1]);
    expect(elevations[2]).toBeLessThan(0);
    // Each frame's own progress moves the fraction within it; the stage counts frames.
    expect(progress.filter((stage, k) => stage !== progress[k - 1])).toEqual(["frame 1 of 3", "frame 2 of 3", "frame 3 of 3", "done"]);
    for (let k = 0; k < 3; k++) {
      const single = builtInRenderers.profile;
      const body = single.body.parse({ ...quick, sun: { at: { ...at, utc: frameMoments(job.body.sequence)[k], belowHorizon: "black" } } });
      const alone = await single.render(body, single.query.parse({ format: "png", height: 4 }), deps);
      const frame = files.get(`frame-000${k + 1}.png`)!;
      expect(frame.equals(alone.body), `frame ${k + 1}`).toBe(true);
      expect(manifest.frames[k].sha256).toBe(createHash("sha256").update(frame).digest("hex"));
    }
  });

  it("refuses a sequence without a place, over the frame limit, or of an endpoint that has no moment", () => {
    const make = (over: object) => () => asSequenceJob({ endpoint: "profile", body: quick, query: {}, sequence: { fromUtc: "2026-06-21T18:00:00Z", toUtc: "2026-06-21T19:00:00Z", frames: 2 }, ...over } as unknown as JobRequest, builtInRenderers);
    const fieldOf = (f: () => unknown) => {
      try {
        f();
      } catch (e) {
        return e instanceof ClientError ? e.details.field : String(e);
      }
      return "no error";
    };
    expect(fieldOf(make({ body: { angles: quick.angles } }))).toBe("body.sun.at");
    expect(fieldOf(make({ sequence: { fromUtc: "2026-06-21T18:00:00Z", toUtc: "2026-06-21T19:00:00Z", frames: 401 } }))).toBe("sequence.frames");
    expect(fieldOf(make({ sequence: { fromUtc: "2026-06-21T19:00:00Z", toUtc: "2026-06-21T18:00:00Z", frames: 3 } }))).toBe("sequence.toUtc");
    expect(fieldOf(make({ endpoint: "figure-size-map" }))).toBe("endpoint");
  });

  it("resumes from the frames an earlier attempt kept: renders only the missing ones, and the archive is byte-identical", { timeout: 120_000 }, async () => {
    const job = asSequenceJob({ endpoint: "profile", body: quick, query: { format: "png", height: 4 }, sequence: { fromUtc: "2026-06-21T17:00:00Z", toUtc: "2026-06-21T18:00:00Z", frames: 4 } } as unknown as JobRequest, builtInRenderers);
    const first = memoryStore();
    const whole = counting(builtInRenderers, "profile");
    const uninterrupted = await renderSequence(job.body, whole.registry, { ...deps, frames: first });
    expect(whole.renders()).toBe(4);
    expect([...first.held.keys()]).toEqual([0, 1, 2, 3]);

    // An attempt that died after two frames: frames 0 and 1 kept; frame 2's bytes damaged in the store.
    const damaged = Buffer.from(first.held.get(2)!);
    damaged[damaged.length - 1] ^= 0xff;
    const retry = memoryStore(new Map([[0, first.held.get(0)!], [1, first.held.get(1)!], [2, damaged]]));
    const resumed = counting(builtInRenderers, "profile");
    const stages: string[] = [];
    const again = await renderSequence(job.body, resumed.registry, { ...deps, frames: retry, onProgress: (p) => stages.push(p.stage) });
    // Frame 2 does not match its hash: rendered again, with frame 3.
    expect(resumed.renders()).toBe(2);
    expect(again.body.equals(uninterrupted.body)).toBe(true);
    expect(stages[0]).toBe("frame 1 of 4");
  });

  it("a kept frame opens only with the hash it was sealed with", () => {
    const output = { contentType: "image/png", body: Buffer.from([1, 2, 3]), headers: { "x-antisolar-hash": "h" } };
    const sealed = sealFrame(output);
    expect(openFrame(sealed)).toEqual(output);
    const bad = Buffer.from(sealed);
    bad[0] ^= 1;
    expect(openFrame(bad)).toBeUndefined();
    expect(openFrame(sealed.subarray(0, 10))).toBeUndefined();
  });
});

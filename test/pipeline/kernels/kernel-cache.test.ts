// The kernel cache: memory, disk and worker threads give the same numbers as a plain computation, compute each
// row once, and survive corrupt files.
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { mkdir, mkdtemp, readdir, writeFile, readFile, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { createHash } from "node:crypto";
import { crc32 } from "node:zlib";
import request from "supertest";
import type { FastifyInstance } from "fastify";
import { KernelService, type KernelCompute } from "../../../pipeline/kernels/kernel-service.js";
import { DiskStore } from "../../../pipeline/kernels/disk-store.js";
import { createInlinePool, createWorkerPool } from "../../../pipeline/kernels/worker-pool.js";
import { computeProfile } from "../../../pipeline/compute/profile.js";
import { profileRequestSchema } from "../../../schemas/profile.js";
import { buildApp } from "../../../http/app.js";

const body = profileRequestSchema.parse({
  drops: { kind: "lognormal", medianRadiusUm: 30, geometricSd: 1.2, totalNumberPerM3: 1e6 },
  angles: { fromDeg: 36, toDeg: 46, stepDeg: 0.2 },
  spectral: { fromNm: 400, toNm: 700, stepNm: 20 },
  method: "mie",
});
const limits = { maxTermAngles: Infinity };

function counting(compute: KernelCompute) {
  const counter = { tasks: 0, rows: 0 };
  const wrapped: KernelCompute = async (task, signal) => {
    counter.tasks++;
    counter.rows += task.items.reduce((s, it) => s + it.blocks.length, 0);
    return compute(task, signal);
  };
  return { counter, compute: wrapped };
}

let folder: string;
beforeAll(async () => {
  folder = await mkdtemp(join(tmpdir(), "antisolar-kernels-"));
});
afterAll(async () => rm(folder, { recursive: true, force: true }));

describe("kernel cache", () => {
  it("cached, uncached, on-disk and worker-thread results are identical", async () => {
    const inline = createInlinePool();
    const fresh = await computeProfile(body, { kernels: new KernelService({ memoryBudgetBytes: 2 ** 28, compute: inline.compute }), limits });
    const disk = new DiskStore(join(folder, "identical"));
    const first = new KernelService({ memoryBudgetBytes: 2 ** 28, disk, compute: inline.compute });
    await computeProfile(body, { kernels: first, limits });
    const again = await computeProfile(body, { kernels: first, limits });
    expect(again.meta.cache).toBe("hit");
    await first.flush();
    // A second service with an empty memory reads every row back from disk.
    const { counter, compute } = counting(inline.compute);
    const fromDisk = await computeProfile(body, { kernels: new KernelService({ memoryBudgetBytes: 2 ** 28, disk, compute }), limits });
    expect(counter.tasks).toBe(0);
    expect((fromDisk.meta.kernel as { diskHits: number }).diskHits).toBeGreaterThan(0);
    // The threads run warm-up tasks first (other wavelengths and drops): module-level scratch must not leak into rows.
    const pool = createWorkerPool(2, { warmUpRounds: 2 });
    try {
      const threaded = await computeProfile(body, { kernels: new KernelService({ memoryBudgetBytes: 2 ** 28, compute: pool.compute }), limits });
      for (const r of [again, fromDisk, threaded]) {
        expect(Array.from(r.colour.xyz)).toEqual(Array.from(fresh.colour.xyz));
        expect(Array.from(r.spectral.perpendicular)).toEqual(Array.from(fresh.spectral.perpendicular));
      }
    } finally {
      await pool.close();
    }
  });

  it("concurrent requests for the same kernel compute each row once", async () => {
    const { counter, compute } = counting(createInlinePool().compute);
    const kernels = new KernelService({ memoryBudgetBytes: 2 ** 28, compute });
    const results = await Promise.all([1, 2, 3, 4].map(() => computeProfile(body, { kernels, limits })));
    const once = counter.rows;
    expect(results.every((r) => r.colour.xyz.length === results[0].colour.xyz.length)).toBe(true);
    const { counter: single, compute: compute2 } = counting(createInlinePool().compute);
    await computeProfile(body, { kernels: new KernelService({ memoryBudgetBytes: 2 ** 28, compute: compute2 }), limits });
    expect(once).toBe(single.rows);
  });

  it("a corrupt or half-written cache file is detected, dropped and recomputed", async () => {
    const disk = new DiskStore(join(folder, "corrupt"));
    const inline = createInlinePool();
    const writer = new KernelService({ memoryBudgetBytes: 2 ** 28, disk, compute: inline.compute });
    const reference = await computeProfile(body, { kernels: writer, limits });
    await writer.flush();
    const files: string[] = [];
    for (const sub of await readdir(join(folder, "corrupt"))) {
      for (const f of await readdir(join(folder, "corrupt", sub))) files.push(join(folder, "corrupt", sub, f));
    }
    expect(files.length).toBeGreaterThan(1);
    const flipped = await readFile(files[0]);
    flipped[flipped.length - 1] ^= 0xff;
    await writeFile(files[0], flipped);
    const truncated = await readFile(files[1]);
    await writeFile(files[1], truncated.subarray(0, truncated.length >> 1));
    const { counter, compute } = counting(inline.compute);
    const again = await computeProfile(body, { kernels: new KernelService({ memoryBudgetBytes: 2 ** 28, disk, compute }), limits });
    expect(counter.rows).toBeGreaterThanOrEqual(2);
    expect(Array.from(again.colour.xyz)).toEqual(Array.from(reference.colour.xyz));
  });

  it("disk entries: CRC-32 checked (version 2), version-1 files (SHA-256) still read, a flipped bit refused", async () => {
    const store = new DiskStore(join(folder, "versions"));
    const payload = Buffer.from(Float64Array.from({ length: 1000 }, (_, i) => Math.sin(i)).buffer);
    await store.write("two", [payload.subarray(0, 3000), payload.subarray(3000)]);
    const file = await readFile(store.pathOf("two"));
    // CRC-32 check value of the ISO 3309 polynomial: crc32("123456789") = 0xCBF43926 (zlib's documentation).
    expect(crc32("123456789")).toBe(0xcbf43926);
    expect(file.readUInt32LE(4)).toBe(2);
    expect(file.readUInt32LE(16)).toBe(crc32(payload));
    expect(file.length - payload.length).toBe(24);
    expect((await store.read("two"))!.equals(payload)).toBe(true);
    // A version-1 file as the previous release wrote it: magic, version 1, u64 length, SHA-256 of the payload.
    const v1 = Buffer.alloc(48);
    v1.write("ANSK", 0, "latin1");
    v1.writeUInt32LE(1, 4);
    v1.writeBigUInt64LE(BigInt(payload.length), 8);
    createHash("sha256").update(payload).digest().copy(v1, 16);
    await mkdir(dirname(store.pathOf("one")), { recursive: true });
    await writeFile(store.pathOf("one"), Buffer.concat([v1, payload]));
    expect((await store.read("one"))!.equals(payload)).toBe(true);
    file[24 + 4000] ^= 0x01;
    await writeFile(store.pathOf("two"), file);
    expect(await store.read("two")).toBeUndefined();
  });

  it("the memory cache stays within its byte budget", async () => {
    const kernels = new KernelService({ memoryBudgetBytes: 200_000, compute: createInlinePool().compute });
    await computeProfile(body, { kernels, limits });
    expect(kernels.memory.calculatedSize).toBeLessThanOrEqual(200_000);
  });
});

describe("the event loop stays free while kernels compute on worker threads", () => {
  let app: FastifyInstance;
  beforeAll(async () => {
    app = await buildApp({ config: { cacheDir: "", workers: 1 } });
    await app.listen({ port: 0, host: "127.0.0.1" });
  });
  afterAll(async () => app.close());

  it("GET /healthz answers while a cold full-Mie render computes, before the render ends", async () => {
    // No time limit (the machine may be shared): the order of the answers shows that the event loop turns while
    // the kernels compute. A render on the main thread would hold every health check until it ended.
    let rendered = false;
    const render = request(app.server)
      .post("/v1/profile")
      .send({ drops: { kind: "lognormal", medianRadiusUm: 20, geometricSd: 1.3, totalNumberPerM3: 1e7 }, method: "mie", spectral: { fromNm: 380, toNm: 780, stepNm: 20 } })
      .then((r) => {
        rendered = true;
        return r;
      });
    await new Promise((r) => setTimeout(r, 150));
    let answeredDuringRender = 0;
    for (let i = 0; i < 5; i++) {
      const res = await request(app.server).get("/healthz");
      expect(res.status).toBe(200);
      if (!rendered) answeredDuringRender++;
      await new Promise((r) => setTimeout(r, 50));
    }
    const done = await render;
    expect(done.status).toBe(200);
    // The render takes ~1.8 s of one thread on a quiet machine; five checks 50 ms apart all fit inside it.
    expect(answeredDuringRender).toBeGreaterThanOrEqual(3);
  });
});

describe("wavelengths told as their rows arrive (KernelWatch.onWavelength)", () => {
  it("each wavelength with rows to compute is told once, when all its rows are in, with the rows the request returns", async () => {
    const inline = createInlinePool();
    const { counter, compute } = counting(inline.compute);
    const kernels = new KernelService({ memoryBudgetBytes: 2 ** 28, compute });
    // Every second wavelength cached whole first (its own request), so the full request computes the others only.
    const { planProfile } = await import("../../../pipeline/compute/profile.js");
    const plan = planProfile(body);
    const { kernelRequest } = plan;
    const cachedLs = kernelRequest.media.flatMap((_, l) => (l % 2 === 0 ? [l] : []));
    await kernels.rows({ ...kernelRequest, media: cachedLs.map((l) => kernelRequest.media[l]) });
    const before = counter.tasks;
    const told: number[] = [];
    const seen = new Map<number, Float64Array[]>();
    const rows = await kernels.rows(kernelRequest, undefined, {
      onWavelength: (l, row) => {
        told.push(l);
        // Read at once, as the spectral pass does: every row of the wavelength is there.
        seen.set(l, kernelRequest.blocks.flatMap((b) => Array.from(kernelRequest.radiiUm, (_, i) => row(i, b))));
      },
    });
    const computedLs = kernelRequest.media.flatMap((_, l) => (l % 2 === 1 ? [l] : []));
    // One task per wavelength to compute; those are told, each once; the wavelengths found whole are not.
    expect(counter.tasks - before).toBe(computedLs.length);
    expect([...told].sort((a, b) => a - b)).toEqual(computedLs);
    // Looked up wavelength by wavelength (no second tier, no progress): the same counts as a lookup of every row first.
    const perWavelength = kernelRequest.radiiUm.length * kernelRequest.blocks.length;
    expect(rows.stats.memoryHits).toBe(cachedLs.length * perWavelength);
    expect(rows.stats.computed).toBe(computedLs.length * perWavelength);
    for (const [l, list] of seen) {
      const expected = kernelRequest.blocks.flatMap((b) => Array.from(kernelRequest.radiiUm, (_, i) => rows.get(l, i, b)));
      list.forEach((row, k) => expect(row).toBe(expected[k]));
    }
  });
});

describe("rows computed only where a request reads them", () => {
  // On the 0.05° lattice with the 0.533° disc, ψ 36–44° reads lattice points 713–887 and ψ 42–50° 833–1007: block 8
  // (800–899) is read in part by each and whole by neither; ψ 36–50° (713–1007) reads the union.
  const at = (fromDeg: number, toDeg: number) => ({ ...body, angles: { fromDeg, toDeg, stepDeg: 0.2 } });
  it("an overlapping request computes only what is missing, and merged rows serve the union as a fresh cache would", async () => {
    const inline = createInlinePool();
    const fresh = await computeProfile(at(36, 50), { kernels: new KernelService({ memoryBudgetBytes: 2 ** 28, compute: inline.compute }), limits });
    const disk = new DiskStore(join(folder, "partial"));
    const { counter, compute } = counting(inline.compute);
    const kernels = new KernelService({ memoryBudgetBytes: 2 ** 28, disk, compute });
    await computeProfile(at(36, 44), { kernels, limits });
    const firstTasks = counter.tasks;
    const second = await computeProfile(at(42, 50), { kernels, limits });
    expect(counter.tasks).toBeGreaterThan(firstTasks);
    expect((second.meta.kernel as { computed: number }).computed).toBeGreaterThan(0);
    const tasks = counter.tasks;
    const union = await computeProfile(at(36, 50), { kernels, limits });
    expect(union.meta.cache).toBe("hit");
    // Within 1e-9: rows computed on other Θ grids find their ray roots from other table nodes (rounding level).
    const a = fresh.spectral.perpendicular;
    const b = union.spectral.perpendicular;
    for (let j = 0; j < a.length; j++) expect(Math.abs(b[j] - a[j])).toBeLessThanOrEqual(1e-9 * Math.abs(a[j]) + 1e-300);
    // The disk packs kept the merged rows too.
    await kernels.flush();
    const reread = new KernelService({ memoryBudgetBytes: 2 ** 28, disk, compute });
    expect((await computeProfile(at(36, 50), { kernels: reread, limits })).meta.cache).toBe("hit");
    expect(counter.tasks).toBe(tasks);
  });

  it("kernelRows leaves NaN outside the range asked for and the same numbers inside", async () => {
    const { kernelRows } = await import("../../../lib/bow/kernel-rows.js");
    const medium = { wavelengthNm: 520, mRe: 1.3349, mIm: 1e-9, nAir: 1.000277 };
    const items = [{ radiusUm: 25, engine: "mie" as const, blocks: [7, 8] }, { radiusUm: 400, engine: "airy" as const, blocks: [7, 8] }];
    const whole = kernelRows({ medium, h: 0.05, items, mieSampling: "lattice" });
    const part = kernelRows({ medium, h: 0.05, items, within: { first: 760, last: 812 }, mieSampling: "lattice" });
    // On a sub-lattice (the default for this 25 µm drop) a value depends on the drop and the lattice point alone.
    const wholeSub = kernelRows({ medium, h: 0.05, items });
    const partSub = kernelRows({ medium, h: 0.05, items, within: { first: 760, last: 812 } });
    for (let s = 0; s < 100; s++) if (800 + s <= 812) expect(partSub.rows[0][1][s]).toBe(wholeSub.rows[0][1][s]);
    expect(partSub.mieTermAngles).toBeLessThan(wholeSub.mieTermAngles);
    for (let item = 0; item < 2; item++) {
      for (const [k, b] of [7, 8].entries()) {
        const full = whole.rows[item][k];
        const row = part.rows[item][k];
        for (let s = 0; s < 100; s++) {
          const index = b * 100 + s;
          for (const half of [0, 100]) {
            if (index < 760 || index > 812) expect(row[half + s]).toBeNaN();
            else expect(Math.abs(row[half + s] - full[half + s])).toBeLessThanOrEqual(1e-9 * Math.abs(full[half + s]) + 1e-300);
          }
        }
      }
    }
    // 53 of 200 lattice points: about a quarter of the Mie work.
    expect(part.mieTermAngles / whole.mieTermAngles).toBeCloseTo(53 / 200, 6);
  });
});

describe("kernel rows", () => {
  it("do not depend on which other blocks the same task computes (gaps between blocks included)", async () => {
    // Regression: blocks 0 and 9 in one task once gave a Θ grid with a gap, which the ray and Airy bins read as
    // evenly spaced, and put a false caustic at ψ ≈ 12°. Rows must equal those computed block by block.
    const { kernelRows } = await import("../../../lib/bow/kernel-rows.js");
    const medium = { wavelengthNm: 560, mRe: 1.3339, mIm: 0, nAir: 1.000277 };
    const together = kernelRows({ medium, h: 0.05, items: [{ radiusUm: 300, engine: "airy", blocks: [0, 9] }, { radiusUm: 40, engine: "mie", blocks: [2] }] });
    for (const [item, blocks] of [[0, [0, 9]], [1, [2]]] as const) {
      const radiusUm = item === 0 ? 300 : 40;
      const engine = item === 0 ? "airy" : "mie";
      blocks.forEach((b, k) => {
        const alone = kernelRows({ medium, h: 0.05, items: [{ radiusUm, engine, blocks: [b] }] }).rows[0][0];
        const row = together.rows[item][k];
        // 1e-9: bins on a longer grid find their ray roots from other table nodes (rounding-level differences).
        for (let j = 0; j < alone.length; j++) expect(Math.abs(row[j] - alone[j])).toBeLessThanOrEqual(1e-9 * Math.abs(alone[j]) + 1e-300);
      });
    }
  });
});

// A sequence previewed in the page: the camera view over a span of time runs as a background job (POST /v1/jobs
// with "sequence"), its progress shown as it runs; the returned archive's frames are then shown on a scrubber.

import { runAsJob } from "./job-runner.js";

const BLOCK = 512;

/**
 * The regular files of a POSIX tar archive (ustar format: 512-byte header blocks, name at 0, size in octal at 124,
 * type flag at 156, name prefix at 345; IEEE Std 1003.1-2017, pax, "ustar Interchange Format"), name → bytes.
 */
export function untar(buffer) {
  const bytes = new Uint8Array(buffer);
  const decoder = new TextDecoder();
  const text = (from, length) => decoder.decode(bytes.subarray(from, from + length)).replace(/\0[\s\S]*$/, "");
  const files = new Map();
  for (let at = 0; at + BLOCK <= bytes.length; ) {
    const name = text(at, 100);
    // Two zero blocks end the archive.
    if (!name) break;
    const size = parseInt(text(at + 124, 12).trim() || "0", 8);
    const type = text(at + 156, 1);
    const prefix = text(at + 345, 155);
    const start = at + BLOCK;
    if (type === "0" || type === "") files.set(prefix ? `${prefix}/${name}` : name, bytes.slice(start, start + size));
    at = start + Math.ceil(size / BLOCK) * BLOCK;
  }
  return files;
}

/**
 * Renders `frames` camera views of `viewBody` from fromUtc to toUtc as one job and resolves with the frames:
 * { bitmap (the decoded PNG, for a canvas: no blob: URL, so the page's CSP stays same-origin), utc, elevationDeg }
 * in order. The caller closes the bitmaps.
 */
export async function renderSequencePreview({ viewBody, fromUtc, toUtc, frames, signal, bar }) {
  const res = await runAsJob("view", viewBody, { format: "png" }, signal, bar, { sequence: { fromUtc, toUtc, frames } });
  const files = untar(await res.arrayBuffer());
  const manifest = JSON.parse(new TextDecoder().decode(files.get("manifest.json")));
  return Promise.all(
    manifest.frames.map(async (f) => ({
      bitmap: await createImageBitmap(new Blob([files.get(f.file)], { type: "image/png" })),
      utc: f.utc,
      elevationDeg: f.sourcePosition?.elevationDeg ?? null,
    })),
  );
}

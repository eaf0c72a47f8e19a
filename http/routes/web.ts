// The explorer page: a fixed list of static files read once at start-up, plus the spectrum loci it draws.

import { readFileSync } from "node:fs";
import { join } from "node:path";
import type { FastifyInstance, FastifyReply } from "fastify";
import { repoPath } from "../../pipeline/config/resources.js";
import { ClientError } from "../../pipeline/requests/client-error.js";
import { cieXyz1931TwoDeg } from "../../lib/data/cie-xyz-1931-2deg.js";
import { cieXyz1964TenDeg } from "../../lib/data/cie-xyz-1964-10deg.js";

/** Only these names are served; a request for anything else is a 404, so no path can leave web/. */
const WEB_FILES: ReadonlyMap<string, string> = new Map([
  ["index.html", "text/html; charset=utf-8"],
  ["styles.css", "text/css; charset=utf-8"],
  ["app.js", "text/javascript; charset=utf-8"],
  ["request-body.js", "text/javascript; charset=utf-8"],
  ["display-colour.js", "text/javascript; charset=utf-8"],
  ["svg.js", "text/javascript; charset=utf-8"],
  ["strip.js", "text/javascript; charset=utf-8"],
  ["profile-plot.js", "text/javascript; charset=utf-8"],
  ["chromaticity.js", "text/javascript; charset=utf-8"],
  ["sky-view.js", "text/javascript; charset=utf-8"],
  ["job-runner.js", "text/javascript; charset=utf-8"],
  ["sequence-preview.js", "text/javascript; charset=utf-8"],
  ["icon.svg", "image/svg+xml"],
]);

/** Every resource the page loads comes from this origin; nothing inline, no frames, no plugins. */
export const WEB_CONTENT_SECURITY_POLICY = [
  "default-src 'self'",
  "script-src 'self'",
  "style-src 'self'",
  "img-src 'self'",
  "connect-src 'self'",
  "object-src 'none'",
  "base-uri 'none'",
  "form-action 'none'",
  "frame-ancestors 'none'",
].join("; ");

const SECURITY_HEADERS: Record<string, string> = {
  "content-security-policy": WEB_CONTENT_SECURITY_POLICY,
  "x-content-type-options": "nosniff",
  "referrer-policy": "no-referrer",
  "x-frame-options": "DENY",
  "cross-origin-opener-policy": "same-origin",
  "cross-origin-resource-policy": "same-origin",
  "permissions-policy": "camera=(), microphone=(), geolocation=(), payment=(), usb=()",
  "cache-control": "no-cache",
};

interface CmfTable {
  startNm: number;
  stepNm: number;
  count: number;
  columns: { xBar: Float64Array; yBar: Float64Array; zBar: Float64Array };
}

/** Chromaticity of each monochromatic stimulus, x = x̄/(x̄+ȳ+z̄) (CIE 015:2018 §7.3), every stepNm. */
export function spectrumLocus(table: CmfTable, fromNm: number, toNm: number, stepNm: number) {
  const points: { wavelengthNm: number; x: number; y: number }[] = [];
  for (let nm = fromNm; nm <= toNm; nm += stepNm) {
    const i = Math.round((nm - table.startNm) / table.stepNm);
    const { xBar, yBar } = table.columns;
    // The CIE 1964 file leaves z̄ empty (read as NaN) above 555 nm, where it is zero.
    const zBar = Number.isNaN(table.columns.zBar[i]) ? 0 : table.columns.zBar[i];
    const sum = xBar[i] + yBar[i] + zBar;
    points.push({ wavelengthNm: nm, x: Number((xBar[i] / sum).toFixed(5)), y: Number((yBar[i] / sum).toFixed(5)) });
  }
  return points;
}

const LOCUS_ATTRIBUTION =
  "CIE 2019 colour-matching functions (ISO/CIE 11664-1:2019), CC BY-SA 4.0, International Commission on Illumination; chromaticities derived from them, same licence";

function locusFile(observer: string, table: CmfTable): string {
  // 380–700 nm: beyond 700 nm the locus stays on one point and below 380 nm the tabulated ratios are noisy.
  return JSON.stringify({ observer, source: LOCUS_ATTRIBUTION, points: spectrumLocus(table, 380, 700, 5) });
}

function send(reply: FastifyReply, type: string, body: string | Buffer) {
  return reply.headers(SECURITY_HEADERS).type(type).send(body);
}

/** Serves GET / and GET /web/<file> from the whitelist; call once on the app before it listens. */
export async function registerWeb(app: FastifyInstance): Promise<void> {
  const folder = repoPath("web");
  const files = new Map<string, { type: string; body: Buffer }>();
  for (const [name, type] of WEB_FILES) files.set(name, { type, body: readFileSync(join(folder, name)) });
  files.set("locus-cie1931-2.json", { type: "application/json; charset=utf-8", body: Buffer.from(locusFile("cie1931-2", cieXyz1931TwoDeg)) });
  files.set("locus-cie1964-10.json", { type: "application/json; charset=utf-8", body: Buffer.from(locusFile("cie1964-10", cieXyz1964TenDeg)) });

  const index = files.get("index.html")!;
  app.get("/", async (_request, reply) => send(reply, index.type, index.body));
  app.get("/web/:file", async (request, reply) => {
    const name = (request.params as { file: string }).file;
    const file = files.get(name);
    if (!file) throw new ClientError("not-found", "no such page file; the explorer is at /");
    return send(reply, file.type, file.body);
  });
}

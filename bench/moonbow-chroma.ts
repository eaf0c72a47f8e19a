// npm run check:moonbow-chroma: the eye / camera chroma table of docs/checks.md ("Vision at low light"): a moonbow's
// colourfulness for the eye at the scene's own adapting level over the camera's, by moon elevation and phase, through
// POST /v1/profile exactly as a client sends it. Prints the table as Markdown.
import { buildApp } from "../http/app.js";
import { chromaSpread } from "../lib/colour/chroma-spread.js";

const QUICK = { angles: { fromDeg: 36, toDeg: 56, stepDeg: 0.25 }, spectral: { fromNm: 380, toNm: 780, stepNm: 10 } };
const CASES = [
  { label: "full", phaseAngleDeg: 0, elevationDeg: 2 },
  { label: "full", phaseAngleDeg: 0, elevationDeg: 10 },
  { label: "full", phaseAngleDeg: 0, elevationDeg: 20 },
  { label: "full", phaseAngleDeg: 0, elevationDeg: 30 },
  { label: "full", phaseAngleDeg: 0, elevationDeg: 40 },
  { label: "phase 30°", phaseAngleDeg: 30, elevationDeg: 30 },
  { label: "phase 30°", phaseAngleDeg: 30, elevationDeg: 40 },
];

const app = await buildApp({ config: { cacheDir: "", workers: 2, maxEventLoopDelayMs: 0, rateLimitPerMinute: 0 } });
await app.ready();
const profile = async (body: object) => {
  const res = await app.inject({ method: "POST", url: "/v1/profile", payload: body });
  if (res.statusCode !== 200) throw new Error(`${res.statusCode}: ${res.body}`);
  return res.json() as { xyz: number[][]; meta: { vision: { adaptingLuminanceCdPerM2: number; adaptationCoefficientM: number } } };
};

console.log("| moon | elevation | adapting Lp (cd/m²) | m | eye / camera |");
console.log("|---|---:|---:|---:|---:|");
for (const c of CASES) {
  const body = { ...QUICK, moon: { elevationDeg: c.elevationDeg, phaseAngleDeg: c.phaseAngleDeg }, output: { normalise: "physical", space: "xyz-d65" } };
  const camera = await profile(body);
  const eye = await profile({ ...body, output: { ...body.output, vision: "eye" } });
  const v = eye.meta.vision;
  const ratio = chromaSpread(eye.xyz) / chromaSpread(camera.xyz);
  console.log(`| ${c.label} | ${c.elevationDeg}° | ${v.adaptingLuminanceCdPerM2.toExponential(1)} | ${v.adaptationCoefficientM.toFixed(3)} | ${ratio.toFixed(3)} |`);
}
await app.close();

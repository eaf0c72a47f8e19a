// The explorer: reads the form, asks POST /v1/profile for a quick preview, draws it, and runs full-resolution exports.

import { writeForm, readForm, firstInvalid, curlCommand, costNote, PREVIEW_STEP_NM } from "./request-body.js";
import { displayColours } from "./display-colour.js";
import { drawStrip } from "./strip.js";
import { drawProfilePlot } from "./profile-plot.js";
import { drawChromaticity } from "./chromaticity.js";
import { drawSkyView } from "./sky-view.js";
import { runAsJob, tooCostly } from "./job-runner.js";
import { renderSequencePreview } from "./sequence-preview.js";

const $ = (id) => document.getElementById(id);
const form = $("controls");
const status = $("status");
const elapsed = $("elapsed");
const cancelButton = $("cancel");
const jobBar = { progress: $("job-progress"), text: $("job-progress-text") };

const state = {
  preview: null, // AbortController of the running preview
  downloads: new Set(), // AbortControllers of running exports
  busy: new Map(), // token → { label, started }
  last: null, // { body, profile, colours }
  lastMeta: null,
  loci: new Map(),
  debounce: 0,
  ticker: 0,
  pitchTouched: false,
};

// ---------- busy indicator ----------

function announce(text) {
  status.textContent = text;
}

function startBusy(label) {
  const token = Symbol(label);
  state.busy.set(token, { label, started: performance.now() });
  announce(`${label}…`);
  refreshBusy();
  return token;
}

function endBusy(token, message, isError = false) {
  state.busy.delete(token);
  if (message !== undefined) announce(message);
  document.body.dataset.state = state.busy.size ? "busy" : isError ? "error" : "ready";
  refreshBusy();
}

function refreshBusy() {
  const running = [...state.busy.values()];
  cancelButton.disabled = running.length === 0;
  if (running.length) document.body.dataset.state = "busy";
  clearInterval(state.ticker);
  const tick = () => {
    const oldest = running.reduce((a, b) => (a.started < b.started ? a : b), running[0]);
    elapsed.textContent = oldest ? `${oldest.label}: ${((performance.now() - oldest.started) / 1000).toFixed(1)} s` : "";
  };
  tick();
  if (running.length) state.ticker = setInterval(tick, 100);
}

cancelButton.addEventListener("click", () => {
  state.preview?.abort();
  for (const c of state.downloads) c.abort();
});

// ---------- form ----------

function updateVisibility() {
  const kind = form.elements.namedItem("dropsKind").value;
  for (const el of form.querySelectorAll("[data-kinds]")) el.hidden = !el.dataset.kinds.split(" ").includes(kind);
  const spectrum = form.elements.namedItem("spectrum").value;
  for (const el of form.querySelectorAll("[data-spectra]")) el.hidden = !el.dataset.spectra.split(" ").includes(spectrum);
  const temperature = $("colour-temperature");
  // Ranges of the service's schema: CIE daylight 4000–25000 K, blackbody 1000–50000 K.
  [temperature.min, temperature.max] = spectrum === "cie-daylight" ? ["4000", "25000"] : ["1000", "50000"];
  $("polariser").disabled = !$("polariser-on").checked;
  $("elevation-value").textContent = `${$("elevation").value}°`;
  const shape = form.elements.namedItem("dropShape").value;
  for (const el of form.querySelectorAll("[data-shape]")) el.hidden = el.dataset.shape !== shape;
  $("arc-position-value").textContent = `${$("arc-position").value}°`;
  const scrub = Number($("scrub").value);
  $("scrub-value").textContent = scrub === 0 ? "±0 h" : `${scrub > 0 ? "+" : "−"}${Math.floor(Math.abs(scrub) / 60)} h ${String(Math.abs(scrub) % 60).padStart(2, "0")} min`;
  const light = form.elements.namedItem("light").value;
  const position = form.elements.namedItem("positionBy").value;
  for (const el of form.querySelectorAll("[data-light], [data-position]")) {
    el.hidden = (el.dataset.light !== undefined && el.dataset.light !== light) || (el.dataset.position !== undefined && el.dataset.position !== position);
  }
  // A sequence is a span of time: it needs the position by place and time.
  $("sequence-render").disabled = position !== "place-and-time";
}

/** The light's apparent elevation: as computed by the service for a place and time, else as given. */
function sourceElevationDeg(body, meta) {
  return meta?.sourcePosition?.elevationDeg ?? (body.moon ?? body.sun).elevationDeg ?? 10;
}

function fullBody() {
  return readForm(form, Number($("full-step").value));
}

function updateCurl() {
  $("curl").value = curlCommand(location.origin, fullBody(), $("curl-format").value, stripHeight());
}

function stripHeight() {
  const v = $("strip-height").valueAsNumber;
  return Number.isInteger(v) && v >= 1 && v <= 4096 ? v : 64;
}

function updateEstimate(body) {
  const note = costNote(body, state.lastMeta);
  $("estimate").textContent = note.text;
  if (note.warning) {
    const strong = document.createElement("strong");
    strong.textContent = ` ${note.warning}`;
    $("estimate").append(strong);
  }
}

function settingsChanged() {
  updateVisibility();
  state.preview?.abort();
  // The figures show the previous settings until the next preview arrives.
  if (state.last) $("results").dataset.stale = "true";
  clearTimeout(state.debounce);
  const invalid = firstInvalid(form);
  if (invalid) {
    announce(`Not sent: ${invalid.message}`);
    document.body.dataset.state = "error";
    return;
  }
  updateCurl();
  const body = readForm(form, PREVIEW_STEP_NM);
  updateEstimate(body);
  state.debounce = setTimeout(() => renderPreview(body), 350);
}

form.addEventListener("input", (event) => {
  // The preset loads on "change"; the export step does not alter the preview.
  if (event.target.id !== "preset" && event.target.id !== "full-step") settingsChanged();
});
form.addEventListener("change", (event) => {
  if (event.target.id === "preset") loadPreset(event.target.value);
});
form.addEventListener("submit", (event) => event.preventDefault());

async function loadPreset(name) {
  let body = {};
  $("preset-note").textContent = "Pick a preset to load all of its settings, then adjust any of them.";
  if (name) {
    const res = await fetch(`/v1/presets/${encodeURIComponent(name)}`);
    if (!res.ok) {
      announce(`Could not load the preset: ${res.status}`);
      return;
    }
    const preset = await res.json();
    body = preset.body;
    $("preset-note").textContent = preset.description;
  }
  writeForm(form, body);
  settingsChanged();
}

// ---------- preview ----------

async function locusFor(observer) {
  if (!state.loci.has(observer)) {
    state.loci.set(
      observer,
      fetch(`/web/locus-${observer}.json`).then((r) => r.json()),
    );
  }
  return state.loci.get(observer);
}

function errorText(err) {
  if (!err || typeof err !== "object") return "the service did not answer";
  return [err.message ?? err.error, err.field ? `(field ${err.field})` : "", err.allowed ? `allowed: ${err.allowed}` : ""].filter(Boolean).join(" ");
}

async function renderPreview(body) {
  const controller = new AbortController();
  state.preview = controller;
  const token = startBusy("Rendering the preview");
  const started = performance.now();
  try {
    let res = await fetch("/v1/profile", {
      method: "POST",
      headers: { "content-type": "application/json", accept: "application/json" },
      body: JSON.stringify(body),
      signal: controller.signal,
    });
    let data = await res.json();
    if (tooCostly(res.status, data)) {
      // Beyond the synchronous limit: the same render as a background job, with its progress bar.
      announce("Rendering the preview as a background job (beyond the synchronous limit)…");
      res = await runAsJob("profile", body, { format: "json" }, controller.signal, jobBar);
      data = await res.json();
    }
    if (!res.ok) {
      endBusy(token, `The service refused this preview: ${errorText(data)}`, true);
      return;
    }
    const locus = await locusFor(body.observer);
    if (controller.signal.aborted) {
      endBusy(token);
      return;
    }
    show(body, data, locus);
    state.lastMeta = data.meta;
    if (body.drops.shape) await profilesAlongArc(body, data, controller.signal);
    updateEstimate(body);
    const roundTrip = (performance.now() - started) / 1000;
    document.body.dataset.renders = String(Number(document.body.dataset.renders) + 1);
    endBusy(token, `Preview ready: ${(data.meta.computeMs / 1000).toFixed(2)} s on the server, ${roundTrip.toFixed(2)} s in all.`);
  } catch (error) {
    if (error.name === "AbortError") endBusy(token, "Stopped; change a setting to render again.");
    else endBusy(token, `The preview failed: ${error.message}`, true);
  } finally {
    if (state.preview === controller) state.preview = null;
  }
}

/** Arc positions whose profiles the camera preview blends for flattened drops (its side and top, and between). */
const SKETCH_ARCS_DEG = [0, 45, 90];

/** POST /v1/profile, as a background job when it is beyond the synchronous limit. */
async function profileAnswer(body, signal) {
  let res = await fetch("/v1/profile", {
    method: "POST",
    headers: { "content-type": "application/json", accept: "application/json" },
    body: JSON.stringify(body),
    signal,
  });
  let data = await res.json();
  if (tooCostly(res.status, data)) {
    res = await runAsJob("profile", body, { format: "json" }, signal, jobBar);
    data = await res.json();
  }
  if (!res.ok) throw new Error(errorText(data));
  return data;
}

/**
 * Flattened drops: the profiles at SKETCH_ARCS_DEG (the one already shown is reused), so that the camera preview
 * shows the bow changing from its top to its side. Each keeps its brightness relative to the others.
 */
async function profilesAlongArc(body, shown, signal) {
  const nodes = [];
  for (const arcDeg of SKETCH_ARCS_DEG) {
    announce(`Computing the bow at ${arcDeg}° along the arc for the camera view…`);
    const profile = arcDeg === body.arcPositionDeg ? shown : await profileAnswer({ ...body, arcPositionDeg: arcDeg }, signal);
    nodes.push({ arcDeg, profile, colours: displayColours(profile) });
  }
  if (signal.aborted || state.last?.body !== body) return;
  state.last.alongArc = nodes;
  drawSky();
}

function show(body, profile, locus) {
  $("results").dataset.stale = "false";
  const colours = displayColours(profile);
  state.last = { body, profile, colours };
  drawStrip($("strip"), profile, colours);
  drawProfilePlot($("profile-plot"), profile);
  drawChromaticity($("chromaticity"), profile, locus, colours);
  drawSky();
  showWarnings(profile, colours);
  $("sources").replaceChildren(
    ...profile.meta.sources.map((s) => {
      const li = document.createElement("li");
      li.textContent = s;
      return li;
    }),
  );
}

function showWarnings(profile, colours) {
  const items = [...profile.meta.warnings];
  const outside = profile.outOfGamut.filter(Boolean).length;
  const space = $("space").querySelector(`option[value="${profile.space}"]`)?.textContent ?? profile.space;
  if (outside) items.push(`${outside} of ${profile.outOfGamut.length} samples lie outside the ${space} gamut and were brought inside it.`);
  if (colours.derived) items.push(`The strip and previews show sRGB converted from XYZ; downloads are in ${space}.`);
  $("warnings").replaceChildren(
    ...items.map((text) => {
      const li = document.createElement("li");
      li.textContent = text;
      return li;
    }),
  );
}

/** Until the tilt slider is moved, aim half-way up the highest bow so both arcs and the horizon are in view. */
function autoPitch(body, profile) {
  const highestDeg = profile.bows.secondaryDeg ?? profile.bows.primaryDeg ?? 42;
  const pitch = Math.round(Math.min(Math.max((highestDeg - sourceElevationDeg(body, profile.meta)) / 2, 0), 60));
  $("pitch").value = String(pitch);
}

function drawSky() {
  if (state.last && !state.pitchTouched) autoPitch(state.last.body, state.last.profile);
  $("pitch-value").textContent = `${$("pitch").value}°`;
  $("fov-value").textContent = `${$("fov").value}°`;
  if (!state.last) return;
  const { body, profile, colours } = state.last;
  drawSkyView($("sky"), profile, colours, {
    alongArc: state.last.alongArc,
    sunElevationDeg: sourceElevationDeg(body, profile.meta),
    pitchDeg: Number($("pitch").value),
    hfovDeg: Number($("fov").value),
    water: $("water").checked,
  });
  const { primaryDeg } = profile.bows;
  $("sky").setAttribute(
    "aria-label",
    `Camera view facing away from the sun, tilted ${$("pitch").value}° up with a ${$("fov").value}° field of view; ` +
      `the ${body.moon ? "moon" : "sun"} is ${Number(sourceElevationDeg(body, profile.meta).toFixed(2))}° high behind the camera` +
      (primaryDeg !== null ? `, the primary bow is a circle of ${primaryDeg.toFixed(1)}° radius around the antisolar point.` : ".") +
      (state.last.alongArc ? ` Flattened drops: the bow is blended from profiles at ${SKETCH_ARCS_DEG.join("°, ")}° along the arc.` : ""),
  );
  $("sky").dataset.alongArc = state.last.alongArc ? SKETCH_ARCS_DEG.join(",") : "";
}

$("pitch").addEventListener("input", () => {
  state.pitchTouched = true;
  drawSky();
});
$("fov").addEventListener("input", drawSky);
$("water").addEventListener("change", drawSky);

// ---------- exports ----------

function saveBlob(blob, fileName) {
  const url = URL.createObjectURL(blob);
  const a = document.createElement("a");
  a.href = url;
  a.download = fileName;
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

/** The scene's physics without what the texture and camera endpoints decide themselves. */
function scenarioOf(body, { keepSunElevation }) {
  const { angles, output, polariserDeg, ...scenario } = body;
  if (!keepSunElevation) {
    // A view takes the light's position beside the scenario: the moon, or the sun's place and time, move out.
    delete scenario.moon;
    if (scenario.sun) {
      const { elevationDeg, at, ...sun } = scenario.sun;
      scenario.sun = sun;
    }
  }
  return { scenario, angles, polariserDeg };
}

/** The light's position for POST /v1/view, looking south-ish as the page's sky does (azimuth 180°). */
function viewLight(b) {
  if (b.moon) return { moon: { ...b.moon, azimuthDeg: 180 } };
  return { sun: b.sun.at ? { at: b.sun.at } : { azimuthDeg: 180, elevationDeg: b.sun.elevationDeg } };
}

/** The EXR downloads' layer choice as a query: by scattering order adds the layers beside the combined channels. */
function exrLayers() {
  return $("exr-layers").value === "by-order" ? "&layers=by-order" : "";
}

/** Ending of an EXR file's name: which layers it holds. */
function exrExt(kind) {
  return `-${kind}${$("exr-layers").value === "by-order" ? "-by-order" : ""}.exr`;
}

/** Every export: which endpoint, with what body, to which file. */
const exportKinds = {
  json: { label: "JSON profile", url: () => "/v1/profile?format=json", body: (b) => b, ext: ".json" },
  png: { label: "8-bit PNG strip", url: () => `/v1/profile?format=png&height=${stripHeight()}`, body: (b) => b, ext: "-8bit.png" },
  png16: { label: "16-bit PNG strip", url: () => `/v1/profile?format=png16&height=${stripHeight()}`, body: (b) => b, ext: "-16bit.png" },
  svg: { label: "labelled SVG figure", url: () => "/v1/profile?format=svg", body: (b) => b, ext: "-figure.svg" },
  chromaticity: { label: "chromaticity diagram (SVG)", url: () => "/v1/figure/chromaticity", body: (b) => b, ext: "-chromaticity.svg" },
  "lut-exr": {
    label: "lookup texture (OpenEXR, ACEScg)",
    url: () => `/v1/lut?format=exr${exrLayers()}`,
    body: (b) => lutBody(b),
    ext: () => exrExt("lut"),
  },
  "lut-ktx2": { label: "lookup texture (KTX2, RGBA16F, ACEScg)", url: () => "/v1/lut?format=ktx2", body: (b) => lutBody(b), ext: "-lut.ktx2" },
  "lut-by-hour": {
    label: "time-of-day texture (KTX2 array, 16 sun elevations 0°–45°)",
    url: () => "/v1/lut?format=ktx2",
    body: (b) => ({ ...lutBody(b, { keepSunElevation: false }), sunElevations: { fromDeg: 0, toDeg: 45, slices: 16 } }),
    ext: "-lut-by-hour.ktx2",
  },
  "lut-manifest": { label: "lookup texture manifest", url: () => "/v1/lut?part=manifest", body: (b) => lutBody(b), ext: "-lut-manifest.json" },
  "view-exr": {
    label: "camera view (OpenEXR, premultiplied RGBA)",
    url: () => `/v1/view?format=exr${exrLayers()}`,
    body: (b) => viewBody(b, viewLight(b), 1280, 720),
    ext: () => exrExt("view"),
  },
  "sky-exr": {
    label: "sky map (OpenEXR, equirectangular, premultiplied RGBA)",
    url: () => `/v1/sky?format=exr${exrLayers()}`,
    body: (b) => {
      // The view's scene without the camera: a sky map takes no camera and no image-plane polariser.
      const { camera, polariserDeg, ...sky } = viewBody(b, viewLight(b), 2048, 1024);
      return { ...sky, widthPx: 2048, heightPx: 1024 };
    },
    ext: () => exrExt("sky"),
  },
};

/** POST /v1/view's body for the page's scene, camera (tilt, field of view, water) and the given light. */
function viewBody(b, light, widthPx, heightPx) {
  const { scenario, polariserDeg } = scenarioOf(b, { keepSunElevation: false });
  // A view's scenario has no Lorenz–Mie size density of its own (the service chooses it): sent, it is a 400.
  const { mieSizesPerDecade, ...viewScenario } = scenario;
  return {
    scenario: viewScenario,
    camera: { horizontalFovDeg: Number($("fov").value), pitchDeg: Number($("pitch").value), widthPx, heightPx },
    ...light,
    output: { vision: b.output.vision },
    ...(polariserDeg === undefined ? {} : { polariserDeg }),
    ...($("water").checked ? { waterSurface: { kind: "calm" } } : {}),
  };
}

function lutBody(b, { keepSunElevation } = { keepSunElevation: true }) {
  const { scenario, angles } = scenarioOf(b, { keepSunElevation });
  if (b.polariserDeg !== undefined) scenario.polariserDeg = b.polariserDeg;
  return { scenario, sizes: { kind: "none" }, angles: { fromDeg: angles.fromDeg, toDeg: angles.toDeg, texels: 512, mapping: "bow-weighted" } };
}

async function download(format) {
  const invalid = firstInvalid(form);
  if (invalid) {
    announce(`Not sent: ${invalid.message}`);
    return;
  }
  const kind = exportKinds[format];
  const body = kind.body(fullBody());
  const controller = new AbortController();
  state.downloads.add(controller);
  const token = startBusy(`Rendering the ${kind.label} at ${fullBody().spectral.stepNm} nm`);
  try {
    let res = await fetch(kind.url(), {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify(body),
      signal: controller.signal,
    });
    if (res.status === 422) {
      const refusal = await res.clone().json().catch(() => null);
      if (tooCostly(res.status, refusal)) {
        const url = new URL(kind.url(), location.origin);
        // /v1/profile → profile, /v1/figure/chromaticity → figure-chromaticity: the job endpoints' names.
        const endpoint = url.pathname.slice("/v1/".length).replace("/", "-");
        res = await runAsJob(endpoint, body, Object.fromEntries(url.searchParams), controller.signal, jobBar);
      }
    }
    if (!res.ok) {
      endBusy(token, `The service refused the export: ${errorText(await res.json().catch(() => null))}`, true);
      return;
    }
    const blob = await res.blob();
    let hash = res.headers.get("x-antisolar-hash");
    if (format === "json") hash = JSON.parse(await blob.text()).meta.hash;
    const fileName = `antisolar-${String(hash).slice(0, 10)}${typeof kind.ext === "function" ? kind.ext() : kind.ext}`;
    saveBlob(blob, fileName);
    endBusy(token, `Saved ${fileName} (${(blob.size / 1024).toFixed(1)} kB).`);
  } catch (error) {
    endBusy(token, error.name === "AbortError" ? "Export stopped." : `The export failed: ${error.message}`, error.name !== "AbortError");
  } finally {
    state.downloads.delete(controller);
  }
}

for (const format of Object.keys(exportKinds)) $(`download-${format}`)?.addEventListener("click", () => download(format));
$("strip-height").addEventListener("input", updateCurl);
$("curl-format").addEventListener("change", updateCurl);
$("full-step").addEventListener("change", updateCurl);

$("copy-curl").addEventListener("click", async () => {
  updateCurl();
  try {
    await navigator.clipboard.writeText($("curl").value);
    announce("The curl command is on the clipboard.");
  } catch {
    $("curl").select();
    announce("Copying was not allowed here: the command is selected, press Ctrl+C (⌘C) to copy it.");
  }
});

// ---------- sequence preview ----------

/** Frames of the last sequence preview (decoded images, closed when the next one arrives). */
let sequenceFrames = [];

function showSequenceFrame() {
  const k = Number($("sequence-scrub").value);
  const frame = sequenceFrames[k];
  if (!frame) return;
  const canvas = $("sequence-frame");
  const ctx = canvas.getContext("2d");
  ctx.clearRect(0, 0, canvas.width, canvas.height);
  ctx.drawImage(frame.bitmap, 0, 0, canvas.width, canvas.height);
  canvas.dataset.frame = String(k);
  const elevation = frame.elevationDeg === null ? "" : `, ${light()} ${frame.elevationDeg.toFixed(1)}° high`;
  $("sequence-scrub-value").textContent = `frame ${k + 1} of ${sequenceFrames.length}: ${frame.utc.slice(0, 16).replace("T", " ")} UTC${elevation}`;
  canvas.setAttribute("aria-label", `Camera view at ${frame.utc}${elevation}`);
}

function light() {
  return form.elements.namedItem("light").value === "moon" ? "moon" : "sun";
}

async function renderSequence() {
  const invalid = firstInvalid(form) ?? firstInvalid($("sequence-settings"));
  if (invalid) {
    announce(`Not sent: ${invalid.message}`);
    return;
  }
  // The preview's spectral step: a preview of the frames, not the export.
  const b = readForm(form, PREVIEW_STEP_NM);
  const at = (b.moon ?? b.sun).at;
  if (!at) {
    announce("A sequence needs the light's position by place and time.");
    return;
  }
  const fromMs = Date.parse(`${$("moment").value}:00Z`);
  const fromUtc = new Date(fromMs).toISOString();
  const toUtc = new Date(fromMs + Number($("sequence-hours").value) * 3_600_000).toISOString();
  const frames = Number($("sequence-frames").value);
  const position = { at: { ...at, utc: fromUtc } };
  const viewLightAt = b.moon ? { moon: position } : { sun: position };
  const controller = new AbortController();
  state.downloads.add(controller);
  const token = startBusy(`Rendering ${frames} frames as a background job`);
  try {
    const rendered = await renderSequencePreview({ viewBody: viewBody(b, viewLightAt, 320, 180), fromUtc, toUtc, frames, signal: controller.signal, bar: jobBar });
    for (const f of sequenceFrames) f.bitmap.close();
    sequenceFrames = rendered;
    $("sequence-scrub").max = String(rendered.length - 1);
    $("sequence-scrub").value = "0";
    $("sequence-viewer").hidden = false;
    $("sequence-viewer").dataset.frames = String(rendered.length);
    showSequenceFrame();
    endBusy(token, `Sequence ready: ${rendered.length} frames from ${fromUtc.slice(0, 16)} to ${toUtc.slice(0, 16)} UTC; drag the slider to move through them.`);
  } catch (error) {
    endBusy(token, error.name === "AbortError" ? "Sequence stopped." : `The sequence failed: ${error.message}`, error.name !== "AbortError");
  } finally {
    state.downloads.delete(controller);
  }
}

$("sequence-render").addEventListener("click", renderSequence);
$("sequence-scrub").addEventListener("input", showSequenceFrame);

// ---------- start ----------

async function start() {
  try {
    const res = await fetch("/v1/presets");
    const { presets } = await res.json();
    for (const p of presets) $("preset").append(new Option(p.title, p.name));
  } catch {
    announce("Could not list the presets; the defaults are loaded.");
  }
  // /?preset=<name> opens on a preset, so a scene can be shared as a link.
  const wanted = new URLSearchParams(location.search).get("preset");
  if (wanted && [...$("preset").options].some((o) => o.value === wanted)) {
    $("preset").value = wanted;
    await loadPreset(wanted);
    return;
  }
  writeForm(form, {});
  settingsChanged();
}

start();

// Between the form and POST /v1/profile: fill the form from a body, read a body back, and describe its cost.

/** The service's defaults (see /openapi.json) for fields a preset may leave out. */
const DEFAULTS = {
  drops: { kind: "marshall-palmer", rainRateMmPerH: 2 },
  water: { temperatureC: 15, salinityPsu: 0 },
  sun: { spectrum: { kind: "astm-g173", column: "extraterrestrial" }, elevationDeg: 10, discDeg: 0.5329, limbDarkening: "neckel-labs-1994" },
  observer: "cie1931-2",
  angles: { fromDeg: 30, toDeg: 60, stepDeg: 0.1 },
  method: "auto",
  mieSizesPerDecade: "auto",
  pathLengthM: 1000,
  output: { space: "srgb", gamut: "css4", normalise: "peak", white: "sun", vision: "camera" },
};

const DROP_FIELDS = {
  "marshall-palmer": { rainRateMmPerH: 2 },
  monodisperse: { radiusUm: 250, numberPerM3: 1000 },
  lognormal: { medianRadiusUm: 10, geometricSd: 1.4, totalNumberPerM3: 1e8 },
  gamma: { medianVolumeDiameterMm: 1, mu: 2, totalNumberPerM3: 1000 },
};

/** The service's defaults for flattened drops: canting σ (Huang, Bringi & Thurai 2008) and the side of the bow. */
const DEFAULT_CANTING_SD_DEG = 7.5;
const DEFAULT_ARC_POSITION_DEG = 90;

/** The live preview's wavelength step: coarse, so a rain profile answers in about a second or two. */
export const PREVIEW_STEP_NM = 20;

const field = (form, name) => form.elements.namedItem(name);
const numberOf = (form, name) => field(form, name).valueAsNumber;
const setValue = (form, name, value) => {
  field(form, name).value = String(value);
};

/** Puts a request body (a preset's, or {} for the defaults) into the form. */
export function writeForm(form, body) {
  const drops = body.drops ?? DEFAULTS.drops;
  const dropFields = { ...DROP_FIELDS[drops.kind], ...drops };
  setValue(form, "dropsKind", drops.kind);
  for (const name of ["rainRateMmPerH", "radiusUm", "medianRadiusUm", "geometricSd", "medianVolumeDiameterMm", "mu"]) {
    if (dropFields[name] !== undefined) setValue(form, name, dropFields[name]);
  }
  const density = dropFields.numberPerM3 ?? dropFields.totalNumberPerM3;
  if (density !== undefined) setValue(form, "numberPerM3", density);
  setValue(form, "pathLengthM", body.pathLengthM ?? DEFAULTS.pathLengthM);
  // The page offers spheres and equilibrium shapes; a fixed axis ratio (spheroid) is shown as flattened drops.
  const shape = drops.shape ?? { kind: "sphere" };
  setValue(form, "dropShape", shape.kind === "sphere" ? "sphere" : "equilibrium");
  setValue(form, "cantingSdDeg", shape.cantingSdDeg ?? DEFAULT_CANTING_SD_DEG);
  setValue(form, "arcPositionDeg", body.arcPositionDeg ?? DEFAULT_ARC_POSITION_DEG);

  const water = { ...DEFAULTS.water, ...body.water };
  setValue(form, "temperatureC", water.temperatureC);
  setValue(form, "salinityPsu", water.salinityPsu);

  const sun = { ...DEFAULTS.sun, ...body.sun };
  const source = body.moon ?? sun;
  setValue(form, "light", body.moon ? "moon" : "sun");
  setValue(form, "positionBy", source.at ? "place-and-time" : "elevation");
  setValue(form, "elevationDeg", source.elevationDeg ?? DEFAULTS.sun.elevationDeg);
  if (source.at) {
    // The form's moment is UTC to the minute: "2026-06-21T18:30".
    setValue(form, "moment", new Date(source.at.utc).toISOString().slice(0, 16));
    setValue(form, "scrubMinutes", 0);
    setValue(form, "latitudeDeg", source.at.latitudeDeg);
    setValue(form, "longitudeDeg", source.at.longitudeDeg);
  }
  setValue(form, "phaseAngleDeg", body.moon?.phaseAngleDeg ?? 0);
  const spectrum = sun.spectrum;
  setValue(form, "spectrum", spectrum.kind === "astm-g173" ? `astm-g173:${spectrum.column ?? "extraterrestrial"}` : spectrum.kind);
  if (spectrum.kind === "blackbody") setValue(form, "temperatureK", spectrum.temperatureK ?? 5772);
  if (spectrum.kind === "cie-daylight") setValue(form, "temperatureK", spectrum.cctK ?? 5500);
  setValue(form, "discDeg", sun.discDeg);
  setValue(form, "limbDarkening", sun.limbDarkening);

  setValue(form, "method", body.method ?? DEFAULTS.method);
  setValue(form, "mieSizesPerDecade", body.mieSizesPerDecade ?? DEFAULTS.mieSizesPerDecade);
  setValue(form, "observer", body.observer ?? DEFAULTS.observer);
  const output = { ...DEFAULTS.output, ...body.output };
  for (const name of ["space", "gamut", "normalise", "white", "vision"]) setValue(form, name, output[name]);
  field(form, "polariserOn").checked = body.polariserDeg !== undefined;
  setValue(form, "polariserDeg", body.polariserDeg ?? 0);

  const angles = { ...DEFAULTS.angles, ...body.angles };
  setValue(form, "fromDeg", angles.fromDeg);
  setValue(form, "toDeg", angles.toDeg);
  setValue(form, "stepDeg", angles.stepDeg);
}

function dropsFromForm(form) {
  const kind = field(form, "dropsKind").value;
  switch (kind) {
    case "marshall-palmer":
      return { kind, rainRateMmPerH: numberOf(form, "rainRateMmPerH") };
    case "monodisperse":
      return { kind, radiusUm: numberOf(form, "radiusUm"), numberPerM3: numberOf(form, "numberPerM3") };
    case "lognormal":
      return {
        kind,
        medianRadiusUm: numberOf(form, "medianRadiusUm"),
        geometricSd: numberOf(form, "geometricSd"),
        totalNumberPerM3: numberOf(form, "numberPerM3"),
      };
    default:
      return {
        kind,
        medianVolumeDiameterMm: numberOf(form, "medianVolumeDiameterMm"),
        mu: numberOf(form, "mu"),
        totalNumberPerM3: numberOf(form, "numberPerM3"),
      };
  }
}

function spectrumFromForm(form) {
  const choice = field(form, "spectrum").value;
  if (choice.startsWith("astm-g173:")) return { kind: "astm-g173", column: choice.slice("astm-g173:".length) };
  if (choice === "blackbody") return { kind: "blackbody", temperatureK: numberOf(form, "temperatureK") };
  if (choice === "cie-daylight") return { kind: "cie-daylight", cctK: numberOf(form, "temperatureK") };
  return { kind: choice };
}

/** The light's position: its elevation, or a moment (UTC) and a place. */
function positionFromForm(form) {
  if (field(form, "positionBy").value === "elevation") return { elevationDeg: numberOf(form, "elevationDeg") };
  // The scrubber shifts the moment by whole minutes from the date-time field (a preview of a sequence's frames).
  const base = Date.parse(`${field(form, "moment").value}:00Z`);
  const shifted = base + numberOf(form, "scrubMinutes") * 60_000;
  // An unfinished date-time stays as typed: the form's validity check stops it before it is sent.
  const utc = Number.isFinite(shifted) ? new Date(shifted).toISOString().replace(".000Z", "Z") : `${field(form, "moment").value}:00Z`;
  return { at: { utc, latitudeDeg: numberOf(form, "latitudeDeg"), longitudeDeg: numberOf(form, "longitudeDeg") } };
}

/** The light: the sun with its spectrum and disc, or the moon (whose spectrum, brightness and disc the service computes). */
function lightFromForm(form) {
  const position = positionFromForm(form);
  if (field(form, "light").value === "moon") {
    return { moon: position.at ? position : { ...position, phaseAngleDeg: numberOf(form, "phaseAngleDeg") } };
  }
  return { sun: { spectrum: spectrumFromForm(form), ...position, discDeg: numberOf(form, "discDeg"), limbDarkening: field(form, "limbDarkening").value } };
}

/** Reads the whole request body (every field explicit, so a copied command says what it renders). */
export function readForm(form, stepNm) {
  const salty = numberOf(form, "salinityPsu") > 0;
  const body = {
    drops: dropsFromForm(form),
    water: { temperatureC: numberOf(form, "temperatureC"), salinityPsu: numberOf(form, "salinityPsu") },
    ...lightFromForm(form),
    observer: field(form, "observer").value,
    angles: { fromDeg: numberOf(form, "fromDeg"), toDeg: numberOf(form, "toDeg"), stepDeg: numberOf(form, "stepDeg") },
    // Sea water has a refractive index from 400 to 700 nm only (Quan & Fry 1995), so the range narrows with salt.
    spectral: salty ? { fromNm: 400, toNm: 700, stepNm } : { fromNm: 380, toNm: 780, stepNm },
    method: field(form, "method").value,
    mieSizesPerDecade: field(form, "mieSizesPerDecade").value === "auto" ? "auto" : Number(field(form, "mieSizesPerDecade").value),
    pathLengthM: numberOf(form, "pathLengthM"),
    output: {
      space: field(form, "space").value,
      gamut: field(form, "gamut").value,
      normalise: field(form, "normalise").value,
      white: field(form, "white").value,
      vision: field(form, "vision").value,
    },
  };
  if (field(form, "polariserOn").checked) body.polariserDeg = numberOf(form, "polariserDeg");
  if (field(form, "dropShape").value === "equilibrium") {
    body.drops.shape = { kind: "equilibrium", cantingSdDeg: numberOf(form, "cantingSdDeg") };
    body.arcPositionDeg = numberOf(form, "arcPositionDeg");
  }
  return body;
}

/** The first invalid control with its browser message, or null when every visible control is in range. */
export function firstInvalid(form) {
  for (const el of form.elements) {
    if (el.closest("[hidden]") || el.disabled || !el.willValidate) continue;
    if (!el.checkValidity()) {
      const label = form.querySelector(`label[for="${el.id}"]`)?.textContent?.replace(/:.*$/, "").trim() ?? el.name;
      return { element: el, message: `${label}: ${el.validationMessage}` };
    }
  }
  return null;
}

function shellQuote(text) {
  return `'${text.replace(/'/g, `'\\''`)}'`;
}

export function curlCommand(origin, body, format, heightPx) {
  const query = format === "json" ? "" : `?format=${format}&height=${heightPx}`;
  const out = format === "json" ? "profile.json" : "strip.png";
  return [
    `curl -X POST ${shellQuote(`${origin}/v1/profile${query}`)}`,
    `  -H 'content-type: application/json'`,
    `  -d ${shellQuote(JSON.stringify(body))}`,
    `  -o ${out}`,
  ].join(" \\\n");
}

/** A representative drop radius in µm, for the cost note only. */
function typicalRadiusUm(drops) {
  switch (drops.kind) {
    case "monodisperse":
      return drops.radiusUm;
    case "lognormal":
      return drops.medianRadiusUm;
    case "gamma":
      return (drops.medianVolumeDiameterMm * 1000) / 2;
    case "marshall-palmer":
      // D0 = 3.67/Λ for an exponential spectrum (Ulbrich 1983, J. Climate Appl. Meteor. 22, 1764, with μ = 0),
      // Λ = 4.1 R^−0.21 mm⁻¹ (Marshall & Palmer 1948).
      return ((3.67 / (4.1 * drops.rainRateMmPerH ** -0.21)) * 1000) / 2;
  }
  return 0;
}

/** Radius below which "auto" always uses Lorenz–Mie (lib/bow/engine-choice.ts); above it, Mie where affordable. */
const AUTO_AIRY_FROM_RADIUS_UM = 100;

/** A plain-language cost note for the body about to be sent, using the last measured render time. */
export function costNote(body, last) {
  const radiusUm = typicalRadiusUm(body.drops);
  const angles = Math.floor((body.angles.toDeg - body.angles.fromDeg) / body.angles.stepDeg + 1e-9) + 1;
  const wavelengths = Math.round((body.spectral.toNm - body.spectral.fromNm) / body.spectral.stepNm) + 1;
  const parts = [`This preview asks for ${angles} angles × ${wavelengths} wavelengths (every ${body.spectral.stepNm} nm).`];
  if (last) parts.push(`The last one took ${(last.computeMs / 1000).toFixed(2)} s on the server.`);
  let warning = null;
  if (body.method === "mie" && radiusUm >= AUTO_AIRY_FROM_RADIUS_UM) {
    // Series length x + c·x^⅓ + 2, x = 2πr/λ (Wiscombe 1980, Appl. Opt. 19, 1505; c = 6 as in lib/mie/termCount.ts).
    const x = (2 * Math.PI * radiusUm * 1000) / body.spectral.fromNm;
    const terms = Math.ceil(x + 6 * Math.cbrt(x) + 2);
    warning =
      `Lorenz–Mie for drops of about ${Math.round(radiusUm)} µm needs about ${terms.toLocaleString("en")} series terms ` +
      `per wavelength and angle: expect a long render, or a "too costly" refusal. "Auto" gives these bows with Airy theory in a fraction of the time.`;
  } else if (angles > 1000) {
    warning = `${angles} angles is a fine sampling: the render will take longer. A step of 0.1° is enough for most bows.`;
  }
  return { text: parts.join(" "), warning };
}

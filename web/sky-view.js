// A pinhole-camera sketch of the bow: each pixel takes the profile's colour at its angle from the antisolar point.

import { nearestSample, encodeSrgb } from "./display-colour.js";

const RAD = Math.PI / 180;
// Sky and ground tones (linear sRGB) for a grey rain sky; chosen by eye for this preview, not measured.
const SKY_ZENITH = [0.07, 0.1, 0.19];
const SKY_HORIZON = [0.3, 0.33, 0.38];
const GROUND = [0.045, 0.06, 0.04];
const BOW_GAIN = 0.6;
const BOW_GAIN_BELOW_HORIZON = 0.3;

/** Direction of pixel (px, py) for a camera facing the antisolar azimuth, tilted up by pitch: [x, y (up), z (forward)]. */
function pixelDirection(px, py, view) {
  const u = ((px + 0.5) / view.width) * 2 - 1;
  const v = 1 - ((py + 0.5) / view.height) * 2;
  const cx = u * view.tanH;
  const cy = v * view.tanV;
  const y = cy * view.cosP + view.sinP;
  const z = -cy * view.sinP + view.cosP;
  const n = Math.hypot(cx, y, z);
  return [cx / n, y / n, z / n];
}

/** Pixel of a world direction, or null when it is behind the camera. */
function projectDirection([x, y, z], view) {
  const cy = y * view.cosP - z * view.sinP;
  const cz = y * view.sinP + z * view.cosP;
  if (cz <= 1e-6) return null;
  return [((x / cz / view.tanH + 1) / 2) * view.width, ((1 - cy / cz / view.tanV) / 2) * view.height];
}

/** Index of water for the sketch (IAPWS R9-97 at 589 nm, 20 °C: 1.3330, from memory). */
const WATER_INDEX = 1.333;

/** Unpolarised Fresnel reflectance of calm water at this angle of incidence (Born & Wolf 1999 §1.5.2). */
function waterReflectance(incidence) {
  const t = Math.asin(Math.sin(incidence) / WATER_INDEX);
  if (incidence < 1e-6) return ((WATER_INDEX - 1) / (WATER_INDEX + 1)) ** 2;
  const s = Math.sin(incidence - t) / Math.sin(incidence + t);
  const p = Math.tan(incidence - t) / Math.tan(incidence + t);
  return (s * s + p * p) / 2;
}

/** The bow's linear colour along unit direction d about centre c (nearest computed ψ). */
function bowAt(d, c, angles, colours, channel) {
  const cosPsi = d[0] * c[0] + d[1] * c[1] + d[2] * c[2];
  const i = nearestSample(angles, Math.acos(Math.min(Math.max(cosPsi, -1), 1)) / RAD);
  return colours.linear[3 * i + channel];
}

/**
 * Arc position of unit direction d about the antisolar direction a, degrees: 0 straight above it, 90 level with it,
 * 180 below (the page's frame: y up). As lib/view/arc-position.ts.
 */
function arcPositionDeg(d, a) {
  const t = [-a[1] * a[0], 1 - a[1] * a[1], -a[1] * a[2]];
  const n = Math.hypot(t[0], t[1], t[2]) || 1;
  const up = (d[0] * t[0] + d[1] * t[1] + d[2] * t[2]) / n;
  const s = [a[1] * t[2] - a[2] * t[1], a[2] * t[0] - a[0] * t[2], a[0] * t[1] - a[1] * t[0]];
  const side = (d[0] * s[0] + d[1] * s[1] + d[2] * s[2]) / n;
  return Math.atan2(Math.abs(side), up) / RAD;
}

/**
 * Flattened drops: the colours of sample i blended linearly in arc position between the nodes' profiles, each
 * scaled by its peak luminance relative to the brightest node (a sketch: the service's views also align the bows).
 */
function alongArcColour(nodes, alphaDeg, i, channel) {
  let k = 0;
  while (k < nodes.length - 2 && alphaDeg > nodes[k + 1].arcDeg) k++;
  const a = nodes[k];
  const b = nodes[Math.min(k + 1, nodes.length - 1)];
  const w = b.arcDeg > a.arcDeg ? Math.min(Math.max((alphaDeg - a.arcDeg) / (b.arcDeg - a.arcDeg), 0), 1) : 0;
  return (1 - w) * a.scale * a.colours.linear[3 * i + channel] + w * b.scale * b.colours.linear[3 * i + channel];
}

export function drawSkyView(canvas, profile, colours, { sunElevationDeg, pitchDeg, hfovDeg, water = false, alongArc = undefined }) {
  const { width, height } = canvas;
  const ctx = canvas.getContext("2d");
  const tanH = Math.tan((hfovDeg / 2) * RAD);
  const view = { width, height, tanH, tanV: (tanH * height) / width, cosP: Math.cos(pitchDeg * RAD), sinP: Math.sin(pitchDeg * RAD) };
  const antisolar = [0, -Math.sin(sunElevationDeg * RAD), Math.cos(sunElevationDeg * RAD)];
  const image = ctx.createImageData(width, height);
  const angles = profile.anglesDeg;
  // With water: the sunlight it reflects lights the rain from below the horizon (the reflection bow, about the
  // antisolar point mirrored in the horizon), and the water mirrors the sky. Unpolarised in this sketch.
  const mirroredAntisolar = [0, -antisolar[1], antisolar[2]];
  const sunReflectance = waterReflectance((90 - sunElevationDeg) * RAD);
  const brightest = alongArc ? Math.max(...alongArc.map((n) => n.profile.meta.peakLuminanceCdPerM2)) : 1;
  const nodes = alongArc?.map((n) => ({ ...n, scale: brightest > 0 ? n.profile.meta.peakLuminanceCdPerM2 / brightest : 1 }));

  for (let py = 0; py < height; py++) {
    for (let px = 0; px < width; px++) {
      const d = pixelDirection(px, py, view);
      const cosPsi = d[1] * antisolar[1] + d[2] * antisolar[2];
      const psiDeg = Math.acos(Math.min(Math.max(cosPsi, -1), 1)) / RAD;
      const i = nearestSample(angles, psiDeg);
      const above = d[1] >= 0;
      const t = above ? Math.sqrt(d[1]) : 0;
      const gain = above ? BOW_GAIN : BOW_GAIN_BELOW_HORIZON;
      const at = 4 * (py * width + px);
      if (water) {
        const up = above ? d : [d[0], -d[1], d[2]];
        const r = above ? 1 : waterReflectance(Math.PI / 2 - Math.asin(Math.min(1, up[1])));
        const tUp = Math.sqrt(up[1]);
        for (let c = 0; c < 3; c++) {
          const sky = SKY_HORIZON[c] + (SKY_ZENITH[c] - SKY_HORIZON[c]) * tUp;
          const bows = bowAt(up, antisolar, angles, colours, c) + sunReflectance * bowAt(up, mirroredAntisolar, angles, colours, c);
          image.data[at + c] = Math.round(255 * encodeSrgb(r * (sky + BOW_GAIN * bows) + (above ? 0 : (1 - r) * GROUND[c])));
        }
        image.data[at + 3] = 255;
        continue;
      }
      for (let c = 0; c < 3; c++) {
        const base = above ? SKY_HORIZON[c] + (SKY_ZENITH[c] - SKY_HORIZON[c]) * t : GROUND[c];
        const bow = nodes ? alongArcColour(nodes, arcPositionDeg(d, antisolar), i, c) : colours.linear[3 * i + c];
        image.data[at + c] = Math.round(255 * encodeSrgb(base + gain * bow));
      }
      image.data[at + 3] = 255;
    }
  }
  ctx.putImageData(image, 0, 0);
  drawOverlay(ctx, view, antisolar, sunElevationDeg, pitchDeg, hfovDeg);
}

function drawOverlay(ctx, view, antisolar, sunElevationDeg, pitchDeg, hfovDeg) {
  ctx.save();
  ctx.font = "13px system-ui, sans-serif";
  ctx.lineWidth = 1;

  // Horizon: the image of the world's horizontal plane straight ahead and to the sides.
  const left = projectDirection([-Math.sin(80 * RAD), 0, Math.cos(80 * RAD)], view);
  const right = projectDirection([Math.sin(80 * RAD), 0, Math.cos(80 * RAD)], view);
  if (left && right) {
    ctx.strokeStyle = "rgba(255,255,255,0.55)";
    ctx.setLineDash([6, 5]);
    ctx.beginPath();
    ctx.moveTo(left[0], left[1]);
    ctx.lineTo(right[0], right[1]);
    ctx.stroke();
    ctx.setLineDash([]);
    ctx.fillStyle = "rgba(255,255,255,0.85)";
    ctx.fillText("horizon", 8, Math.min(Math.max(left[1] - 6, 14), view.height - 6));
  }

  const a = projectDirection(antisolar, view);
  if (a && a[0] >= 0 && a[0] <= view.width && a[1] >= 0 && a[1] <= view.height) {
    ctx.strokeStyle = "rgba(255,255,255,0.9)";
    ctx.beginPath();
    ctx.arc(a[0], a[1], 6, 0, 2 * Math.PI);
    ctx.moveTo(a[0] - 11, a[1]);
    ctx.lineTo(a[0] + 11, a[1]);
    ctx.moveTo(a[0], a[1] - 11);
    ctx.lineTo(a[0], a[1] + 11);
    ctx.stroke();
    ctx.fillStyle = "rgba(255,255,255,0.9)";
    ctx.fillText("antisolar point", a[0] + 12, a[1] - 8);
  }

  const where = sunElevationDeg >= 0 ? `${sunElevationDeg}° above` : `${-sunElevationDeg}° below`;
  ctx.fillStyle = "rgba(10,14,22,0.62)";
  ctx.fillRect(6, 6, 282, 24);
  ctx.fillStyle = "#fff";
  ctx.fillText(`Sun behind the camera, ${where} the horizon`, 14, 23);
  drawSideView(ctx, view, sunElevationDeg, pitchDeg, hfovDeg);
  ctx.restore();
}

/** Inset seen from the side: the sun behind the observer, the antisolar direction ahead and the camera's field. */
function drawSideView(ctx, view, sunElevationDeg, pitchDeg, hfovDeg) {
  const w = 150;
  const h = 96;
  const x0 = view.width - w - 8;
  const y0 = view.height - h - 8;
  const ox = x0 + w / 2;
  const oy = y0 + h * 0.62;
  const r = 58;
  const vfovDeg = (2 * Math.atan(view.tanV)) / RAD;
  ctx.fillStyle = "rgba(10,14,22,0.66)";
  ctx.fillRect(x0, y0, w, h);
  ctx.save();
  ctx.beginPath();
  ctx.rect(x0, y0, w, h);
  ctx.clip();
  ctx.strokeStyle = "rgba(255,255,255,0.55)";
  ctx.beginPath();
  ctx.moveTo(x0 + 4, oy);
  ctx.lineTo(x0 + w - 4, oy);
  ctx.stroke();
  ctx.fillStyle = "rgba(140,200,255,0.28)";
  ctx.beginPath();
  ctx.moveTo(ox, oy);
  ctx.lineTo(ox + r * Math.cos((pitchDeg + vfovDeg / 2) * RAD), oy - r * Math.sin((pitchDeg + vfovDeg / 2) * RAD));
  ctx.lineTo(ox + r * Math.cos((pitchDeg - vfovDeg / 2) * RAD), oy - r * Math.sin((pitchDeg - vfovDeg / 2) * RAD));
  ctx.closePath();
  ctx.fill();
  const e = sunElevationDeg * RAD;
  const sun = [ox - r * 0.9 * Math.cos(e), oy - r * 0.9 * Math.sin(e)];
  ctx.strokeStyle = "rgba(255,214,120,0.95)";
  ctx.setLineDash([3, 3]);
  ctx.beginPath();
  ctx.moveTo(sun[0], sun[1]);
  ctx.lineTo(ox + r * Math.cos(e), oy + r * Math.sin(e));
  ctx.stroke();
  ctx.setLineDash([]);
  ctx.fillStyle = "#ffd678";
  ctx.beginPath();
  ctx.arc(sun[0], sun[1], 5, 0, 2 * Math.PI);
  ctx.fill();
  ctx.fillStyle = "#fff";
  ctx.beginPath();
  ctx.arc(ox, oy, 3, 0, 2 * Math.PI);
  ctx.fill();
  ctx.restore();
  ctx.font = "11px system-ui, sans-serif";
  ctx.fillStyle = "#fff";
  ctx.fillText("side view", x0 + 6, y0 + 13);
  ctx.fillText("sun", x0 + 6, y0 + h - 6);
  ctx.fillText(`view ${Math.round(hfovDeg)}°`, x0 + w - 52, y0 + h - 6);
}

// The bow strip: one colour per pixel column, on the same ψ scale as the plot drawn under it.

import { nearestSample } from "./display-colour.js";

export function drawStrip(canvas, profile, colours) {
  const { width, height } = canvas;
  const ctx = canvas.getContext("2d");
  const image = ctx.createImageData(width, height);
  const angles = profile.anglesDeg;
  const from = angles[0];
  const to = angles[angles.length - 1];
  for (let x = 0; x < width; x++) {
    const i = nearestSample(angles, from + ((x + 0.5) / width) * (to - from));
    for (let y = 0; y < height; y++) {
      const at = 4 * (y * width + x);
      image.data[at] = colours.encoded[3 * i];
      image.data[at + 1] = colours.encoded[3 * i + 1];
      image.data[at + 2] = colours.encoded[3 * i + 2];
      image.data[at + 3] = 255;
    }
  }
  ctx.putImageData(image, 0, 0);
  const bows = [profile.bows.primaryDeg, profile.bows.secondaryDeg].filter((v) => v !== null).map((v) => v.toFixed(1));
  canvas.setAttribute(
    "aria-label",
    `Colour strip of the bow from ${from}° to ${to}° from the antisolar point` + (bows.length ? `; bows at ${bows.join("° and ")}°` : ""),
  );
}

// What a profile of flattened drops says when a bow is not among the angles asked: along the arc such drops move the
// bows far from the spheres' angles, so an empty answer more often means "elsewhere" than "absent".

import type { BowPeaks } from "../../lib/bow/bow-peaks.js";

/**
 * Warnings for the bows findBowsByDispersion did not find within ψ fromDeg–toDeg. Near the top of the bow the primary
 * of flattened drops lies far inside the spheres' 42°: a 2D ray trace through the vertical outline of 1 mm drops
 * under a sun at 10° puts it at 28.7–30.0° (test/pipeline/compute/flattened-bow-labels.test.ts), and this engine puts
 * that of 1.5 mm drops, canted 7.5°, at about 13° (issue 13's notes, 2026-12-05).
 */
export function flattenedBowNotes(bows: BowPeaks, fromDeg: number, toDeg: number): string[] {
  const window = `ψ ${fromDeg}–${toDeg}°`;
  const notes: string[] = [];
  if (bows.primaryDeg === null) {
    notes.push(
      `no primary bow within ${window} (no luminance maximum there with red outside blue): near the top of the bow flattened drops of 1 mm radius and up move it inwards, below ψ 30° under a low sun; ask angles from a lower ψ to find it`,
    );
  }
  if (bows.secondaryDeg === null) {
    notes.push(`no secondary bow within ${window} (no luminance maximum there with blue outside red, outside the primary): flattened drops move it along the arc; widen the angles to find it`);
  }
  return notes;
}

// The folds of a flattened drop's bows in one scattering plane: their width constant κ (ξ per radian over x^{2/3}) and
// lit side, from the plane's own traced rays (lib/bow/plane-bow-table.ts bowFold, foldConstants), for the Airy kernels of the canting mean by
// rotation (lib/bow/airy-spread.ts). A flattened drop's fold differs from the sphere's of the same volume: measured on
// upright equilibrium drops of 1.5–2.5 mm (sun 10° and 30°, arc 0°, 45°, 90°; issue 13's notes), κ is 0.66–2.05 times
// the sphere's for the primary and 0.78–2.53 times for the secondary, most at the top of the bow, where the plane
// holds the drop's flattened profile.

import type { DropOutline } from "../drops/shape/outline.js";
import { bowScatteringPlane } from "../rays/bow-geometry.js";
import { bowFold, foldConstants } from "./plane-bow-table.js";
import type { FoldKappa } from "./airy-spread.js";
import { shapedPlaneSweeps } from "./shaped-plane-rows.js";

/** The bins the folds are looked for on: Θ 118–153°, which holds both bows of water at every visible wavelength. */
const FOLD_STEP_DEG = 0.05;
const FOLD_THETA_DEG = Float64Array.from({ length: 700 }, (_, j) => 118 + FOLD_STEP_DEG * (j + 0.5));
/** The orders whose folds are the bows. */
const BOW_ORDERS = [2, 3] as const;

/**
 * κ and the lit side of the primary's and the secondary's folds (null where the order has none) in the plane of the
 * upright drop at arc position arcDeg under a sun at sunElevationDeg, at real index n, on the side of the plane the
 * bow is seen on (side +1 of lib/rays/bow-geometry.ts's frame).
 */
export function planeFoldKappas(outline: DropOutline, sunElevationDeg: number, arcDeg: number, n: number): (FoldKappa | null)[] {
  const plane = bowScatteringPlane(sunElevationDeg, arcDeg);
  const setup = { outline, axis: [0, 0, 1] as const, n };
  const sweeps = shapedPlaneSweeps([setup], plane, 1, FOLD_THETA_DEG, FOLD_STEP_DEG, { rayOrders: [], bowOrders: BOW_ORDERS })[0];
  return BOW_ORDERS.map((p) => {
    const sweep = sweeps[p];
    // The fold and its constants only: the bins' table planeBowTable would also build is not needed here.
    const fold = sweep ? bowFold(n, sweep, 1) : null;
    return sweep && fold ? { kappa: foldConstants(sweep, fold).kappa, litSide: fold.litAbove ? 1 : -1 } : null;
  });
}

// A bow's light split by scattering order p, the number of chords a ray travels inside the drop (Debye series:
// van de Hulst 1957 §12.1; Nussenzveig 1969, J. Math. Phys. 10, 82; Hovenac & Lock 1992, J. Opt. Soc. Am. A 9, 781).
// Each named layer holds one order's |S_p|²; what the named layers leave out (p ≥ 4 and, for Lorenz–Mie drops, the
// interference between orders, since |Σ S_p|² ≠ Σ |S_p|²) is the remainder layer, so that the layers add up to
// the whole.

/** The named layers and their Debye order p. */
export const ORDER_LAYERS = [
  { name: "reflection", order: 0, meaning: "p = 0: external reflection (for Lorenz–Mie drops also the diffraction, which Debye's p = 0 carries)" },
  { name: "transmission", order: 1, meaning: "p = 1: direct transmission through the drop" },
  { name: "primary", order: 2, meaning: "p = 2: one internal reflection, the primary bow with its supernumeraries" },
  { name: "secondary", order: 3, meaning: "p = 3: two internal reflections, the secondary bow with its supernumeraries" },
] as const;

export type OrderLayerName = (typeof ORDER_LAYERS)[number]["name"];

/** The remainder: the whole minus the named layers. */
export const REMAINDER_LAYER = {
  name: "higher",
  meaning:
    "p ≥ 4 (three and more internal reflections; the approximate engines carry p = 4–6) and, for Lorenz–Mie drops, the interference " +
    "between orders: the whole minus the other layers, so that the layers sum to the combined image (it may be slightly negative where orders interfere)",
} as const;

/** The key part that tells one order's row from the whole row of the same drop (cache packs, task buffers). */
export function orderVariant(variant: string, order: number | undefined): string {
  return order === undefined ? variant : `${variant}|p${order}`;
}

/**
 * remainder[k] = whole[k] − Σ parts[·][k]: the remainder layer, so that the layers sum to the whole exactly
 * (before any rounding of the output format).
 */
export function remainderOf(whole: ArrayLike<number>, parts: readonly ArrayLike<number>[], out: Float64Array | Float32Array): void {
  for (let k = 0; k < out.length; k++) {
    let sum = 0;
    for (const part of parts) sum += part[k];
    out[k] = whole[k] - sum;
  }
}

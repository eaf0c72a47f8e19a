// Scratch arrays that a thread reuses from one kernel task to the next. A fog profile's task computes hundreds of
// short-lived rows (amplitudes of each pass, coarse and interpolated |S|² of each drop) that are copied into the cache
// packs before the task ends: allocating them anew each time cost 7 % of its time in allocation and garbage collection.

/**
 * Hands out Float64Arrays from a few large buffers. Everything taken is valid until the next reset(); after it the
 * same memory is handed out again. Arrays taken before the arena grew stay valid (they keep their own buffer).
 */
export class RowArena {
  private chunks: Float64Array[] = [];
  private used = 0;
  /** Values handed out since the last reset: after it one chunk holds them all. */
  private taken = 0;

  constructor(private readonly minimumLength = 1 << 16) {}

  /** Gives back everything taken so far: later take() calls reuse (and overwrite) it. */
  reset(): void {
    if (this.chunks.length > 1) this.chunks = [new Float64Array(Math.max(this.taken, this.minimumLength))];
    this.used = 0;
    this.taken = 0;
  }

  /** An array of `length` values, zeroed unless `zero` is false (its previous contents are then left in it). */
  take(length: number, zero = true): Float64Array {
    this.taken += length;
    let current = this.chunks[this.chunks.length - 1];
    if (current === undefined || this.used + length > current.length) {
      current = new Float64Array(Math.max(length, 2 * this.taken, this.minimumLength));
      this.chunks.push(current);
      this.used = 0;
    }
    const out = current.subarray(this.used, this.used + length);
    this.used += length;
    if (zero) out.fill(0);
    return out;
  }
}

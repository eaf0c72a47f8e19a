/** A least-recently-used map bounded by the bytes of its values. */
export class ByteLru<V extends { byteLength: number }> {
  private readonly map = new Map<string, V>();
  private bytes = 0;

  constructor(readonly budgetBytes: number) {}

  get(key: string): V | undefined {
    const value = this.map.get(key);
    if (value !== undefined) {
      this.map.delete(key);
      this.map.set(key, value);
    }
    return value;
  }

  /** Removes and returns an entry, so that the caller can change it and set it again with its new size. */
  take(key: string): V | undefined {
    const value = this.map.get(key);
    if (value !== undefined) {
      this.map.delete(key);
      this.bytes -= value.byteLength;
    }
    return value;
  }

  has(key: string): boolean {
    return this.map.has(key);
  }

  set(key: string, value: V): void {
    const old = this.map.get(key);
    if (old) {
      this.bytes -= old.byteLength;
      this.map.delete(key);
    }
    if (value.byteLength > this.budgetBytes) return;
    this.map.set(key, value);
    this.bytes += value.byteLength;
    for (const [k, v] of this.map) {
      if (this.bytes <= this.budgetBytes) break;
      this.map.delete(k);
      this.bytes -= v.byteLength;
    }
  }

  get sizeBytes(): number {
    return this.bytes;
  }

  get size(): number {
    return this.map.size;
  }

  clear(): void {
    this.map.clear();
    this.bytes = 0;
  }
}

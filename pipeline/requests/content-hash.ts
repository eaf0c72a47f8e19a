import { createHash } from "node:crypto";

/** JSON with object keys sorted and undefined fields dropped, so equal requests serialise identically. */
export function canonicalJson(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(",")}]`;
  if (value && typeof value === "object") {
    const entries = Object.entries(value as Record<string, unknown>)
      .filter(([, v]) => v !== undefined)
      .sort(([a], [b]) => (a < b ? -1 : 1));
    return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonicalJson(v)}`).join(",")}}`;
  }
  return JSON.stringify(value);
}

/** 128-bit SHA-256 prefix of a normalised request: what `meta.hash` and the x-antisolar-hash header carry. */
export function contentHash(value: unknown, namespace = ""): string {
  return createHash("sha256").update(namespace ? `${namespace}|${canonicalJson(value)}` : canonicalJson(value)).digest("hex").slice(0, 32);
}

// Job ids are UUIDs of version 7 (RFC 9562 §5.7): 48 bits of Unix time in milliseconds, then random bits. The time
// in the id tells an API process whether a job whose record is missing was queued before Redis lost its data.

import { randomBytes } from "node:crypto";

export function timeOrderedId(nowMs: number = Date.now()): string {
  const bytes = randomBytes(16);
  // RFC 9562 §5.7: unix_ts_ms in octets 0–5, version 7 in the high nibble of octet 6, variant 0b10 in octet 8.
  bytes.writeUIntBE(nowMs, 0, 6);
  bytes[6] = (bytes[6] & 0x0f) | 0x70;
  bytes[8] = (bytes[8] & 0x3f) | 0x80;
  const hex = bytes.toString("hex");
  return `${hex.slice(0, 8)}-${hex.slice(8, 12)}-${hex.slice(12, 16)}-${hex.slice(16, 20)}-${hex.slice(20)}`;
}

/** The creation time (ms) of a version-7 id, or undefined for anything else (an id that never came from us). */
export function idTimeMs(id: string): number | undefined {
  if (!/^[0-9a-f]{8}-[0-9a-f]{4}-7[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/.test(id)) return undefined;
  return parseInt(id.slice(0, 8) + id.slice(9, 13), 16);
}

// Content-addressed files, checksummed and written atomically: a reader sees a whole entry or none, and a
// corrupt or half-written file is detected (SHA-256 of the payload) and treated as missing.

import { createHash, randomBytes } from "node:crypto";
import { existsSync } from "node:fs";
import { mkdir, open, readFile, rename, rm } from "node:fs/promises";
import { dirname, join } from "node:path";

const MAGIC = Buffer.from("ANSK");
const VERSION = 1;
const HEADER_BYTES = 4 + 4 + 8 + 32;

export class DiskStore {
  constructor(readonly folder: string) {}

  pathOf(key: string): string {
    const hash = createHash("sha256").update(key).digest("hex");
    return join(this.folder, hash.slice(0, 2), `${hash}.bin`);
  }

  async read(key: string): Promise<Buffer | undefined> {
    const path = this.pathOf(key);
    // Most reads of a cold request miss: a stat on this thread costs microseconds, a failed async open through
    // the thread pool far more (measured: ~0.1 s over the 656 packs of a cold default profile).
    if (!existsSync(path)) return undefined;
    let file: Buffer;
    try {
      file = await readFile(path);
    } catch {
      return undefined;
    }
    const payload = verify(file);
    if (!payload) {
      await rm(path, { force: true });
      return undefined;
    }
    return payload;
  }

  /** The payload may come in pieces, written one after another without being copied into one buffer. */
  async write(key: string, payload: Buffer | readonly Buffer[]): Promise<void> {
    const pieces = Buffer.isBuffer(payload) ? [payload] : payload;
    const path = this.pathOf(key);
    await mkdir(dirname(path), { recursive: true });
    const header = Buffer.alloc(HEADER_BYTES);
    MAGIC.copy(header, 0);
    header.writeUInt32LE(VERSION, 4);
    header.writeBigUInt64LE(BigInt(pieces.reduce((sum, piece) => sum + piece.length, 0)), 8);
    const hash = createHash("sha256");
    for (const piece of pieces) hash.update(piece);
    hash.digest().copy(header, 16);
    const temporary = `${path}.${process.pid}.${randomBytes(6).toString("hex")}.tmp`;
    const file = await open(temporary, "w");
    try {
      await file.writev([header, ...pieces]);
    } finally {
      await file.close();
    }
    await rename(temporary, path);
  }
}

function verify(file: Buffer): Buffer | undefined {
  if (file.length < HEADER_BYTES || !file.subarray(0, 4).equals(MAGIC) || file.readUInt32LE(4) !== VERSION) return undefined;
  const length = Number(file.readBigUInt64LE(8));
  if (file.length !== HEADER_BYTES + length) return undefined;
  const payload = file.subarray(HEADER_BYTES);
  const digest = createHash("sha256").update(payload).digest();
  return digest.equals(file.subarray(16, 48)) ? payload : undefined;
}

// Content-addressed files, checksummed and written atomically: a reader sees a whole entry or none, and a
// corrupt or half-written file is detected (SHA-256 of the payload) and treated as missing.

import { createHash, randomBytes } from "node:crypto";
import { mkdir, readFile, rename, rm, writeFile } from "node:fs/promises";
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

  async write(key: string, payload: Buffer): Promise<void> {
    const path = this.pathOf(key);
    await mkdir(dirname(path), { recursive: true });
    const header = Buffer.alloc(HEADER_BYTES);
    MAGIC.copy(header, 0);
    header.writeUInt32LE(VERSION, 4);
    header.writeBigUInt64LE(BigInt(payload.length), 8);
    createHash("sha256").update(payload).digest().copy(header, 16);
    const temporary = `${path}.${process.pid}.${randomBytes(6).toString("hex")}.tmp`;
    await writeFile(temporary, Buffer.concat([header, payload]));
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

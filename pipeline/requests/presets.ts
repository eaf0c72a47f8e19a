import { readFileSync, readdirSync } from "node:fs";
import { join } from "node:path";
import { z } from "zod";
import { profileRequestSchema } from "../../schemas/profile.js";
import { repoPath } from "../config/resources.js";
import type { Preset } from "../../schemas/responses/profile-response.js";

export type { Preset } from "../../schemas/responses/profile-response.js";

const presetFileSchema = z.object({ title: z.string(), description: z.string(), body: z.unknown() }).strict();

/** Loads and validates every demo scenario once at start-up; a broken preset stops the service from starting. */
export function loadPresets(): Map<string, Preset> {
  const folder = repoPath("fixtures/presets");
  const presets = new Map<string, Preset>();
  for (const file of readdirSync(folder).filter((f) => f.endsWith(".json")).sort()) {
    const name = file.replace(/\.json$/, "");
    const raw = presetFileSchema.parse(JSON.parse(readFileSync(join(folder, file), "utf8")));
    presets.set(name, { name, title: raw.title, description: raw.description, body: profileRequestSchema.parse(raw.body) });
  }
  return presets;
}

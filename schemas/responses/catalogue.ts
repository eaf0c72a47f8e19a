// Every JSON body the service answers with, by the name /openapi.json gives it under components.schemas.
import { errorBodySchema } from "./error-response.js";
import { healthResponseSchema, readyResponseSchema } from "./service-response.js";
import { scatterResponseSchema, waterResponseSchema } from "./optics-response.js";
import { presetListSchema, presetSchema, profileResponseSchema } from "./profile-response.js";
import { lutJsonResponseSchema, lutManifestSchema } from "./lut-response.js";
import { skyManifestSchema, viewManifestSchema } from "./overlay-response.js";
import { jobResponseSchema } from "./job-response.js";

export const responseSchemas = {
  Error: errorBodySchema,
  Health: healthResponseSchema,
  Ready: readyResponseSchema,
  Water: waterResponseSchema,
  Scatter: scatterResponseSchema,
  Profile: profileResponseSchema,
  PresetList: presetListSchema,
  Preset: presetSchema,
  LutManifest: lutManifestSchema,
  LutJson: lutJsonResponseSchema,
  ViewManifest: viewManifestSchema,
  SkyManifest: skyManifestSchema,
  Job: jobResponseSchema,
} as const;

export type ResponseSchemaName = keyof typeof responseSchemas;

// The eye-safety caution, shown first wherever a user starts: the README, the page, /docs, the OpenAPI document's
// info and the CLI's help (test/http/eye-safety.test.ts checks each place).

/** Plain text, one paragraph. The README and web/index.html carry the same words. */
export const EYE_SAFETY_CAUTION =
  "Eye safety: a rainbow is always on the side of the sky opposite the sun. Never look at the sun, with bare eyes " +
  "or through a camera, viewfinder, binoculars or telescope, while searching for a bow or framing a shot near the " +
  "sun: it can permanently damage your eyes and a camera's sensor.";

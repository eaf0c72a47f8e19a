/** A positive number from an environment variable, or the fallback when unset; "Infinity" only where allowed. */
export function positiveFromEnv(env: NodeJS.ProcessEnv, name: string, fallback: number, options: { allowInfinity?: boolean } = {}): number {
  const raw = env[name];
  if (raw === undefined || raw === "") return fallback;
  const value = options.allowInfinity && raw === "Infinity" ? Infinity : Number(raw);
  if (Number.isNaN(value) || value <= 0 || (!options.allowInfinity && !Number.isFinite(value))) {
    throw new Error(`${name} must be a positive number, got '${raw}'`);
  }
  return value;
}

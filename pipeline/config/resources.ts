import { existsSync, readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";

/** A folder of the repository, found both from pipeline/config/ (sources, tests) and dist/pipeline/config/ (built). */
export function repoPath(relative: string): string {
  for (const prefix of ["../../", "../../../"]) {
    const candidate = fileURLToPath(new URL(prefix + relative, import.meta.url));
    if (existsSync(candidate)) return candidate;
  }
  throw new Error(`cannot find ${relative} in the repository`);
}

/** The version from package.json. */
export function packageVersion(): string {
  return (JSON.parse(readFileSync(repoPath("package.json"), "utf8")) as { version: string }).version;
}

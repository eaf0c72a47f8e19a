// BENCHMARKS.md holds the main run's tables (bench/run.ts) and sections that other benchmark scripts own, each
// between `<!-- name:start -->` and `<!-- name:end -->` markers: a script rewrites only its own section, and the main
// run carries every section over unchanged.
import { existsSync, readFileSync, writeFileSync } from "node:fs";
import { repoPath } from "../pipeline/config/resources.js";

export const BENCHMARKS_FILE = repoPath("BENCHMARKS.md");

const SECTION = /<!-- ([\w-]+):start -->[\s\S]*?<!-- \1:end -->/g;

/** Every marked section of the current file, in order. */
export function keptSections(): string[] {
  const text = existsSync(BENCHMARKS_FILE) ? readFileSync(BENCHMARKS_FILE, "utf8") : "";
  return [...text.matchAll(SECTION)].map((m) => m[0]);
}

/** Writes `lines` as section `name`, in place of its previous text or at the end of the file. */
export function writeSection(name: string, lines: string[]): void {
  const start = `<!-- ${name}:start -->`;
  const end = `<!-- ${name}:end -->`;
  const section = [start, ...lines, end].join("\n");
  const text = existsSync(BENCHMARKS_FILE) ? readFileSync(BENCHMARKS_FILE, "utf8") : "";
  const from = text.indexOf(start);
  const to = text.indexOf(end);
  const next =
    from >= 0 && to > from ? text.slice(0, from) + section + text.slice(to + end.length) : `${text}${text === "" || text.endsWith("\n") ? "" : "\n"}\n${section}\n`;
  writeFileSync(BENCHMARKS_FILE, next);
  console.log(`wrote the ${name} section of ${BENCHMARKS_FILE}`);
}

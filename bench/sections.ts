import { existsSync, readFileSync, writeFileSync } from "node:fs";
import { cpus, totalmem } from "node:os";
import { dirname, join } from "node:path";
import { repoPath } from "../pipeline/config/resources.js";

export function machineLine(): string {
  return `${cpus()[0]?.model ?? "unknown CPU"}, ${cpus().length} cores, ${Math.round(totalmem() / 2 ** 30)} GiB, Node ${process.version}`;
}

export function benchDate(): string {
  return new Date().toISOString().slice(0, 16).replace("T", " ") + " UTC";
}

/**
 * Replaces BENCHMARKS.md's section between `<!-- name:start -->` and `<!-- name:end -->` (appends it when absent);
 * the rest of the file is left as it is. bench/run.ts carries such sections over when it rewrites the file.
 */
export function writeMarkedSection(name: string, lines: string[]): void {
  const start = `<!-- ${name}:start -->`;
  const end = `<!-- ${name}:end -->`;
  const file = join(dirname(repoPath("package.json")), "BENCHMARKS.md");
  const section = [start, ...lines, end].join("\n");
  const text = existsSync(file) ? readFileSync(file, "utf8") : "";
  const at = text.indexOf(start);
  const until = text.indexOf(end);
  const next =
    at >= 0 && until > at ? text.slice(0, at) + section + text.slice(until + end.length) : `${text}${text === "" || text.endsWith("\n") ? "" : "\n"}\n${section}\n`;
  writeFileSync(file, next);
  console.log(`wrote the ${name} section of ${file}`);
}

const SECTION = /<!-- ([\w-]+):start -->[\s\S]*?<!-- \1:end -->/g;

/** Every marked section of BENCHMARKS.md, in order: what bench/run.ts carries over when it rewrites the file. */
export function keptSections(): string[] {
  const file = join(dirname(repoPath("package.json")), "BENCHMARKS.md");
  const text = existsSync(file) ? readFileSync(file, "utf8") : "";
  return [...text.matchAll(SECTION)].map((m) => m[0]);
}

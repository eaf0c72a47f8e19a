// BENCHMARKS.md holds sections that separate scripts write (bench/load.ts, bench/outage.ts), each between its own
// markers; every script rewrites only its section and keeps the rest.
import { existsSync, readFileSync, writeFileSync } from "node:fs";
import { repoPath } from "../pipeline/config/resources.js";

export const sectionNames = ["load", "outage"] as const;

const markers = (name: string) => [`<!-- ${name}:start -->`, `<!-- ${name}:end -->`] as const;

/** The sections other scripts wrote, as they stand in the text, in the order of sectionNames. */
export function keptSections(text: string): string[] {
  return sectionNames.flatMap((name) => {
    const [start, end] = markers(name);
    const from = text.indexOf(start);
    const to = text.indexOf(end);
    return from >= 0 && to > from ? [text.slice(from, to + end.length)] : [];
  });
}

/** Replaces (or appends) one section of BENCHMARKS.md; returns the file's path. */
export function writeSection(name: (typeof sectionNames)[number], lines: string[]): string {
  const file = repoPath("BENCHMARKS.md");
  const [start, end] = markers(name);
  const section = [start, ...lines, end].join("\n");
  const text = existsSync(file) ? readFileSync(file, "utf8") : "";
  const from = text.indexOf(start);
  const to = text.indexOf(end);
  const next =
    from >= 0 && to > from ? text.slice(0, from) + section + text.slice(to + end.length) : `${text}${text === "" || text.endsWith("\n") ? "" : "\n"}\n${section}\n`;
  writeFileSync(file, next);
  return file;
}

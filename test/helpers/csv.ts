import { readFileSync } from "node:fs";

/**
 * A reference table in the project's CSV layout: line 1 a `#` comment naming source and licence,
 * line 2 the column names, then one record per line. No quoting (none of the tables needs it).
 */
export interface CsvTable {
  source: string;
  columns: string[];
  rows: Record<string, string>[];
}

export function readCsv(url: URL): CsvTable {
  const lines = readFileSync(url, "utf8").split(/\r?\n/).filter((l) => l.trim() !== "");
  if (!lines[0].startsWith("#")) throw new Error(`${url.pathname}: line 1 must be the # source line`);
  const columns = lines[1].split(",").map((c) => c.trim());
  const rows = lines.slice(2).map((line, i) => {
    const cells = line.split(",");
    if (cells.length !== columns.length) {
      throw new Error(`${url.pathname}: line ${i + 3} has ${cells.length} cells, expected ${columns.length}`);
    }
    const row: Record<string, string> = {};
    columns.forEach((c, k) => (row[c] = cells[k].trim()));
    return row;
  });
  return { source: lines[0].slice(1).trim(), columns, rows };
}

/** Numeric cell; throws on a missing or non-numeric value so a typo cannot pass silently. */
export function num(row: Record<string, string>, column: string): number {
  const v = row[column];
  if (v === undefined || v === "") throw new Error(`missing value in column ${column}`);
  const x = Number(v);
  if (Number.isNaN(x) && v.toLowerCase() !== "nan") throw new Error(`not a number in column ${column}: ${v}`);
  return x;
}

/** URL of a file in fixtures/reference, relative to this helper. */
export function referenceCsv(name: string): URL {
  return new URL(`../../fixtures/reference/${name}`, import.meta.url);
}

// Client input repeated in an error message or a log line is cut to a stated length, so that neither an answer nor
// a log line grows with what a client sends, and nothing unbounded is serialised on the way.

/** Longest piece of client input an error message repeats, in UTF-16 code units (our choice: a line's worth). */
export const PREVIEW_CHARS = 80;

/** Deepest level of a value a preview descends into; deeper parts print as "…" (our choice). */
const PREVIEW_DEPTH = 4;

/** The text itself when short enough, else its start, an ellipsis and the full length. */
export function previewText(text: string, maxChars = PREVIEW_CHARS): string {
  if (text.length <= maxChars) return text;
  let end = maxChars - 1;
  // Never cut between the two halves of a surrogate pair: the preview itself stays well-formed.
  const last = text.charCodeAt(end - 1);
  if (last >= 0xd800 && last <= 0xdbff) end -= 1;
  return `${text.slice(0, end)}… (${text.length} chars)`;
}

/** A JSON-like rendering of any value, at most about maxChars long, built without walking more than it prints. */
export function previewValue(value: unknown, maxChars = PREVIEW_CHARS): string {
  const out: string[] = [];
  let budget = maxChars;
  const emit = (piece: string) => {
    if (budget <= 0) return;
    const cut = piece.length > budget ? `${piece.slice(0, Math.max(0, budget - 1))}…` : piece;
    out.push(cut);
    budget -= piece.length;
  };
  const walk = (v: unknown, depth: number): void => {
    if (budget <= 0) return;
    if (typeof v === "string") return emit(JSON.stringify(previewText(v, Math.max(1, budget))));
    if (v === null || typeof v !== "object") return emit(v === undefined ? "undefined" : String(v));
    if (depth >= PREVIEW_DEPTH) return emit(Array.isArray(v) ? "[…]" : "{…}");
    if (Array.isArray(v)) {
      emit("[");
      for (let i = 0; i < v.length && budget > 0; i++) {
        if (i > 0) emit(",");
        walk(v[i], depth + 1);
      }
      return emit("]");
    }
    emit("{");
    let first = true;
    for (const key in v) {
      if (budget <= 0) break;
      if (!Object.prototype.hasOwnProperty.call(v, key)) continue;
      if (!first) emit(",");
      first = false;
      emit(`${JSON.stringify(previewText(key, 20))}:`);
      walk((v as Record<string, unknown>)[key], depth + 1);
    }
    emit("}");
  };
  walk(value, 0);
  return out.join("");
}

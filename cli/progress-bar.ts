// The command line's progress bar: one line on stderr, redrawn in place, with the stage and the time left — only
// when stderr is a terminal, so that logs and pipes stay clean.

import type { ProgressUpdate } from "../pipeline/progress/progress-meter.js";

const WIDTH = 30;

/** "about 12 s left", "about 3 min 5 s left", "under a second left"; empty while there is no estimate. */
export function timeLeftText(seconds: number | null): string {
  if (seconds === null || !Number.isFinite(seconds)) return "";
  const s = Math.max(0, Math.round(seconds));
  if (s < 1) return "under a second left";
  if (s < 60) return `about ${s} s left`;
  return `about ${Math.floor(s / 60)} min ${s % 60} s left`;
}

export function barLine(label: string, update: ProgressUpdate): string {
  const filled = Math.round(update.fraction * WIDTH);
  const percent = `${Math.floor(update.fraction * 100)}`.padStart(3);
  return `${label} [${"#".repeat(filled)}${".".repeat(WIDTH - filled)}] ${percent} % ${update.stage.padEnd(12)} ${timeLeftText(update.secondsLeft)}`;
}

/** A listener that draws the bar; it redraws only when the line would change. */
export function progressBar(label: string, stream: NodeJS.WriteStream = process.stderr): (update: ProgressUpdate) => void {
  let shown = "";
  return (update) => {
    if (!stream.isTTY) return;
    const line = barLine(label, update);
    if (line === shown) return;
    shown = line;
    // Carriage return, the line, and "erase to the end of the line" (ECMA-48 EL, CSI K) for a shorter line.
    stream.write(`\r${line}\x1b[K`);
    if (update.fraction >= 1) stream.write("\n");
  };
}

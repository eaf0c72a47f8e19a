// Progress of a sequence, counted in frames and weighted by the time each frame really takes: the first frame
// rendered computes the kernels the others reuse, so a frame to go is estimated at the latest finished frame's
// time, not at the mean. Frames kept by an earlier attempt count as done but took no time here.

import type { ProgressListener } from "./progress-meter.js";

/** The highest fraction reported before the archive is written (as the single renders' meter). */
const BEFORE_DONE = 0.999;
/** A frame's own fraction below this is too early to project its time from (common practice: a few percent). */
const MIN_INNER_FRACTION = 0.02;

export class SequenceProgress {
  private finishedS: number[] = [];
  private kept = 0;
  private current = -1;
  private currentStartMs = 0;
  private reported = 0;

  constructor(
    private readonly frames: number,
    private readonly listener: ProgressListener | undefined,
    private readonly now: () => number = () => performance.now(),
  ) {}

  /** Frame `index` was kept by an earlier attempt. */
  keptFrame(index: number): void {
    this.kept++;
    this.emit(index, 0);
  }

  /** Frame `index` starts rendering. */
  start(index: number): void {
    this.current = index;
    this.currentStartMs = this.now();
    this.emit(index, 0);
  }

  /** The frame in hand reports its own fraction. */
  inner(fraction: number): void {
    if (this.current >= 0) this.emit(this.current, fraction);
  }

  /** The frame in hand is finished. */
  finish(): void {
    this.finishedS.push((this.now() - this.currentStartMs) / 1000);
    this.current = -1;
  }

  done(): void {
    this.reported = 1;
    this.listener?.({ fraction: 1, stage: "done", secondsLeft: 0 });
  }

  private emit(index: number, inner: number): void {
    const rendering = this.current >= 0;
    const elapsedS = rendering ? (this.now() - this.currentStartMs) / 1000 : 0;
    const latestS = this.finishedS.at(-1);
    // The frame in hand: projected from its own pace once it has one, else like the latest finished frame.
    const currentS = rendering && inner >= MIN_INNER_FRACTION ? elapsedS / inner : latestS;
    const toGo = this.frames - this.kept - this.finishedS.length - (rendering ? 1 : 0);
    let fraction: number;
    let secondsLeft: number | null = null;
    if (latestS === undefined && currentS === undefined) {
      // Nothing measured yet: frames counted alike.
      fraction = (this.kept + this.finishedS.length + inner) / this.frames;
    } else {
      const perFrameS = latestS ?? currentS!;
      const spentS = this.finishedS.reduce((a, b) => a + b, 0) + elapsedS;
      secondsLeft = (rendering ? Math.max(0, (currentS ?? perFrameS) - elapsedS) : 0) + toGo * perFrameS;
      const keptS = this.kept * perFrameS;
      fraction = (keptS + spentS) / (keptS + spentS + secondsLeft);
    }
    this.reported = Math.max(this.reported, Math.min(BEFORE_DONE, fraction));
    this.listener?.({ fraction: this.reported, stage: `frame ${index + 1} of ${this.frames}`, secondsLeft });
  }
}

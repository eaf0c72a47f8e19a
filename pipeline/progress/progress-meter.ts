// Progress of one render measured in its work: each stage (kernel rows, spectral sum, colour, encoding) has an
// estimated cost in nanoseconds of one core (work-costs.ts); the fraction is the estimated cost done over the
// estimated cost planned, so it advances at the pace the work is done. It never falls, and it reaches 1 only
// when the render says it is done.

/** What a listener receives: the fraction in [0, 1], the stage, and the estimated seconds left (null: not known yet). */
export interface ProgressUpdate {
  fraction: number;
  stage: string;
  secondsLeft: number | null;
}

export type ProgressListener = (update: ProgressUpdate) => void;

/** The highest fraction a render reports before it is done: the last step (writing the answer) is never measured. */
const BEFORE_DONE = 0.999;
/** Seconds of measured progress before the rate is trusted for an estimate of the time left (common practice). */
const MIN_RATE_WINDOW_S = 0.5;

interface Stage {
  name: string;
  costNs: number;
  doneNs: number;
}

/**
 * The stages are named in their order when the meter is made; each is planned with its estimated cost when that
 * is known (the kernel rows once the request's drops and wavelengths are), and may be re-planned, which never moves
 * the fraction back: the reported fraction is the highest one computed so far.
 */
export class ProgressMeter {
  private readonly stages: Stage[];
  private reported = 0;
  private current = "starting";
  /** Where the rate is measured from: the start, or the last rows found in a cache before any work was done here. */
  private rateStart: { atMs: number; fraction: number };
  private working = false;
  /** Estimated cost counted as found (rows read from a cache), not worked for here. */
  private foundNs = 0;

  constructor(
    stageNames: readonly string[],
    private readonly listener: ProgressListener | undefined,
    private readonly now: () => number = () => performance.now(),
    /** A part's link to the meter it is part of (part()): told the share of the part's own work done. */
    private readonly onWork?: (workedFraction: number) => void,
  ) {
    this.stages = stageNames.map((name) => ({ name, costNs: 0, doneNs: 0 }));
    this.rateStart = { atMs: now(), fraction: 0 };
  }

  /** Plans a stage (or re-plans it) with its estimated cost in nanoseconds of wall time. */
  plan(name: string, costNs: number): void {
    const stage = this.stage(name);
    stage.costNs = Math.max(0, Number.isFinite(costNs) ? costNs : 0);
    stage.doneNs = Math.min(stage.doneNs, stage.costNs);
  }

  has(name: string): boolean {
    return this.stages.some((s) => s.name === name);
  }

  /**
   * Sets how much of a stage's estimated cost is done. found: work that took no time here (rows read from a
   * cache), which moves the fraction but is kept out of the rate the time left is estimated from.
   */
  advance(name: string, doneNs: number, options: { found?: boolean } = {}): void {
    const stage = this.stage(name);
    const before = stage.doneNs;
    stage.doneNs = Math.min(stage.costNs, Math.max(stage.doneNs, doneNs));
    if (options.found) this.foundNs += stage.doneNs - before;
    // Earlier stages are complete once a later one advances.
    for (const s of this.stages) {
      if (s === stage) break;
      s.doneNs = s.costNs;
    }
    this.current = name;
    this.reported = Math.max(this.reported, Math.min(BEFORE_DONE, this.estimate()));
    if (!options.found) this.working = true;
    else if (!this.working) this.rateStart = { atMs: this.now(), fraction: this.reported };
    this.emit();
    if (this.onWork) {
      const { cost, done } = this.sums();
      const toWork = cost - this.foundNs;
      this.onWork(toWork > 0 ? Math.min(1, Math.max(0, (done - this.foundNs) / toWork)) : 0);
    }
  }

  /**
   * A meter for one part of this render (a row of a lookup texture or of a size map) that fills the stage `name`,
   * planned with the part's estimated cost, as the part's own work is done: the share of its cost that was worked
   * for, not found in a cache (rows an earlier part computed were weighed with that part). Parts may run side by
   * side: a part never completes the stages named before its own.
   */
  part(name: string, stageNames: readonly string[]): ProgressMeter {
    const stage = this.stage(name);
    return new ProgressMeter(stageNames, undefined, this.now, (workedFraction) => this.fill(stage, workedFraction * stage.costNs));
  }

  private fill(stage: Stage, doneNs: number): void {
    stage.doneNs = Math.min(stage.costNs, Math.max(stage.doneNs, doneNs));
    this.current = stage.name;
    this.reported = Math.max(this.reported, Math.min(BEFORE_DONE, this.estimate()));
    this.working = true;
    this.emit();
  }

  /** Marks a stage complete (its whole estimated cost done). */
  complete(name: string, options: { found?: boolean } = {}): void {
    this.advance(name, this.stage(name).costNs, options);
  }

  /** The render (or the part) is finished: 1, nothing left. */
  done(): void {
    this.reported = 1;
    this.current = "done";
    this.listener?.({ fraction: 1, stage: "done", secondsLeft: 0 });
    this.onWork?.(1);
  }

  get fraction(): number {
    return this.reported;
  }

  /**
   * Time left = (1 − f) / r, with r = (f − f₀) / (t − t₀) the mean rate since the render started (t₀, f₀: the
   * start, or the moment rows found in a cache were counted, so that they do not inflate the rate). Null before
   * any work was done here or MIN_RATE_WINDOW_S have passed.
   */
  secondsLeft(): number | null {
    if (!this.working) return null;
    const elapsedS = (this.now() - this.rateStart.atMs) / 1000;
    const gained = this.reported - this.rateStart.fraction;
    if (elapsedS < MIN_RATE_WINDOW_S || gained <= 0) return null;
    return ((1 - this.reported) * elapsedS) / gained;
  }

  private stage(name: string): Stage {
    const stage = this.stages.find((s) => s.name === name);
    if (!stage) throw new Error(`no progress stage '${name}'`);
    return stage;
  }

  private sums(): { cost: number; done: number } {
    let cost = 0;
    let done = 0;
    for (const s of this.stages) {
      cost += s.costNs;
      done += s.doneNs;
    }
    return { cost, done };
  }

  private estimate(): number {
    const { cost, done } = this.sums();
    return cost > 0 ? done / cost : 0;
  }

  private emit(): void {
    this.listener?.({ fraction: this.reported, stage: this.current, secondsLeft: this.secondsLeft() });
  }
}

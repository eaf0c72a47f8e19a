// Stops calling a dependency for a while after it failed several times in a row, so that every caller gets the
// fallback at once instead of waiting for a timeout each (the Circuit Breaker of Nygard 2007, Release It!, ch. 5).

export interface BreakerSettings {
  /** Consecutive failures that open the circuit. */
  failuresToOpen: number;
  /** How long an open circuit refuses calls before it lets one trial call through, ms. */
  openMs: number;
}

export type BreakerState = "closed" | "open" | "half-open";

export class CircuitBreaker {
  private failures = 0;
  /** Time until which calls are refused; 0 while closed. */
  private openUntil = 0;
  private trialInFlight = false;

  constructor(
    readonly settings: BreakerSettings,
    private readonly now: () => number = Date.now,
  ) {}

  get state(): BreakerState {
    if (this.openUntil === 0) return "closed";
    return this.now() < this.openUntil ? "open" : "half-open";
  }

  /** Whether a call may go out now; in the half-open state only one trial call at a time. */
  allows(): boolean {
    const state = this.state;
    if (state === "closed") return true;
    if (state === "open" || this.trialInFlight) return false;
    this.trialInFlight = true;
    return true;
  }

  succeeded(): void {
    this.failures = 0;
    this.openUntil = 0;
    this.trialInFlight = false;
  }

  failed(): void {
    const trial = this.trialInFlight;
    this.trialInFlight = false;
    this.failures++;
    if (trial || this.failures >= this.settings.failuresToOpen) this.openUntil = this.now() + this.settings.openMs;
  }

  /** The call's answer, or `fallback` when the circuit is open or the call fails. */
  async run<T>(call: () => Promise<T>, fallback: T): Promise<T> {
    if (!this.allows()) return fallback;
    try {
      const value = await call();
      this.succeeded();
      return value;
    } catch {
      this.failed();
      return fallback;
    }
  }
}

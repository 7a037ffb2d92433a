/**
 * Where a scoring job spends its time: each lap charges the time since the previous one to a
 * phase. Kept with the chunk (and the run, for planning and finalising) so a slow run can be
 * read from the tables.
 */
export class PhaseClock {
  private readonly ms = new Map<string, number>();
  private last = performance.now();

  /** Charges the time since the previous lap (or the start) to `phase`. */
  lap(phase: string): void {
    const now = performance.now();
    this.ms.set(phase, (this.ms.get(phase) ?? 0) + now - this.last);
    this.last = now;
  }

  /** Whole milliseconds per phase, each name prefixed with `prefix`. */
  toJSON(prefix = ''): Record<string, number> {
    const out: Record<string, number> = {};
    for (const [phase, ms] of this.ms) out[prefix + phase] = Math.round(ms);
    return out;
  }

  get(phase: string): number {
    return this.ms.get(phase) ?? 0;
  }
}

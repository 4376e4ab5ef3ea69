// Progress on stderr: one live line on a terminal, plain periodic lines otherwise.
import type { CaseModel } from '../src/case/model.js';
import type { StepRow } from '../src/fracture/analysis.js';

export class Progress {
  private readonly tty = Boolean(process.stderr.isTTY);
  private lastPlain = 0;
  private wrote = false;
  private peak = 0;
  private readonly eta = new Eta();
  constructor(private readonly on: boolean, private readonly c: CaseModel) {}

  step(r: StepRow, elapsed: number): void {
    if (!this.on) return;
    // the run ends at the control target or once the load has fallen to stopAtLoadFraction
    // of the peak, whichever comes first
    this.peak = Math.max(this.peak, Math.abs(r.load_N));
    const byControl = Math.abs(r.control) / Math.abs(this.c.control.target || 1);
    const stop = this.c.control.stopAtLoadFraction;
    const byLoad = this.c.crack && stop > 0 && this.peak > 0 && Math.abs(r.load_N) < this.peak
      ? (this.peak - Math.abs(r.load_N)) / (this.peak * (1 - stop)) : 0;
    const frac = Math.min(1, Math.max(byControl, byLoad));
    const eta = this.eta.add(elapsed, frac);
    const line = `step ${r.step}  load ${r.load_N.toFixed(1)} N` +
      (r.cmod_mm !== null ? `  CMOD ${r.cmod_mm.toFixed(4)} mm` : `  disp ${r.displacement_mm.toFixed(4)} mm`) +
      `  crack ${r.crack_length_mm.toFixed(1)} mm  ${elapsed.toFixed(1)} s` + (Number.isFinite(eta) ? `  ~${eta.toFixed(0)} s left` : '');
    if (this.tty) { process.stderr.write(`\r\x1b[2K${line}`); this.wrote = true; }
    else if (elapsed - this.lastPlain >= 5 || r.step === 0) { process.stderr.write(line + '\n'); this.lastPlain = elapsed; }
  }

  done(): void { if (this.on && this.tty && this.wrote) process.stderr.write('\n'); }
}

/**
 * Time left from the measured time per unit of progress over the recent steps (the last 20 steps
 * or 20 s, whichever is longer ago), not from the average since the start: steps slow down as the
 * crack grows and speed up in the tail, and meshing and the first factorization belong to no step.
 */
export class Eta {
  private t: number[] = [];
  private f: number[] = [];
  constructor(private readonly steps = 20, private readonly seconds = 20) {}

  /** Seconds left after a step at elapsed time t with progress f in [0, 1], or NaN until known. */
  add(t: number, f: number): number {
    this.t.push(t); this.f.push(f);
    // drop samples older than both limits
    while (this.t.length > this.steps && t - this.t[1] >= this.seconds) { this.t.shift(); this.f.shift(); }
    const df = f - this.f[0], dt = t - this.t[0];
    if (this.t.length < 3 || !(df > 1e-6) || !(dt > 0) || f < 0.02) return NaN;
    return Math.max(0, (1 - f) * (dt / df));
  }
}

// Progress on stderr: one live line on a terminal, plain periodic lines otherwise.
import type { CaseModel } from '../src/case/model.js';
import type { StepRow } from '../src/fracture/analysis.js';

export class Progress {
  private readonly tty = Boolean(process.stderr.isTTY);
  private lastPlain = 0;
  private wrote = false;
  constructor(private readonly on: boolean, private readonly c: CaseModel) {}

  step(r: StepRow, elapsed: number): void {
    if (!this.on) return;
    const total = this.c.crack ? this.c.control.increments : 1;
    const frac = Math.min(1, Math.abs(r.control) / Math.abs(this.c.control.target || 1));
    const eta = frac > 0.02 ? elapsed * (1 - frac) / frac : NaN;
    const line = `step ${r.step}/${total}  load ${r.load_N.toFixed(1)} N` +
      (r.cmod_mm !== null ? `  CMOD ${r.cmod_mm.toFixed(4)} mm` : `  disp ${r.displacement_mm.toFixed(4)} mm`) +
      `  crack ${r.crack_length_mm.toFixed(1)} mm  ${elapsed.toFixed(1)} s` + (Number.isFinite(eta) ? `  ~${eta.toFixed(0)} s left` : '');
    if (this.tty) { process.stderr.write(`\r\x1b[2K${line}`); this.wrote = true; }
    else if (elapsed - this.lastPlain >= 5 || r.step === 0) { process.stderr.write(line + '\n'); this.lastPlain = elapsed; }
  }

  done(): void { if (this.on && this.tty && this.wrote) process.stderr.write('\n'); }
}

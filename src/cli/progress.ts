/** Live progress on stderr: runs done, the latest loss, and an ETA. */
import type { RunPlan } from '../experiment/plan.ts';
import type { RunResult } from '../experiment/run.ts';
import { num } from './format.ts';

export class ProgressLine {
  private readonly started = Date.now();
  private readonly current = new Map<number, { plan: RunPlan; step: number; total: number; loss: number }>();
  private done = 0;
  private lastPrint = 0;
  private readonly tty: boolean;

  constructor(
    private readonly total: number,
    private readonly stream: NodeJS.WriteStream = process.stderr,
    private readonly quiet = false,
  ) {
    this.tty = Boolean(stream.isTTY);
  }

  start(plan: RunPlan): void {
    this.current.set(plan.index, { plan, step: 0, total: 1, loss: NaN });
  }

  progress(plan: RunPlan, step: number, total: number, loss: number): void {
    this.current.set(plan.index, { plan, step, total, loss });
    this.print(false);
  }

  result(result: RunResult): void {
    this.current.delete(result.index);
    this.done++;
    if (!this.quiet) {
      const note = result.status === 'ok' ? `${result.seconds.toFixed(1)} s` : `${result.status}${result.reason ? `: ${result.reason}` : ''}`;
      this.clear();
      this.stream.write(`  run ${this.done}/${this.total} finished: ${result.arm} seed ${result.seed} (${note})\n`);
    }
    this.print(true);
  }

  private clear(): void {
    if (this.tty) this.stream.write('\r\x1b[K');
  }

  private print(force: boolean): void {
    if (this.quiet) return;
    const now = Date.now();
    if (!force && now - this.lastPrint < (this.tty ? 200 : 5000)) return;
    this.lastPrint = now;
    let fraction = this.done;
    for (const c of this.current.values()) fraction += c.total ? c.step / c.total : 0;
    const elapsed = (now - this.started) / 1000;
    // No estimate before a run has finished: start-up and warm-up make the first steps far slower
    // than the rest, and an early extrapolation promised 1966 s for a 20 s run.
    const eta = this.done > 0 && fraction > 0 ? (elapsed * (this.total - fraction)) / fraction : NaN;
    const running = [...this.current.values()].map((c) => `${c.plan.arm}/seed ${c.plan.seed} ${c.step}/${c.total} loss ${num(c.loss)}`).join(' · ');
    const text = `runs ${this.done}/${this.total} done · ${elapsed.toFixed(0)} s · ETA ${Number.isFinite(eta) ? `${eta.toFixed(0)} s` : 'after the first run'}${running ? ` · ${running}` : ''}`;
    if (this.tty) {
      this.clear();
      this.stream.write(text.slice(0, (this.stream.columns ?? 120) - 1));
    } else if (!force) {
      this.stream.write(text + '\n');
    }
  }

  finish(): void {
    if (!this.quiet && this.tty) this.stream.write('\r\x1b[K');
  }
}

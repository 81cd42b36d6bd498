// Render progress on stderr: a live line on a terminal, a line per tenth of the work otherwise.

export interface ProgressSink {
  write(text: string): void;
  isTTY: boolean;
}

export class Progress {
  private done = 0;
  private failed = 0;
  private readonly start = performance.now();
  private lastTenth = -1;

  constructor(
    private readonly sink: ProgressSink,
    public total: number,
    private readonly label: string,
  ) {}

  frameDone(ok: boolean): void {
    this.done++;
    if (!ok) this.failed++;
    const line = this.line();
    if (this.sink.isTTY) {
      this.sink.write(`\r\x1b[2K${line}`);
    } else {
      const tenth = Math.floor((this.done * 10) / this.total);
      if (tenth !== this.lastTenth) {
        this.lastTenth = tenth;
        this.sink.write(`${line}\n`);
      }
    }
  }

  line(): string {
    const secs = (performance.now() - this.start) / 1000;
    const fps = secs > 0 ? this.done / secs : 0;
    const left = this.total - this.done;
    const eta = fps > 0 ? formatDuration(left / fps) : '--';
    const failed = this.failed ? `, ${this.failed} failed` : '';
    return `${this.label}: ${this.done}/${this.total} frames${failed}, ${fps.toFixed(2)} fps, ETA ${eta}`;
  }

  finish(): void {
    if (this.sink.isTTY && this.done > 0) this.sink.write('\n');
  }

  elapsedSeconds(): number {
    return (performance.now() - this.start) / 1000;
  }
}

export function formatDuration(seconds: number): string {
  if (!Number.isFinite(seconds)) return '--';
  const s = Math.round(seconds);
  const h = Math.floor(s / 3600);
  const m = Math.floor((s % 3600) / 60);
  const r = s % 60;
  return h > 0 ? `${h}h${String(m).padStart(2, '0')}m` : m > 0 ? `${m}m${String(r).padStart(2, '0')}s` : `${r}s`;
}

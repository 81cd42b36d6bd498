// Render progress on stderr: a live line on a terminal, a line per tenth of the work otherwise.
// Frames kept from an earlier render (resume) count towards done but not towards the rate: the
// frames per second and the ETA are those of the frames actually rendered.

export interface ProgressSink {
  write(text: string): void;
  isTTY: boolean;
}

export class Progress {
  private done = 0;
  private failed = 0;
  private kept = 0;
  private readonly start = performance.now();
  private lastTenth = -1;
  /** files written per frame (separate passes): the line counts frames, not files */
  passes = 1;

  constructor(
    private readonly sink: ProgressSink,
    public total: number,
    private readonly label: string,
  ) {}

  frameDone(kind: 'written' | 'skipped' | 'failed'): void {
    this.done++;
    if (kind === 'failed') this.failed++;
    if (kind === 'skipped') this.kept++;
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
    const p = this.passes;
    const fps = renderRate(this.done - this.kept, secs) / p;
    const left = (this.total - this.done) / p;
    const eta = left === 0 ? '0s' : fps > 0 ? formatDuration(left / fps) : '--';
    const frames = (n: number) => (n % p === 0 ? String(n / p) : (n / p).toFixed(1));
    const kept = this.kept ? `, ${frames(this.kept)} kept` : '';
    const failed = this.failed ? `, ${this.failed} failed` : '';
    const files = p > 1 ? ` (${p} passes a frame)` : '';
    return `${this.label}: ${frames(this.done)}/${frames(this.total)} frames${files}${kept}${failed}, ${fps.toFixed(2)} fps, ETA ${eta}`;
  }

  finish(): void {
    if (this.sink.isTTY && this.done > 0) this.sink.write('\n');
  }

  elapsedSeconds(): number {
    return (performance.now() - this.start) / 1000;
  }
}

/** Frames per second of the frames rendered (written or failed) so far; 0 before the first. */
export function renderRate(rendered: number, seconds: number): number {
  return rendered > 0 && seconds > 0 ? rendered / seconds : 0;
}

export function formatDuration(seconds: number): string {
  if (!Number.isFinite(seconds)) return '--';
  const s = Math.round(seconds);
  const h = Math.floor(s / 3600);
  const m = Math.floor((s % 3600) / 60);
  const r = s % 60;
  return h > 0 ? `${h}h${String(m).padStart(2, '0')}m` : m > 0 ? `${m}m${String(r).padStart(2, '0')}s` : `${r}s`;
}

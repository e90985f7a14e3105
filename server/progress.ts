/**
 * A progress line on stderr for long headless runs: shown only when stderr is a terminal and
 * the run has lasted more than a second, redrawn at most a few times per second.
 */
export class Progress {
  private readonly started = Date.now();
  private lastDraw = 0;
  private drawn = false;

  constructor(private readonly label: string, private readonly total: number, private readonly stream: NodeJS.WriteStream = process.stderr) {}

  update(done: number, detail = ''): void {
    if (!this.stream.isTTY) return;
    const now = Date.now();
    if (now - this.started < 1000 || now - this.lastDraw < 200) return;
    this.lastDraw = now;
    const fraction = Math.min(1, Math.max(0, done / this.total));
    const width = 30;
    const filled = Math.round(fraction * width);
    const elapsed = (now - this.started) / 1000;
    const eta = fraction > 0 ? (elapsed * (1 - fraction)) / fraction : Number.NaN;
    const bar = '#'.repeat(filled) + '-'.repeat(width - filled);
    this.stream.write(`\r${this.label} [${bar}] ${(fraction * 100).toFixed(1)}% ${detail} ETA ${formatSeconds(eta)}   `);
    this.drawn = true;
  }

  finish(): void {
    if (this.drawn) this.stream.write('\n');
  }
}

export function formatSeconds(seconds: number): string {
  if (!Number.isFinite(seconds)) return '--';
  if (seconds < 60) return `${seconds.toFixed(0)} s`;
  if (seconds < 3600) return `${Math.floor(seconds / 60)} min ${Math.round(seconds % 60)} s`;
  return `${Math.floor(seconds / 3600)} h ${Math.round((seconds % 3600) / 60)} min`;
}

/**
 * Progress on stderr for long headless runs, once the run has lasted more than a second: on a
 * terminal a bar redrawn at most a few times per second; otherwise (a log file, a service
 * journal) one plain line every `lineEverySeconds`, so a soak under nohup still says how far
 * it is.
 */
export class Progress {
  private readonly started = Date.now();
  private lastDraw = 0;
  private drawn = false;
  /** Where this process started (a resumed run starts part way): the ETA uses only the rate seen here. */
  private firstDone: number | null = null;

  constructor(
    private readonly label: string,
    private readonly total: number,
    private readonly stream: NodeJS.WriteStream = process.stderr,
    private readonly lineEverySeconds = 60,
  ) {}

  update(done: number, detail = ''): void {
    this.firstDone ??= done;
    const now = Date.now();
    const terminal = this.stream.isTTY === true;
    if (now - this.started < 1000 || now - this.lastDraw < (terminal ? 200 : 1000 * this.lineEverySeconds)) return;
    this.lastDraw = now;
    const fraction = Math.min(1, Math.max(0, done / this.total));
    const width = 30;
    const filled = Math.round(fraction * width);
    const elapsed = (now - this.started) / 1000;
    const progressed = done - this.firstDone;
    const eta = progressed > 0 ? (elapsed * Math.max(0, this.total - done)) / progressed : Number.NaN;
    const bar = '#'.repeat(filled) + '-'.repeat(width - filled);
    const text = `${this.label} [${bar}] ${(fraction * 100).toFixed(1)}% ${detail} ETA ${formatSeconds(eta)}`;
    if (!terminal) {
      this.stream.write(`${text}\n`);
      return;
    }
    this.stream.write(`\r${text}   `);
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

/**
 * Plain-text data as frequency counters and phase recorders export it (README, "Stability
 * statistics"): one value per line, or two columns, time (s) and value, separated by blanks, a
 * comma, a semicolon or a tab; '#' starts a comment; blank lines are skipped. Every data line must
 * have the same number of columns. With a time column the sample interval comes from it and must
 * be uniform (each step within TIME_STEP_TOLERANCE of the median step, so that a gap is reported
 * at its own line: printed times are rounded, a missing sample is a whole step off). Errors name
 * the line.
 */
import { InputError } from '../util/input-error.js';

/** Relative deviation of one time step from the mean step that still counts as uniform. */
export const TIME_STEP_TOLERANCE = 1e-3;

export interface DataFile {
  values: Float64Array;
  /** The time column, when the file has one. */
  times: Float64Array | null;
  /** Sample interval from the time column (mean step), seconds; null without one. */
  tau0FromTimes: number | null;
  /** Line number of each value, for later messages. */
  lines: Int32Array;
}

export function parseDataText(text: string, source: string): DataFile {
  const values: number[] = [];
  const times: number[] = [];
  const lines: number[] = [];
  let columns = 0;
  let firstLine = 0;
  const fail = (line: number, reason: string): never => {
    throw new InputError(`line ${line}`, reason, { source });
  };
  const rows = text.split(/\r?\n/);
  for (let index = 0; index < rows.length; index++) {
    const line = index + 1;
    const hash = rows[index].indexOf('#');
    const body = (hash >= 0 ? rows[index].slice(0, hash) : rows[index]).trim();
    if (body === '') continue;
    const cells = body.split(/\s*[,;\t]\s*|\s+/);
    if (cells.length > 2) fail(line, `expected one value, or two columns (time and value), got ${cells.length} columns`);
    if (columns === 0) {
      columns = cells.length;
      firstLine = line;
    } else if (cells.length !== columns) {
      fail(line, `has ${cells.length} column${cells.length === 1 ? '' : 's'} but line ${firstLine} has ${columns}`);
    }
    const numbers = cells.map((cell) => {
      const v = cell === '' ? Number.NaN : Number(cell);
      if (!Number.isFinite(v)) fail(line, `${JSON.stringify(cell)} is not a finite number`);
      return v;
    });
    if (columns === 2) times.push(numbers[0]);
    values.push(numbers[columns - 1]);
    lines.push(line);
  }
  if (values.length === 0) throw new InputError('', 'holds no data (one value per line, or time and value)', { source });
  let tau0FromTimes: number | null = null;
  if (columns === 2) {
    if (times.length < 2) throw new InputError('', 'a time column needs at least two lines to give the sample interval', { source });
    const steps = times.slice(1).map((t, i) => t - times[i]);
    const median = [...steps].sort((a, b) => a - b)[Math.floor(steps.length / 2)];
    if (!(median > 0)) fail(lines[1], `time must increase (from ${times[0]} at line ${lines[0]} to ${times[1]})`);
    steps.forEach((d, i) => {
      if (!(Math.abs(d - median) <= TIME_STEP_TOLERANCE * median)) {
        fail(
          lines[i + 1],
          `the time step ${d} s after line ${lines[i]} differs from the usual (median) step ${median} s by more than ` +
            `${TIME_STEP_TOLERANCE * 100} %: the samples must be uniform (no gaps, time increasing)`,
        );
      }
    });
    tau0FromTimes = (times[times.length - 1] - times[0]) / (times.length - 1);
  }
  return {
    values: Float64Array.from(values),
    times: columns === 2 ? Float64Array.from(times) : null,
    tau0FromTimes,
    lines: Int32Array.from(lines),
  };
}

/** Two-column text (t in s, value) with a comment header: what the soak export writes and this reader reads. */
export function formatDataText(header: readonly string[], times: ArrayLike<number>, values: ArrayLike<number>): string {
  const out = header.map((h) => `# ${h}`);
  for (let i = 0; i < values.length; i++) out.push(`${times[i]} ${values[i]}`);
  return `${out.join('\n')}\n`;
}

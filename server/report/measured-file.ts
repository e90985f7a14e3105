import { readFileSync } from 'node:fs';
import { MIN_STABILITY_SAMPLES, measuredStability, type MeasuredStability } from '../../src/campaign/index.js';
import {
  parseDataText,
  summarize,
  TIME_STEP_TOLERANCE,
  type SeriesKind,
  type SeriesSummary,
  type StabilityMask,
  type SweepSpacing,
} from '../../src/stability/index.js';
import { InputError } from '../../src/util/input-error.js';
import { UsageError } from '../usage-error.js';

export interface MeasuredFileOptions {
  /** Sample interval (s); from the time column when absent. */
  tau0?: number;
  type?: SeriesKind;
  spacing?: SweepSpacing;
  mask?: StabilityMask;
  confidence?: number;
}

/** A measured data file analysed: what `syncring stability` prints and what a report overlays. */
export interface MeasuredFile {
  file: string;
  type: SeriesKind;
  tau0: number;
  /** Where tau0 came from. */
  tau0From: 'option' | 'time column';
  samples: number;
  /** Mean, standard deviation, extremes of the values as given (s for phase, fractional for frequency). */
  values: SeriesSummary;
  stability: MeasuredStability;
}

/** Reads and analyses a plain-text data file (README, "Stability statistics"); errors name the file, the line or the option. */
export function analyzeMeasuredFile(file: string, options: MeasuredFileOptions = {}): MeasuredFile {
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (error) {
    throw new InputError(
      '',
      `cannot be read: ${(error as NodeJS.ErrnoException).code === 'ENOENT' ? 'no such file' : (error as Error).message}`,
      {
        source: file,
      },
    );
  }
  const data = parseDataText(text, file);
  const type = options.type ?? 'phase';
  let tau0: number;
  let tau0From: MeasuredFile['tau0From'];
  if (options.tau0 !== undefined) {
    if (!(options.tau0 > 0) || !Number.isFinite(options.tau0))
      throw new UsageError(`--tau0 must be a positive number of seconds (got ${options.tau0})`);
    if (data.tau0FromTimes !== null && Math.abs(data.tau0FromTimes - options.tau0) > TIME_STEP_TOLERANCE * options.tau0) {
      throw new UsageError(`--tau0 ${options.tau0} disagrees with the time column of ${file}, whose step is ${data.tau0FromTimes} s`);
    }
    tau0 = options.tau0;
    tau0From = 'option';
  } else if (data.tau0FromTimes !== null) {
    tau0 = data.tau0FromTimes;
    tau0From = 'time column';
  } else {
    throw new UsageError(`${file} has one column, so the sample interval must be given: --tau0 SECONDS`);
  }
  if (data.values.length < MIN_STABILITY_SAMPLES) {
    throw new InputError('', `holds ${data.values.length} values; the statistics need at least ${MIN_STABILITY_SAMPLES}`, { source: file });
  }
  const stability = measuredStability(data.values, tau0, {
    input: type,
    spacing: options.spacing ?? 'octave',
    mask: options.mask,
    confidence: options.confidence,
  });
  return { file, type, tau0, tau0From, samples: data.values.length, values: summarize(data.values), stability };
}

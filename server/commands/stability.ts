import { writeFileSync } from 'node:fs';
import { FIT_MIN_EDF, MIN_INDEPENDENT_TERMS, type SeriesKind, type StabilityMask, type SweepSpacing } from '../../src/stability/index.js';
import { loadMask } from '../report/mask-file.js';
import { analyzeMeasuredFile, type MeasuredFile } from '../report/measured-file.js';
import { MASK_CAUTION, MEASURED_CAUTION } from '../../src/campaign/cautions.js';
import { stabilityFileHtml } from '../report/stability-html.js';
import { UsageError } from '../usage-error.js';

export interface StabilityCommandOptions {
  file: string;
  tau0?: number;
  type?: string;
  mask?: string;
  html?: string;
  spacing?: string;
  confidence?: number;
}

/**
 * `syncring stability FILE`: the stability tables of a measured data file with their intervals,
 * as one JSON object; with --html also a small report (README, "Stability statistics").
 */
export function stabilityCommand(o: StabilityCommandOptions): MeasuredFile & Record<string, unknown> {
  const type = o.type ?? 'phase';
  if (type !== 'phase' && type !== 'frequency') throw new UsageError(`--type must be phase or frequency (got ${JSON.stringify(type)})`);
  const spacing = o.spacing ?? 'octave';
  if (spacing !== 'octave' && spacing !== 'decade' && spacing !== '1-2-5')
    throw new UsageError(`--spacing must be octave, decade or 1-2-5 (got ${JSON.stringify(spacing)})`);
  if (o.confidence !== undefined && !(o.confidence > 0 && o.confidence < 1))
    throw new UsageError(`--confidence must be between 0 and 1, e.g. 0.95 (got ${o.confidence})`);
  const mask: StabilityMask | null = o.mask === undefined ? null : loadMask(o.mask);
  const result = analyzeMeasuredFile(o.file, {
    tau0: o.tau0,
    type: type as SeriesKind,
    spacing: spacing as SweepSpacing,
    mask: mask ?? undefined,
    confidence: o.confidence,
  });
  if (o.html !== undefined) writeFileSync(o.html, stabilityFileHtml(result, mask));
  return {
    ...result,
    caution: MEASURED_CAUTION,
    thresholds: {
      minIndependentTerms: MIN_INDEPENDENT_TERMS,
      fitMinEdf: FIT_MIN_EDF,
      note: `values on fewer than ${MIN_INDEPENDENT_TERMS} independent terms are marked reliable: false; slopes use taus with edf >= ${FIT_MIN_EDF} only`,
    },
    ...(mask ? { mask, maskCaution: MASK_CAUTION } : {}),
    ...(o.html !== undefined ? { html: o.html } : {}),
  };
}

import { existsSync, readFileSync } from 'node:fs';
import { basename, dirname, extname, isAbsolute, join } from 'node:path';
import { parseMask, parseMaskCsv, type StabilityMask } from '../../src/stability/index.js';
import { builtInMaskNames, builtInMaskRaw } from '../../src/scenarios/masks.js';
import { InputError } from '../../src/util/input-error.js';
import { parseJsonText } from '../scenario-file.js';

/**
 * A mask from a file (JSON, or CSV when the name ends in .csv or the text does not start with
 * '{'), or a built-in mask by name when no such file exists. Errors name the file and the field
 * or line.
 */
export function loadMask(pathOrName: string): StabilityMask {
  if (!existsSync(pathOrName)) {
    if (builtInMaskNames.includes(pathOrName)) return parseMask(builtInMaskRaw(pathOrName), `built-in mask ${pathOrName}`);
    throw new InputError('', `no such mask file (built-in masks: ${builtInMaskNames.join(', ')})`, { source: pathOrName });
  }
  let text: string;
  try {
    text = readFileSync(pathOrName, 'utf8');
  } catch (error) {
    throw new InputError('', `cannot be read: ${(error as Error).message}`, { source: pathOrName });
  }
  const csv = extname(pathOrName).toLowerCase() === '.csv' || !text.trimStart().startsWith('{');
  if (csv) return parseMaskCsv(text, pathOrName, basename(pathOrName, extname(pathOrName)));
  return parseMask(parseJsonText(text, pathOrName), pathOrName);
}

/**
 * A campaign's raw JSON with a mask file named in stability.mask replaced by the mask itself (a
 * built-in mask name stays), so the soak's log header holds the mask and a resume or a report
 * needs no file beside it. The file name is read relative to the campaign file's folder.
 */
export function inlineCampaignMask(raw: unknown, campaignSource: string): unknown {
  const stability = (raw as { stability?: { mask?: unknown } } | null)?.stability;
  const ref = stability?.mask;
  if (typeof ref !== 'string' || builtInMaskNames.includes(ref)) return raw;
  const base = campaignSource.startsWith('built-in:') ? '.' : dirname(campaignSource);
  const path = isAbsolute(ref) ? ref : join(base, ref);
  let mask: StabilityMask;
  try {
    mask = loadMask(path);
  } catch (error) {
    if (error instanceof InputError) throw new InputError('stability.mask', error.message, { source: campaignSource });
    throw error;
  }
  return { ...(raw as object), stability: { ...stability, mask } };
}

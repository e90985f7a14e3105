/**
 * Power-law noise of one part: one-sided S_y(f) = sum h_a f^a of its fractional frequency (NIST
 * SP 1065 terminology): white PM h2, flicker PM h1, white FM h0, flicker FM h-1 (hm1 here),
 * random-walk FM h-2 (hm2). Phase-modulation terms are added at the output (the buffer after the
 * resonator); the others drive the resonator's frequency inside the loop.
 */
import { InputError } from '../util/input-error.js';

export interface PowerLawNoise {
  h2: number;
  h1: number;
  h0: number;
  hm1: number;
  hm2: number;
}

export const NO_POWER_LAW_NOISE: Readonly<PowerLawNoise> = Object.freeze({ h2: 0, h1: 0, h0: 0, hm1: 0, hm2: 0 });

/** The coefficient names as the trade writes them, and the field each one fills. */
const NAMES: Record<string, keyof PowerLawNoise> = { h2: 'h2', h1: 'h1', h0: 'h0', 'h-1': 'hm1', 'h-2': 'hm2' };

/** S_y(f) of the frequency-modulation terms (inside the loop). */
export function frequencyModulation(noise: PowerLawNoise, f: number): number {
  return noise.h0 + noise.hm1 / f + noise.hm2 / (f * f);
}

/** S_y(f) of the phase-modulation terms (at the output). */
export function phaseModulation(noise: PowerLawNoise, f: number): number {
  return noise.h2 * f * f + noise.h1 * f;
}

/** Independent noises add term by term. */
export function addPowerLaw(a: PowerLawNoise, b: PowerLawNoise): PowerLawNoise {
  return { h2: a.h2 + b.h2, h1: a.h1 + b.h1, h0: a.h0 + b.h0, hm1: a.hm1 + b.hm1, hm2: a.hm2 + b.hm2 };
}

/**
 * "h0=1e-22,h-1=4e-25": the coefficients named, the rest zero. Each must be a finite number >= 0;
 * errors name `where` (the flag or field the text came from).
 */
export function parsePowerLawNoise(text: string, where: string): PowerLawNoise {
  const noise: PowerLawNoise = { ...NO_POWER_LAW_NOISE };
  const seen = new Set<string>();
  for (const item of text.split(',')) {
    const match = /^\s*(h-?[0-2])\s*=\s*(\S+)\s*$/.exec(item);
    const field = match ? NAMES[match[1]] : undefined;
    if (!match || !field) {
      throw new InputError(
        where,
        `expected NAME=VALUE items separated by commas with NAME one of ${Object.keys(NAMES).join(', ')} (got ${JSON.stringify(item.trim())})`,
      );
    }
    if (seen.has(match[1])) throw new InputError(where, `${match[1]} is given twice`);
    seen.add(match[1]);
    const value = Number(match[2]);
    if (!Number.isFinite(value) || value < 0)
      throw new InputError(where, `${match[1]} must be a finite number >= 0 (got ${JSON.stringify(match[2])})`);
    noise[field] = value;
  }
  return noise;
}

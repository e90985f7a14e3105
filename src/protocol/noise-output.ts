import type { LockedNoise } from '../noise/locked-noise.js';
import type { PowerLawNoise } from '../noise/power-law.js';
import type { PatternKind } from '../pattern/classify.js';

/**
 * What `syncring noise` prints and GET /api/noise answers: the noise of one locked pattern at
 * every time scale (src/noise/locked-noise.ts), with the pattern it belongs to and what noise
 * went in. Phase noise is L(f) in dBc/Hz; deviations are dimensionless (ADEV, MDEV) or seconds
 * (TDEV); tau in seconds.
 */
export interface NoiseOutput extends LockedNoise {
  scenario: string;
  pattern: { index: number; kind: PatternKind; q: number | null; mode: number; stable: boolean | null; wantedMode: boolean };
  /** Whether the carrier frequency (and so every second) rests on the default nominal frequency. */
  carrierAssumed: boolean;
  /** Per node, the power-law noise analysed: the model's own (as coefficients) plus the parts' (--part-noise). */
  sources: {
    /** The model's additive white noise intensity q (per unit tau) and detuning random walk (per unit tau). */
    model: { intensity: number; detuningWalk: number };
    /** The parts' coefficients from --part-noise, the same for every node; null when none were given. */
    parts: PowerLawNoise | null;
    /** Per node, the scenario's own part noise (noise.powerLaw or the fit of noise.phaseNoise); null when it gives none. */
    scenarioParts?: PowerLawNoise[] | null;
  };
  notes: Record<string, string>;
  warnings: string[];
  /** Beside every stability result (src/campaign/cautions.ts). */
  caution: string;
  wallSeconds: number;
}

/** GET /api/noise: the analysis of the live parameters, and which parameters it was made for. */
export interface NoiseResponse extends NoiseOutput {
  /** The live parameters' prediction fingerprint (the catalogue's), without the noise. */
  fingerprint: string;
  fromCache: boolean;
  scenarioName: string;
}

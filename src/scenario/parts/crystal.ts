/**
 * The electrical formulas of a quartz crystal's equivalent circuit (Butterworth-Van Dyke: a
 * motional arm L1, C1, R1 shunted by C0) and of its operation with a load capacitance C_L. Each is
 * derived, with its source, in docs/parts.md; the numbers are SI (Hz, ohm, farad, henry).
 */

const TWO_PI = 2 * Math.PI;
const PPM = 1e-6;
const PICOFARAD = 1e-12;

/** L1 = 1 / ((2 pi f_s)^2 C1): the motional arm resonates at the series frequency f_s. */
export function motionalInductance(seriesFrequencyHz: number, motionalCapacitanceF: number): number {
  const w = TWO_PI * seriesFrequencyHz;
  return 1 / (w * w * motionalCapacitanceF);
}

/** Q = 1 / (2 pi f_s R1 C1) = 2 pi f_s L1 / R1, the motional arm's quality at f_s. */
export function crystalQuality(seriesFrequencyHz: number, motionalResistanceOhm: number, motionalCapacitanceF: number): number {
  return 1 / (TWO_PI * seriesFrequencyHz * motionalResistanceOhm * motionalCapacitanceF);
}

/** C1 / (2 (C0 + C_L)): the load resonance f_L above f_s, as a fraction of f_s. */
export function loadPulling(motionalCapacitanceF: number, shuntCapacitanceF: number, loadCapacitanceF: number): number {
  return motionalCapacitanceF / (2 * (shuntCapacitanceF + loadCapacitanceF));
}

/** f_L = f_s (1 + C1 / (2 (C0 + C_L))). */
export function loadFrequency(
  seriesFrequencyHz: number,
  motionalCapacitanceF: number,
  shuntCapacitanceF: number,
  loadCapacitanceF: number,
): number {
  return seriesFrequencyHz * (1 + loadPulling(motionalCapacitanceF, shuntCapacitanceF, loadCapacitanceF));
}

/** f_L relative to f_s in ppm. */
export function loadPullingPpm(motionalCapacitanceF: number, shuntCapacitanceF: number, loadCapacitanceF: number): number {
  return loadPulling(motionalCapacitanceF, shuntCapacitanceF, loadCapacitanceF) / PPM;
}

/** d(pulling in ppm) / d(C_L in pF) = -C1 / (2 (C0 + C_L)^2), scaled to ppm per pF (negative: more load, lower frequency). */
export function pullabilityPpmPerPf(motionalCapacitanceF: number, shuntCapacitanceF: number, loadCapacitanceF: number): number {
  const total = shuntCapacitanceF + loadCapacitanceF;
  return ((-motionalCapacitanceF / (2 * total * total)) * PICOFARAD) / PPM;
}

/**
 * (C_L / (C0 + C_L))^2: a small impedance in series with the load, outside the crystal, appears in
 * series with the motional arm multiplied by this factor (docs/parts.md, 'Referring the circuit to
 * the motional arm'). Its inverse gives the crystal's resistance at the load, R_L = R1 (1 + C0/C_L)^2.
 */
export function referralFactor(shuntCapacitanceF: number, loadCapacitanceF: number): number {
  const ratio = loadCapacitanceF / (shuntCapacitanceF + loadCapacitanceF);
  return ratio * ratio;
}

/** R_L = R1 (1 + C0 / C_L)^2, the crystal's effective series resistance at the load resonance. */
export function loadResonanceResistance(motionalResistanceOhm: number, shuntCapacitanceF: number, loadCapacitanceF: number): number {
  return motionalResistanceOhm / referralFactor(shuntCapacitanceF, loadCapacitanceF);
}

/** The load capacitance at which the crystal runs at fHz: C_L = C1 / (2 (f / f_s - 1)) - C0 (the load formula solved for C_L); NaN where no load reaches it. */
export function loadForFrequency(
  seriesFrequencyHz: number,
  motionalCapacitanceF: number,
  shuntCapacitanceF: number,
  frequencyHz: number,
): number {
  const pulling = frequencyHz / seriesFrequencyHz - 1;
  const load = pulling > 0 ? motionalCapacitanceF / (2 * pulling) - shuntCapacitanceF : NaN;
  return load > 0 ? load : NaN;
}

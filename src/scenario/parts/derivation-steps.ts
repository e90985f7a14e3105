/**
 * The steps from parts to model numbers, each with its formula and where it comes from, in the
 * order docs/parts.md derives them. `syncring explain` prints this list beside the numbers.
 */
export interface DerivationStep {
  quantity: string;
  formula: string;
  source: string;
}

const BVD =
  'Butterworth-Van Dyke equivalent circuit of a crystal (textbook; e.g. Frerking, Crystal Oscillator Design and Temperature Compensation, 1978, from memory)';

export const DERIVATION: readonly DerivationStep[] = [
  { quantity: 'motionalInductanceH', formula: 'L1 = 1 / ((2 pi f_s)^2 C1)', source: `${BVD}: the motional arm resonates at f_s` },
  { quantity: 'quality', formula: 'Q = 1 / (2 pi f_s R1 C1) = 2 pi f_s L1 / R1', source: `${BVD}; the quality of a series RLC arm` },
  {
    quantity: 'loadFrequencyHz, loadPullingPpm',
    formula: 'f_L = f_s (1 + C1 / (2 (C0 + C_L))), pulling = C1 / (2 (C0 + C_L))',
    source: `${BVD}: C1 in series with C0 + C_L, to first order in C1 / (C0 + C_L) (docs/parts.md, 'Load resonance')`,
  },
  {
    quantity: 'pullabilityPpmPerPf',
    formula: 'S = d pulling / d C_L = -C1 / (2 (C0 + C_L)^2)',
    source: 'derivative of the pulling formula (textbook, common practice)',
  },
  {
    quantity: 'detuningPpm, model.detuning',
    formula: 'delta_k = f_L,k / f0 - 1 with C_L,k = C_L + tolerance_k + trim_k; Delta_k = delta_k / eps',
    source: "docs/model.md, 'Reference model' (detuning), src/scenario/units.ts",
  },
  {
    quantity: 'loadResonanceResistanceOhm',
    formula: 'R_L = R1 (1 + C0 / C_L)^2',
    source:
      "series impedance outside the crystal referred to the motional arm by (C_L / (C0 + C_L))^2 (docs/parts.md, 'Referring the circuit to the motional arm')" +
      '; the usual effective resistance at load (common practice)',
  },
  {
    quantity: 'startupMargin',
    formula: 'm = |R_n| / R_L = |R_n| (C_L / (C0 + C_L))^2 / R1',
    source: 'negative-resistance start-up criterion (common practice: margin about 3 to 5 asked; below 1 it never starts)',
  },
  {
    quantity: 'epsilon',
    formula: 'eps = R1 / (2 pi f0 L1) of the nominal crystal unless the scenario gives epsilon',
    source: "the model's small parameter set to the crystal's loss per radian (docs/parts.md, 'Model scale')",
  },
  {
    quantity: 'model.modes[j].loss',
    formula: 'd_j = R1_j / (eps 2 pi f0 L1_j) (= omega_j / (eps Q_j) at the model frequency)',
    source: "src/scenario/units.ts (quality -> loss), docs/model.md, 'Reference model'",
  },
  {
    quantity: 'model.modes[j].gain',
    formula: 'g_j = m_j d_j with m_j = |R_n| (C_L / (C0 + C_L))^2 / R1_j',
    source:
      "one sustaining circuit drives every motional arm with the same current-dependent voltage (docs/parts.md, 'Sustaining circuit')",
  },
  {
    quantity: 'model.modes[1].omega',
    formula: 'omega_1 = f_L,spurious / f_L,wanted with f_s,spurious = f_s (1 + offsetHz / f_s)',
    source: "the unwanted arm's own load resonance (docs/parts.md, 'Unwanted modes')",
  },
  {
    quantity: 'model.coupling',
    formula:
      'kappa = 2 P 1e-6 / eps, sigma = cos alpha, rho = sin alpha; network: P = (t / 2) |R + jX| / (2 pi f0 L1), alpha = atan2(-X, R), t = (C_L / (C0 + C_L))^2',
    source:
      "docs/model.md, 'Phase equations' (pull and angle); mesh analysis of a branch shared by two crystal loops (docs/parts.md, 'Coupling network')",
  },
  {
    quantity: 'driveLevelW',
    formula: 'P = R1 I_rms^2 with motional current amplitude I = 2 pi f_L q_ref |a|, free-running |a|^2 = 4 (1 - 1/m)',
    source: "drive level as power dissipated in R1 (common practice); free-running amplitude from docs/model.md, 'Closed form for M = 1'",
  },
];

/**
 * What a PASS and a stability figure do and do not mean, in plain words. The one source of the
 * caution texts: the dashboard, the soak report, the soak's summary and the server's start-up
 * lines all take them from here, so the wording cannot drift apart.
 */

const NOT_A_MASK = "It does not mean compliance with any standard's mask.";
const QUALIFY = 'Qualify real hardware to the standards that apply, with accredited practice.';

/** Beside every PASS: a verdict judges this campaign's own criteria, nothing more. */
export const PASS_CAUTION = `PASS means this campaign's criteria were met under the simulated noise model. ${NOT_A_MASK} ${QUALIFY}`;

/** Beside every frequency-stability result (ADEV, TDEV, MTIE, offsets, ratios). */
export const STABILITY_CAUTION = `These stability figures come from the simulated noise model, not from a measured part. ${NOT_A_MASK} ${QUALIFY}`;

/** Beside every mask margin and mask verdict: a table someone supplied, compared with one record. */
export const MASK_CAUTION =
  'A mask margin compares this record with the table of limits supplied; it is not a compliance test. ' +
  `syncring ships no standard's mask; the demo's mask is invented. ${QUALIFY}`;

/**
 * Beside the results of `syncring stability` on a measured file: the figures are the file's, and
 * the intervals rest on a noise model.
 */
export const MEASURED_CAUTION =
  'These figures describe the data file supplied, as recorded. The intervals assume Gaussian power-law noise of the type shown ' +
  `at each tau; drifts, steps and gaps in the record are not modelled. ${NOT_A_MASK} ${QUALIFY}`;

/**
 * Where a PASS sits in a row among many (a verdict table), the full text beside each one would
 * bury the table: this short form goes beside each, with PASS_CAUTION once beside the table.
 */
export const PASS_CAUTION_SHORT = "simulated criteria, not a standard's mask";

/** The page-wide caution (header, footer, start-up), covering both kinds of result. */
export const SIMULATION_CAUTION =
  'Simulation does not replace qualification of real hardware. ' +
  "A PASS or a stability figure here holds under the simulated noise model only and does not mean compliance with any standard's mask. " +
  QUALIFY;

/** Beside figures derived from part values (syncring explain, the dashboard's engineering values). */
export const PARTS_CAUTION =
  'These figures follow from the stated part values by textbook formulas; real parts spread, age and drift with temperature. ' +
  `A start-up margin here does not replace a start-up test of the real circuit over temperature and supply. ${QUALIFY}`;

/** Beside every yield figure: the share of simulated boards that met the study's criteria, under the tolerances the study assumed. */
export const YIELD_CAUTION =
  "A yield here is the share of simulated boards, drawn from the study's assumed tolerances, that met the study's criteria under the model. " +
  'It is not a measured production yield: simulation does not replace qualification of real hardware, and equipment in telecom, ' +
  'power or navigation service follows the applicable standards and accredited practice.';

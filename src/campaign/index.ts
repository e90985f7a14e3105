/** Public API of fault campaigns: format and validation, the seeded generator, verdicts, stability of the array. */
export { parseCampaign, tauPerUnit, DEFAULT_MAX_SAMPLES } from './parse.js';
export { CampaignRun, type CampaignRunState, type PendingRestore, type QueuedPerturbation } from './campaign-run.js';
export { FaultGenerator, type GeneratorState } from './generator.js';
export { FaultEvaluation, spanOf, type FaultVerdict, type Span, type TimeBase, type VerdictOutcome } from './verdict.js';
export { tickViewOf, patternLabel, predictionOf, type TickView, type SystemView, type PredictionView } from './tick-view.js';
export {
  PhaseRecorder,
  NodePhases,
  PHASE_SERIES,
  type PhaseSample,
  type PhaseSeriesName,
  type PhaseRecorderState,
} from './phase-record.js';
export {
  analyzeStability,
  measuredStability,
  timeErrorOf,
  SERIES_LABELS,
  MIN_STABILITY_SAMPLES,
  type StabilityReport,
  type SeriesStability,
  type MeasuredStability,
  type MaskResult,
  type StabilityAnalysisOptions,
} from './stability-analysis.js';
export { appliesToUncoupled, previousValuesOf } from './restore.js';
export type * from './types.js';

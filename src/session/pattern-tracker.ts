import { classifySnapshot, type PatternKind } from '../pattern/classify.js';
import { patternSymmetry } from '../pattern/symmetry.js';
import { LockDetector } from '../observe/lock-detector.js';
import { modeAmplitudes, type SystemObservables } from '../observe/amplitudes.js';
import { neighbourPhaseDifferences } from '../observe/amplitudes.js';

export type ObservedPatternKind = PatternKind | 'unlocked';

export interface SymmetryElement {
  /** Readable name of the group element, e.g. "rotation by 2", "reflection k -> 3 - k". */
  element: string;
  /** Node permutation, perm[k] = gamma(k). */
  permutation: number[];
  /** gamma . a = e^{i phase} a; in the full system this is a time shift of phase / omega. */
  phase: number;
}

export interface PatternReport {
  kind: ObservedPatternKind;
  /** Wave number (neighbour phase difference 2 pi q / N) where it applies. */
  q?: number;
  locked: boolean;
  /** tau at which the current lock began. */
  lockedSince: number | null;
  /** The mode that carries the energy and whose pattern this is. */
  mode: number;
  /** Shape of the current snapshot even when not (yet) locked. */
  shape: PatternKind;
  clusters?: number[][];
  /** R_q for q = 0..N-1 of the carrying mode. */
  orderParameters: number[];
  /** Spatio-temporal symmetry of the snapshot: elements of the network's group with their phase. */
  symmetry: SymmetryElement[];
  /** Largest excursion of a phase difference over the lock window (radians). */
  excursion: number;
}

/**
 * Follows one system's pattern over time: lock detection over a window on the carrying mode's
 * phase differences, the shape of the latest snapshot, and its symmetry in the network's group.
 */
export class PatternTracker {
  private readonly detector: LockDetector;
  private carryingMode = 0;

  constructor(readonly nodes: number, readonly modes: number, windowTicks: number, lockTolerance: number, readonly symmetryTolerance: number) {
    this.detector = new LockDetector(nodes, Math.max(2, windowTicks), lockTolerance);
  }

  reset(): void {
    this.detector.reset();
  }

  save(): { carryingMode: number; detector: ReturnType<LockDetector['save']> } {
    return { carryingMode: this.carryingMode, detector: this.detector.save() };
  }

  load(saved: ReturnType<PatternTracker['save']>): void {
    this.carryingMode = saved.carryingMode;
    this.detector.load(saved.detector);
  }

  observe(tau: number, y: Float64Array, observed: SystemObservables, group: Int32Array[]): PatternReport {
    const mode = observed.dominantMode;
    if (mode !== this.carryingMode) {
      this.carryingMode = mode;
      this.detector.reset();
    }
    const differences = mode === 0 ? observed.phaseDifferences : neighbourPhaseDifferences(observed.phase, mode);
    const meanAmplitude = observed.amplitude.reduce((s, a) => s + a[mode], 0) / this.nodes;
    const locked = this.detector.push(tau, differences, meanAmplitude);
    const { re, im } = modeAmplitudes(y, this.nodes, this.modes, mode);
    const quiet = !(meanAmplitude > 1e-9);
    const shape = quiet ? null : classifySnapshot(re, im);
    const symmetry = quiet
      ? []
      : patternSymmetry(re, im, group, this.symmetryTolerance).map((s) => ({
          element: s.text,
          permutation: Array.from(s.element),
          phase: s.phase,
        }));
    const kind: ObservedPatternKind = locked && shape ? shape.kind : 'unlocked';
    const report: PatternReport = {
      kind,
      locked,
      lockedSince: this.detector.lockedSince,
      mode,
      shape: shape?.kind ?? 'cluster',
      orderParameters: shape ? Array.from(shape.orderParameters) : new Array(this.nodes).fill(0),
      symmetry,
      excursion: this.detector.excursion(differences),
    };
    if (shape?.q !== undefined) report.q = shape.q;
    if (shape?.clusters) report.clusters = shape.clusters;
    return report;
  }
}

import { classifySnapshot, type PatternKind } from '../pattern/classify.js';
import { patternSymmetry } from '../pattern/symmetry.js';
import { combining } from '../pattern/combining.js';
import { LockDetector, type LockDetectorState, type LockStatus, type LockTransition } from '../observe/lock-detector.js';
import { modeAmplitudes, neighbourPhaseDifferences, type SystemObservables } from '../observe/amplitudes.js';
import type { CoupledPairs } from '../observe/coupled-pairs.js';
import { wrapAngle } from '../util/angles.js';

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
  /** The committed pattern while locked or settling; 'unlocked' otherwise. */
  kind: ObservedPatternKind;
  /** Wave number (neighbour phase difference 2 pi q / N) where it applies. */
  q?: number;
  /** Frequency-locked: no cycle slip since the lock began (true while locked or settling). */
  locked: boolean;
  /** locked (settled), settling (locked but moving, or deformed for a moment), or unlocked. */
  status: LockStatus;
  /** tau at which the current lock began. */
  lockedSince: number | null;
  /** tau at which the ring last settled (null while settling or unlocked). */
  settledSince: number | null;
  /** tau at which the current settling began (null unless settling). */
  settlingSince: number | null;
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
  /** Largest unwrapped move of a coupled pair's phase difference since the ring was last settled (rad); pi is a slip. */
  move: number;
  /** Cycle slips since the run began. */
  slips: number;
  /** Largest phase distance of a node from the array's mean phase (rad), carrying mode; null when the sum vanishes. */
  spread: number | null;
  /** 20 log10(|mean a| / mean |a|) of the carrying mode: the summed output against N parts in phase (dB, <= 0). */
  combiningLossDb: number | null;
}

/**
 * Where a pattern lies under the current parameters (the live prediction's continued state, or
 * the exact locked state the guiding system sits on): a state this close to it is that pattern,
 * whatever its snapshot shape. `label` is the pattern's identity, `kind` and `q` its name.
 */
export interface ContinuationHint {
  label: string;
  kind: PatternKind;
  q?: number;
  mode: number;
  phaseDifferences: number[];
}

/** "in-phase q=0 on mode 0": the identity of a pattern (what a pattern change changes). */
export function patternIdentity(kind: string, q: number | undefined, mode: number): string {
  return `${kind}${q !== undefined ? ` q=${q}` : ''} on mode ${mode}`;
}

/**
 * Largest distance (rad, in every neighbour difference) at which a settled state counts as the
 * predicted continued state: half the spacing 2 pi / N of neighbouring twisted states, capped
 * at 0.5 rad, and never below three lock tolerances (the noise wander of a locked state).
 */
export function continuationTolerance(nodes: number, lockTolerance: number): number {
  return Math.max(3 * lockTolerance, Math.min(0.5, Math.PI / nodes));
}

interface CommittedShape {
  kind: PatternKind;
  q?: number;
  clusters?: number[][];
}

export interface PatternTrackerState {
  carryingMode: number;
  detector: LockDetectorState;
  committed?: CommittedShape | null;
  hint?: ContinuationHint | null;
}

/**
 * Follows one system's pattern over time: the lock detector on the carrying mode's phase
 * differences of the coupled pairs, the shape of the latest snapshot, and its symmetry in the
 * network's group. The
 * identity handed to the detector is the snapshot's shape, except that a state on the
 * predicted continuation of the committed pattern keeps the committed identity (a strained
 * in-phase state can classify as a cluster).
 */
export class PatternTracker {
  private readonly detector: LockDetector;
  private carryingMode = 0;
  private committed: CommittedShape | null = null;
  private hint: ContinuationHint | null = null;
  private readonly matchTolerance: number;
  private readonly pairDifferences: Float64Array;

  constructor(
    readonly nodes: number,
    readonly modes: number,
    private readonly pairs: CoupledPairs,
    windowTicks: number,
    readonly lockTolerance: number,
    readonly symmetryTolerance: number,
  ) {
    this.detector = new LockDetector(pairs.size, Math.max(2, windowTicks), lockTolerance);
    this.matchTolerance = continuationTolerance(nodes, lockTolerance);
    this.pairDifferences = new Float64Array(pairs.size);
  }

  /** The committed pattern's identity, or 'unlocked'. */
  get label(): string {
    return this.detector.label ?? 'unlocked';
  }

  get locked(): boolean {
    return this.detector.locked;
  }

  /** The committed pattern as the live predictor wants it (kind, q, mode, locked). */
  committedPattern(): { kind: ObservedPatternKind; q?: number; mode: number; locked: boolean } {
    const c = this.committed;
    if (!this.detector.locked || !c) return { kind: 'unlocked', mode: this.carryingMode, locked: false };
    return c.q !== undefined
      ? { kind: c.kind, q: c.q, mode: this.carryingMode, locked: true }
      : { kind: c.kind, mode: this.carryingMode, locked: true };
  }

  /** Where the committed pattern is predicted to settle under the current parameters (null: no prediction). */
  expectContinuation(hint: ContinuationHint | null): void {
    this.hint = hint;
  }

  reset(): void {
    this.detector.reset();
    this.committed = null;
  }

  save(): PatternTrackerState {
    return { carryingMode: this.carryingMode, detector: this.detector.save(), committed: this.committed, hint: this.hint };
  }

  load(saved: PatternTrackerState): void {
    this.carryingMode = saved.carryingMode;
    this.detector.load(saved.detector);
    this.committed = saved.committed ?? null;
    this.hint = saved.hint ?? null;
    if (this.detector.locked && !this.committed) this.detector.reset();
  }

  /** One tick: the report for the frame and the lock transition this tick made, if any. */
  observe(
    tau: number,
    y: Float64Array,
    observed: SystemObservables,
    group: Int32Array[],
  ): { report: PatternReport; transition: LockTransition | null } {
    const mode = observed.dominantMode;
    let modeTransition: LockTransition | null = null;
    if (mode !== this.carryingMode) {
      if (this.detector.locked) modeTransition = { kind: 'unlock', was: this.label, cause: 'mode' };
      this.carryingMode = mode;
      this.reset();
    }
    const differences = mode === 0 ? observed.phaseDifferences : neighbourPhaseDifferences(observed.phase, mode);
    const meanAmplitude = observed.amplitude.reduce((s, a) => s + a[mode], 0) / this.nodes;
    const { re, im } = modeAmplitudes(y, this.nodes, this.modes, mode);
    const quiet = !(meanAmplitude > 1e-9);
    const shape = quiet ? null : classifySnapshot(re, im);
    const own = shape ? patternIdentity(shape.kind, shape.q, mode) : 'quiet';
    const identity = this.identityOf(own, mode, differences);
    const pairDifferences = this.pairs.differences(observed.phase, mode, this.pairDifferences);
    const transition = this.detector.push(tau, pairDifferences, meanAmplitude, identity, this.pairs.watched, own) ?? modeTransition;
    if (transition?.kind === 'lock' || transition?.kind === 'pattern-change') {
      const hint = this.hint;
      this.committed =
        identity !== own && hint
          ? { kind: hint.kind, ...(hint.q !== undefined ? { q: hint.q } : {}) }
          : shape
            ? {
                kind: shape.kind,
                ...(shape.q !== undefined ? { q: shape.q } : {}),
                ...(shape.clusters ? { clusters: shape.clusters } : {}),
              }
            : null;
    }
    if (!this.detector.locked) this.committed = null;
    const symmetry = quiet
      ? []
      : patternSymmetry(re, im, group, this.symmetryTolerance).map((s) => ({
          element: s.text,
          permutation: Array.from(s.element),
          phase: s.phase,
        }));
    const combined = quiet ? null : combining(re, im);
    const d = this.detector;
    const committed = d.locked ? this.committed : null;
    const report: PatternReport = {
      kind: committed ? committed.kind : 'unlocked',
      locked: d.locked,
      status: d.status,
      lockedSince: d.lockedSince,
      settledSince: d.settledSince,
      settlingSince: d.settlingSince,
      mode,
      shape: shape?.kind ?? 'cluster',
      orderParameters: shape ? Array.from(shape.orderParameters) : new Array(this.nodes).fill(0),
      symmetry,
      excursion: d.windowExcursion,
      move: d.largestMove,
      slips: d.slips,
      spread: combined?.spread ?? null,
      combiningLossDb: combined?.lossDb ?? null,
    };
    // q and clusters of the committed pattern while locked, of the snapshot while seeking
    const q = committed ? committed.q : shape?.q;
    const clusters = committed ? committed.clusters : shape?.clusters;
    if (q !== undefined) report.q = q;
    if (clusters) report.clusters = clusters;
    return { report, transition };
  }

  /**
   * The snapshot's identity, or the hint's when the state sits near the hinted state: while
   * locked, only a hint for the committed pattern counts (it names where that pattern went);
   * while seeking, any hint on the carrying mode names the state it is settling on.
   */
  private identityOf(own: string, mode: number, differences: ArrayLike<number>): string {
    const committed = this.detector.label;
    const hint = this.hint;
    if (own === committed || !hint || hint.mode !== mode || (committed !== null && hint.label !== committed)) return own;
    for (let k = 0; k < differences.length; k++) {
      if (Math.abs(wrapAngle(differences[k] - hint.phaseDifferences[k])) > this.matchTolerance) return own;
    }
    return hint.label;
  }
}

/**
 * Pseudo-arclength continuation of a locked state of the guiding system in one parameter
 * (Keller's method; Allgower and Georg, Introduction to Numerical Continuation Methods, 1990,
 * ch. 2-3; Kuznetsov, Elements of Applied Bifurcation Theory, 3rd ed. 2004, ch. 10).
 *
 * Unknowns X = (y, Omega_c, mu) with the parameter lambda = lambda_0 + scale * mu; equations
 *     fbar(y; lambda) - sum_c Omega_c G_c y = 0,   <G_c y_ref, y - y_ref> = 0   (one per generator),
 * which leave a curve. Each step predicts along the unit tangent t (null vector of the
 * equations' Jacobian, oriented like the previous one) and corrects with Newton on the
 * hyperplane <t, X - X_pred> = 0, so it passes turning points of lambda.
 *
 * Test functions between consecutive points, located by bisection on the step:
 * - fold: the parameter component of the tangent changes sign (a turning point: the locked state
 *   meets another branch and both disappear; for a detuning this is the edge of the locking range);
 * - the number of eigenvalues of the reduced Jacobian (symmetry zeros removed by construction)
 *   with positive real part changes: a complex pair crossing is a Hopf point, a real eigenvalue
 *   crossing without a turning point a branch point (symmetry-breaking steady bifurcation).
 * The continuation stops at the first of them in each direction, or at a bound of the parameter.
 */
import type { Matrix } from 'ml-matrix';
import { borderedMatrix, dot, norm, solveLinear } from '../util/linear-algebra.js';
import { restrictToComplement } from './orbit-complement.js';
import { applyPhaseGenerator, subtractRotation, type PhaseGenerator } from './phase-orbits.js';
import {
  DIFFERENCE_STEP,
  LOCKED_STATE_TOLERANCE,
  fieldJacobian,
  lockedStateSystem,
  rotatingResidual,
  sortedEigenvalues,
  stabilityOf,
  solveLockedState,
  type LockedStability,
  type Verdict,
} from './locked-state.js';
import type { GuideModel } from './guide-model.js';
import { describeLockedState } from './describe.js';
import {
  describeContinuationParameter,
  getParameter,
  parameterLowerBound,
  parameterScale,
  setParameter,
  type ContinuationParameter,
} from './continuation-parameter.js';
import { deltaToPpm } from '../scenario/units.js';

// Step lengths are arclengths in the scaled unknowns (y, Omega_c, mu), mu the parameter in units
// of its natural scale (parameterScale), so they mean the same for every parameter.
/**
 * Default accepted steps per direction: bounds the work (a dense Jacobian, and with monitoring an
 * eigenvalue problem, per step); a longer branch ends in a 'max-steps' limit that says so.
 */
const MAX_STEPS = 200;
/**
 * Default first step: small against the scaled unknowns (amplitudes near 2, mu of order one
 * across a locking range), so the first corrector starts close; the step grows from there.
 */
const INITIAL_STEP = 0.02;
/** Default largest step: a predictor that strays far from the branch risks a corrector that lands on another one (the turn check catches that only afterwards). */
const MAX_STEP = 0.5;
/** Default smallest step: when the corrector still fails at this length, the failure is not one of step size; the branch ends in 'step-failure'. */
const MIN_STEP = 1e-7;
/** Step growth after an accepted step and cut after a failed one; common practice for continuation step control. */
const STEP_GROWTH = 1.4;
const STEP_CUT = 0.5;
/** Chord-Newton iterations per corrector: from a close prediction it converges in a few; needing more means the step was too long, and it is cut. */
const CORRECTOR_ITERATIONS = 10;
/** A corrected point is solved as tightly as any locked state (solveLockedState's default residual)... */
const CORRECTOR_RESIDUAL = LOCKED_STATE_TOLERANCE;
/** ... and its last update is this small (scaled units): the chord iteration converges only linearly, so a small residual alone could be a point still moving. */
const CORRECTOR_UPDATE = 1e-6;
/** Consecutive unit tangents must agree this well (cos 18 degrees): a sharper turn means the corrector may have jumped to another branch, and the step is cut. */
const MIN_TURN_COSINE = 0.95;
/** An event is located by bisecting the step until its bracket is below LOCATE_RESOLUTION of the step; 30 halvings reach 2^-30 = 9.3e-10. */
const LOCATE_BISECTIONS = 30;
const LOCATE_RESOLUTION = 1e-9;
/** An event this close to a range end or bound (in units of the parameter's scale) counts as on it: the rounding of lambda_0 + scale mu. */
const BOUND_SLACK = 1e-9;
/**
 * A crossing eigenvalue with |Im| above this share of the rate scale is a complex pair (Hopf),
 * below it a real eigenvalue (branch point): it keeps rounding in the imaginary part of a real
 * eigenvalue from reading as a Hopf point.
 */
const HOPF_IMAGINARY = 1e-6;

export interface ContinuationOptions {
  /** Which ways to go from the start; default both. */
  directions?: readonly ('decreasing' | 'increasing')[];
  /** Accepted steps per direction; default MAX_STEPS (200). */
  maxSteps?: number;
  /** First and largest arclength step (scaled units); defaults INITIAL_STEP (0.02) and MAX_STEP (0.5). */
  initialStep?: number;
  maxStep?: number;
  /** Give up when the step falls below this; default MIN_STEP (1e-7). */
  minStep?: number;
  /** Stop when the parameter leaves [min, max]. */
  range?: { min?: number; max?: number };
  /** Keep each point's state (rotating frame) in the branch data; default false. */
  keepStates?: boolean;
  /**
   * Compute eigenvalues at every point and stop at Hopf and branch points (default true). Without
   * it only folds are detected and the points carry no stability; it saves one dense eigenvalue
   * problem per step when only the existence of the branch matters.
   */
  monitorStability?: boolean;
}

export interface BranchPoint {
  parameter: number;
  /** The parameter in ppm (detuning only). */
  ppm: number | null;
  amplitudes: number[][];
  meanAmplitude: number[];
  phaseDifferences: number[];
  rotation: number[];
  /** Stability of the point; null when the continuation ran without monitorStability. */
  stability: Verdict | null;
  stable: boolean | null;
  margin: number | null;
  /** Eigenvalues of the reduced Jacobian with positive real part (null without monitorStability). */
  unstableCount: number | null;
  /** Locked state (rotating frame), only with options.keepStates. */
  state?: number[];
}

export type LimitKind = 'fold' | 'hopf' | 'branch-point' | 'bound' | 'range' | 'max-steps' | 'step-failure';

export interface BranchLimit {
  kind: LimitKind;
  parameter: number;
  ppm: number | null;
  /** parameter - start value, and the same in ppm for a detuning. */
  distance: number;
  distancePpm: number | null;
  /** For a Hopf point: the crossing pair's imaginary part (slow time). */
  frequency?: number;
  point: BranchPoint;
  message: string;
}

export interface Branch {
  parameter: { name: string; start: number; startPpm: number | null; scale: number };
  /** Points from the decreasing end to the increasing end (the start among them). */
  points: BranchPoint[];
  startIndex: number;
  limits: { decreasing: BranchLimit | null; increasing: BranchLimit | null };
  steps: number;
}

interface Node {
  x: Float64Array; // [y, rates, mu]
  tangent: Float64Array;
  /** Null when stability is not monitored. */
  stability: LockedStability | null;
  unstable: number;
}

/** Follows the locked state near `start` (see the module header). The model's parameters are restored afterwards. */
export function continueBranch(
  model: GuideModel,
  start: Float64Array,
  parameter: ContinuationParameter,
  options: ContinuationOptions = {},
): Branch {
  const params = model.params;
  const lambda0 = getParameter(params, parameter);
  try {
    return new Continuation(model, parameter, lambda0, options).run(start);
  } finally {
    setParameter(params, parameter, lambda0);
  }
}

class Continuation {
  private readonly n: number;
  private readonly modes: number;
  private readonly scale: number;
  private generators: PhaseGenerator[] = [];
  private g = 0;
  private reference = new Float64Array(0);
  private readonly ppm: (value: number) => number | null;
  private steps = 0;

  constructor(
    private readonly model: GuideModel,
    private readonly parameter: ContinuationParameter,
    private readonly lambda0: number,
    private readonly options: ContinuationOptions,
  ) {
    this.n = model.size;
    this.modes = model.modes;
    this.scale = parameterScale(model.params, parameter);
    const eps = model.params.epsilon;
    this.ppm = (value) => (parameter.kind === 'detuning' && eps > 0 ? deltaToPpm(value, eps) : null);
  }

  run(start: Float64Array): Branch {
    const { model, n } = this;
    setParameter(model.params, this.parameter, this.lambda0);
    const parts = model.parts();
    const first = solveLockedState(model.field, start, this.modes, { parts });
    if (!first.converged)
      throw new RangeError(`continuation: no locked state near the start (Newton residual ${first.residual.toExponential(2)})`);
    this.generators = first.generators;
    this.g = this.generators.length;
    const x0 = new Float64Array(n + this.g + 1);
    x0.set(first.state);
    first.rates.forEach((r, c) => (x0[n + c] = r));
    const directions = this.options.directions ?? ['decreasing', 'increasing'];
    const startNode = this.evaluateNode(x0, null, 1);
    const sides: Record<'decreasing' | 'increasing', { points: Node[]; limit: BranchLimit | null }> = {
      decreasing: { points: [], limit: null },
      increasing: { points: [], limit: null },
    };
    for (const direction of directions) {
      const sign = direction === 'decreasing' ? -1 : 1;
      const oriented = this.evaluateNode(x0, null, sign);
      sides[direction] = this.follow(oriented);
    }
    const down = sides.decreasing.points.map((p) => this.point(p)).reverse();
    const up = sides.increasing.points.map((p) => this.point(p));
    return {
      parameter: {
        name: describeContinuationParameter(this.parameter),
        start: this.lambda0,
        startPpm: this.ppm(this.lambda0),
        scale: this.scale,
      },
      points: [...down, this.point(startNode), ...up],
      startIndex: down.length,
      limits: { decreasing: sides.decreasing.limit, increasing: sides.increasing.limit },
      steps: this.steps,
    };
  }

  private lambda(x: Float64Array): number {
    return this.lambda0 + this.scale * x[this.n + this.g];
  }

  /** The phase-condition anchors G_c y_ref of the current reference point. */
  private anchors(): Float64Array[] {
    return this.generators.map((gen) => applyPhaseGenerator(gen, this.modes, this.reference, new Float64Array(this.n)));
  }

  /** H(X): rotating-frame residual and phase conditions. */
  private residual(x: Float64Array): Float64Array {
    const { n, g, modes } = this;
    setParameter(this.model.params, this.parameter, this.lambda(x));
    const y = x.subarray(0, n);
    const out = new Float64Array(n + g);
    rotatingResidual(this.model.field, y, this.generators, x.subarray(n, n + g), modes, out.subarray(0, n), new Float64Array(n));
    this.anchors().forEach((anchor, c) => {
      let s = 0;
      for (let i = 0; i < n; i++) s += anchor[i] * (y[i] - this.reference[i]);
      out[n + c] = s;
    });
    return out;
  }

  /** DH(X), (n + g) x (n + g + 1); also returns the rotating-frame state Jacobian block. */
  private jacobian(x: Float64Array): { full: Matrix; state: Matrix } {
    const { n, g, modes } = this;
    const y = Float64Array.from(x.subarray(0, n));
    const rates = Array.from(x.subarray(n, n + g));
    const lambda = this.lambda(x);
    setParameter(this.model.params, this.parameter, lambda);
    const state = fieldJacobian(this.model.field, y);
    subtractRotation(state, this.generators, rates, modes);
    const h = DIFFERENCE_STEP * Math.max(1, Math.abs(x[n + g]));
    const plus = new Float64Array(n);
    const minus = new Float64Array(n);
    setParameter(this.model.params, this.parameter, lambda + h * this.scale);
    this.model.field(y, plus);
    setParameter(this.model.params, this.parameter, lambda - h * this.scale);
    this.model.field(y, minus);
    setParameter(this.model.params, this.parameter, lambda);
    const parameterDerivative = Float64Array.from(plus, (p, i) => (p - minus[i]) / (2 * h));
    const tangents = this.generators.map((gen) => applyPhaseGenerator(gen, modes, y, new Float64Array(n)));
    const full = lockedStateSystem(state, tangents, this.anchors(), [parameterDerivative]);
    return { full, state };
  }

  /** Unit tangent at X oriented like `previous` (or along +-mu when there is none). */
  private tangent(full: Matrix, previous: Float64Array | null, sign: number): Float64Array {
    const size = full.columns;
    const guide = previous ?? Float64Array.from({ length: size }, (_, i) => (i === size - 1 ? sign : 0));
    const rhs = new Float64Array(size);
    rhs[size - 1] = 1;
    const t = solveLinear(borderedMatrix(full, [], [guide]), rhs);
    const len = norm(t);
    const orient = dot(t, guide) < 0 ? -1 : 1;
    return t.map((v) => (orient * v) / len);
  }

  /** Tangent and stability at a solved X. */
  private evaluateNode(x: Float64Array, previousTangent: Float64Array | null, sign: number): Node {
    const { n, modes } = this;
    this.reference = Float64Array.from(x.subarray(0, n));
    const { full, state } = this.jacobian(x);
    const tangent = this.tangent(full, previousTangent, sign);
    if (this.options.monitorStability === false) return { x: Float64Array.from(x), tangent, stability: null, unstable: 0 };
    const y = x.subarray(0, n);
    const tangents = this.generators.map((gen) => applyPhaseGenerator(gen, modes, Float64Array.from(y), new Float64Array(n)));
    const eigenvalues = sortedEigenvalues(restrictToComplement(state, tangents));
    const stability = stabilityOf(eigenvalues, this.model.accuracy);
    return { x: Float64Array.from(x), tangent, stability, unstable: eigenvalues.filter((e) => e.re > 0).length };
  }

  /**
   * Chord-Newton on the hyperplane through `predicted` normal to `t` (the Jacobian is taken once,
   * at the predicted point: the predictor lands close, so the chord converges fast); null when it
   * fails.
   */
  private correct(predicted: Float64Array, t: Float64Array): { x: Float64Array; iterations: number } | null {
    const size = predicted.length;
    const x = Float64Array.from(predicted);
    const { full } = this.jacobian(x);
    const system = borderedMatrix(full, [], [t]);
    for (let iteration = 1; iteration <= CORRECTOR_ITERATIONS; iteration++) {
      const h = this.residual(x);
      let along = 0;
      for (let i = 0; i < size; i++) along += t[i] * (x[i] - predicted[i]);
      const rhs = new Float64Array(size);
      for (let r = 0; r < h.length; r++) rhs[r] = -h[r];
      rhs[size - 1] = -along;
      let step: Float64Array;
      try {
        step = solveLinear(system, rhs);
      } catch {
        return null;
      }
      for (let i = 0; i < size; i++) x[i] += step[i];
      if (!x.every(Number.isFinite)) return null;
      if (norm(this.residual(x)) < CORRECTOR_RESIDUAL && norm(step) < CORRECTOR_UPDATE) return { x, iterations: iteration };
    }
    return null;
  }

  /** One predictor-corrector step of length h from `from`; null when the corrector fails or turns back. */
  private step(from: Node, h: number): Node | null {
    const predicted = from.x.map((v, i) => v + h * from.tangent[i]);
    this.reference = Float64Array.from(from.x.subarray(0, this.n));
    const corrected = this.correct(predicted, from.tangent);
    if (!corrected) return null;
    const node = this.evaluateNode(corrected.x, from.tangent, 1);
    if (dot(node.tangent, from.tangent) < MIN_TURN_COSINE) return null;
    return node;
  }

  private follow(startNode: Node): { points: Node[]; limit: BranchLimit | null } {
    const maxSteps = this.options.maxSteps ?? MAX_STEPS;
    const maxStep = this.options.maxStep ?? MAX_STEP;
    const minStep = this.options.minStep ?? MIN_STEP;
    const bound = Math.max(parameterLowerBound(this.parameter), this.options.range?.min ?? Number.NEGATIVE_INFINITY);
    const upper = this.options.range?.max ?? Number.POSITIVE_INFINITY;
    let h = this.options.initialStep ?? INITIAL_STEP;
    const points: Node[] = [];
    let current = startNode;
    for (let accepted = 0; accepted < maxSteps;) {
      const next = this.step(current, h);
      if (!next) {
        h *= STEP_CUT;
        if (h < minStep)
          return { points, limit: this.limit('step-failure', current, undefined, `the corrector failed with steps down to ${minStep}`) };
        continue;
      }
      this.steps++;
      const lambda = this.lambda(next.x);
      const turned = Math.sign(next.tangent[next.tangent.length - 1]) !== Math.sign(current.tangent[current.tangent.length - 1]);
      const outside = lambda < bound || lambda > upper;
      if (turned || next.unstable !== current.unstable) {
        const event = this.locate(current, h, turned);
        const at = this.lambda(event.node.x);
        const inside = at > bound + BOUND_SLACK * this.scale && at < upper - BOUND_SLACK * this.scale;
        if (inside || !outside) {
          points.push(event.node);
          return { points, limit: event.limit };
        }
      }
      if (outside) {
        const edge = lambda < bound ? bound : upper;
        const landed = this.landOn(current, edge);
        if (landed) points.push(landed);
        const kind: LimitKind = edge === parameterLowerBound(this.parameter) ? 'bound' : 'range';
        return {
          points,
          limit: this.limit(
            kind,
            landed ?? current,
            undefined,
            kind === 'bound' ? 'the parameter reached its physical bound' : 'the parameter left the requested range',
          ),
        };
      }
      points.push(next);
      current = next;
      accepted++;
      h = Math.min(maxStep, h * STEP_GROWTH);
    }
    return { points, limit: this.limit('max-steps', current, undefined, `stopped after ${maxSteps} steps without a bifurcation`) };
  }

  /** Bisection on the step from `from` for the first change of the test functions. */
  private locate(from: Node, h: number, fold: boolean): { node: Node; limit: BranchLimit } {
    const foldSign = Math.sign(from.tangent[from.tangent.length - 1]);
    let lo = 0;
    let hi = h;
    let hiNode: Node | null = null;
    for (let i = 0; i < LOCATE_BISECTIONS && hi - lo > LOCATE_RESOLUTION * h; i++) {
      const mid = (lo + hi) / 2;
      const node = this.step(from, mid);
      const changed = node && (fold ? Math.sign(node.tangent[node.tangent.length - 1]) !== foldSign : node.unstable !== from.unstable);
      if (node && !changed) lo = mid;
      else {
        hi = mid;
        if (node) hiNode = node;
      }
    }
    const node = hiNode ?? this.step(from, h) ?? from;
    if (fold || !node.stability)
      return {
        node,
        limit: this.limit('fold', node, undefined, 'turning point of the parameter: the locked state disappears (saddle-node)'),
      };
    const critical = node.stability.eigenvalues.reduce(
      (best, e) => (Math.abs(e.re) < Math.abs(best.re) ? e : best),
      node.stability.eigenvalues[0],
    );
    const hopf = Math.abs(critical.im) > HOPF_IMAGINARY * Math.max(node.stability.rateScale, 1e-12);
    return hopf
      ? {
          node,
          limit: this.limit(
            'hopf',
            node,
            Math.abs(critical.im),
            'a complex pair of eigenvalues crosses the imaginary axis (Hopf): the lock turns into a modulated state',
          ),
        }
      : {
          node,
          limit: this.limit(
            'branch-point',
            node,
            undefined,
            'a real eigenvalue crosses zero without a turning point (symmetry-breaking branch point)',
          ),
        };
  }

  /** Fixed-parameter solve at lambda = edge starting from a node. */
  private landOn(from: Node, edge: number): Node | null {
    setParameter(this.model.params, this.parameter, edge);
    const locked = solveLockedState(this.model.field, Float64Array.from(from.x.subarray(0, this.n)), this.modes, {
      generators: this.generators,
    });
    if (!locked.converged) return null;
    const x = new Float64Array(this.n + this.g + 1);
    x.set(locked.state);
    locked.rates.forEach((r, c) => (x[this.n + c] = r));
    x[this.n + this.g] = (edge - this.lambda0) / this.scale;
    return this.evaluateNode(x, from.tangent, 1);
  }

  private limit(kind: LimitKind, node: Node, frequency: number | undefined, message: string): BranchLimit {
    const parameter = this.lambda(node.x);
    const distance = parameter - this.lambda0;
    const limit: BranchLimit = {
      kind,
      parameter,
      ppm: this.ppm(parameter),
      distance,
      distancePpm: this.ppm(distance),
      point: this.point(node),
      message,
    };
    if (frequency !== undefined) limit.frequency = frequency;
    return limit;
  }

  private point(node: Node): BranchPoint {
    const parameter = this.lambda(node.x);
    setParameter(this.model.params, this.parameter, parameter);
    const y = Float64Array.from(node.x.subarray(0, this.n));
    const rates = Array.from(node.x.subarray(this.n, this.n + this.g));
    const unknown: LockedStability = { eigenvalues: [], margin: Number.NaN, rateScale: 0, tolerance: 0, verdict: 'marginal' };
    const described = describeLockedState(
      this.model,
      { state: y, generators: this.generators, rates, residual: 0, iterations: 0, converged: true },
      node.stability ?? unknown,
      [],
    );
    const point: BranchPoint = {
      parameter,
      ppm: this.ppm(parameter),
      amplitudes: described.amplitudes,
      meanAmplitude: described.meanAmplitude,
      phaseDifferences: described.phaseDifferences,
      rotation: described.rotation,
      stability: node.stability?.verdict ?? null,
      stable: node.stability ? described.stable : null,
      margin: node.stability?.margin ?? null,
      unstableCount: node.stability ? node.unstable : null,
    };
    if (this.options.keepStates) point.state = Array.from(y);
    return point;
  }
}

/**
 * The one parameter a continuation follows, named in text for the command line:
 *   detuning:K      Delta_K of node K (reported also in ppm)
 *   coupling        the coupling strength kappa (>= 0)
 *   reactive        rho
 *   dissipative     sigma
 *   link:A-B        the weight of the link carrying node A's signal into node B (>= 0)
 *   edge:A-B        both directions A -> B and B -> A together (>= 0)
 * and, for the live prediction only, a homotopy h in [0, 1] from one parameter set to another
 * (every mutable parameter moves along the straight line between the two).
 */
import type { ModelParameters } from '../model/parameters.js';
import { InputError } from '../util/input-error.js';

export type ContinuationParameter =
  | { kind: 'detuning'; node: number }
  | { kind: 'coupling' }
  | { kind: 'reactive' }
  | { kind: 'dissipative' }
  | { kind: 'link'; links: number[]; from: number; to: number; both: boolean }
  | { kind: 'homotopy'; from: ParameterSnapshot; to: ParameterSnapshot; value: number };

/** The mutable parameters the locked states depend on. */
export interface ParameterSnapshot {
  detuning: Float64Array;
  linkWeight: Float64Array;
  strength: number;
  reactive: number;
  dissipative: number;
}

export function snapshotParameters(params: ModelParameters): ParameterSnapshot {
  return {
    detuning: Float64Array.from(params.detuning),
    linkWeight: Float64Array.from(params.linkWeight),
    strength: params.strength,
    reactive: params.reactive,
    dissipative: params.dissipative,
  };
}

/** The homotopy from one parameter set to another, at h = 0. */
export function homotopy(from: ParameterSnapshot, to: ParameterSnapshot): ContinuationParameter {
  return { kind: 'homotopy', from, to, value: 0 };
}

export const CONTINUATION_SYNTAX = 'detuning:K, coupling, reactive, dissipative, link:A-B or edge:A-B';

/**
 * Reads a parameter name (see the module header). Throws an InputError saying what is wrong with
 * the text; the caller names the argument it came in (a command-line flag, a query field).
 */
export function parseContinuationParameter(text: string, params: ModelParameters): ContinuationParameter {
  const spec = text.trim();
  const [head, rest, extra] = spec.split(':');
  const nodeIndex = (word: string, what: string): number => {
    if (!/^\d+$/.test(word)) throw new InputError('', `${what} must be a node index, got ${JSON.stringify(word)}`);
    const k = Number(word);
    if (k >= params.nodes) throw new InputError('', `node ${k} does not exist (nodes are 0..${params.nodes - 1})`);
    return k;
  };
  if (extra !== undefined) throw new InputError('', `too many ':' (expected one of ${CONTINUATION_SYNTAX})`);
  switch (head) {
    case 'detuning':
      if (rest === undefined) throw new InputError('', 'say which node, e.g. detuning:0');
      return { kind: 'detuning', node: nodeIndex(rest, 'the detuned node') };
    case 'coupling':
    case 'reactive':
    case 'dissipative':
      if (rest !== undefined) throw new InputError('', `${head} takes no argument`);
      return { kind: head };
    case 'link':
    case 'edge': {
      const ends = rest === undefined ? null : /^(\d+)-(\d+)$/.exec(rest);
      if (!ends) throw new InputError('', `expected ${head}:A-B with node indices A and B`);
      const from = nodeIndex(ends[1], 'A');
      const to = nodeIndex(ends[2], 'B');
      const both = head === 'edge';
      const forward = params.findLink(from, to);
      if (forward < 0) throw new InputError('', `there is no link from node ${from} to node ${to}`);
      const links = [forward];
      if (both) {
        const backward = params.findLink(to, from);
        if (backward < 0)
          throw new InputError('', `there is no link from node ${to} back to node ${from} (use link:${from}-${to} for one direction)`);
        links.push(backward);
      }
      return { kind: 'link', links, from, to, both };
    }
    default:
      throw new InputError('', `unknown parameter ${JSON.stringify(head)} (expected one of ${CONTINUATION_SYNTAX})`);
  }
}

/** Readable name, e.g. "detuning of node 0 (Delta_0)". */
export function describeContinuationParameter(p: ContinuationParameter): string {
  switch (p.kind) {
    case 'detuning':
      return `detuning of node ${p.node} (Delta_${p.node})`;
    case 'coupling':
      return 'coupling strength kappa';
    case 'reactive':
      return 'reactive coupling rho';
    case 'dissipative':
      return 'dissipative coupling sigma';
    case 'link':
      return p.both ? `weight of both links between nodes ${p.from} and ${p.to}` : `weight of the link ${p.from} -> ${p.to}`;
    case 'homotopy':
      return 'homotopy h from the previous parameters (h = 0) to the new ones (h = 1)';
  }
}

export function getParameter(params: ModelParameters, p: ContinuationParameter): number {
  switch (p.kind) {
    case 'detuning':
      return params.detuning[p.node];
    case 'coupling':
      return params.strength;
    case 'reactive':
      return params.reactive;
    case 'dissipative':
      return params.dissipative;
    case 'link':
      return params.linkWeight[p.links[0]];
    case 'homotopy':
      return p.value;
  }
}

export function setParameter(params: ModelParameters, p: ContinuationParameter, value: number): void {
  switch (p.kind) {
    case 'detuning':
      params.detuning[p.node] = value;
      return;
    case 'coupling':
      params.strength = value;
      return;
    case 'reactive':
      params.reactive = value;
      return;
    case 'dissipative':
      params.dissipative = value;
      return;
    case 'link':
      for (const e of p.links) params.setLinkWeight(e, value);
      return;
    case 'homotopy': {
      p.value = value;
      // exact end values at h = 0 and h = 1 (a + 1 (b - a) can miss b by a rounding)
      const mix = (a: number, b: number): number => (value === 0 ? a : value === 1 ? b : a + value * (b - a));
      for (let k = 0; k < params.detuning.length; k++) params.detuning[k] = mix(p.from.detuning[k], p.to.detuning[k]);
      params.setLinkWeights(Array.from(p.from.linkWeight, (w, e) => Math.max(0, mix(w, p.to.linkWeight[e]))));
      params.strength = mix(p.from.strength, p.to.strength);
      params.reactive = mix(p.from.reactive, p.to.reactive);
      params.dissipative = mix(p.from.dissipative, p.to.dissipative);
      return;
    }
  }
}

/** Physical lower bound of the parameter (weights and strength cannot go negative), or -Infinity. */
export function parameterLowerBound(p: ContinuationParameter): number {
  return p.kind === 'coupling' || p.kind === 'link' ? 0 : Number.NEGATIVE_INFINITY;
}

/**
 * A natural size of the parameter, used to balance it against the state in the arclength: for
 * detuning the coupling rate kappa |sigma + i rho / omega_0| over omega_0 (the width of a locking
 * range), otherwise the magnitude of the starting value (at least 0.1).
 */
export function parameterScale(params: ModelParameters, p: ContinuationParameter): number {
  if (p.kind === 'homotopy') return 1;
  if (p.kind === 'detuning') {
    const rate = Math.abs(params.strength) * Math.hypot(params.dissipative, params.reactive / params.omega[0]);
    return Math.max(rate / params.omega[0], 1e-6);
  }
  return Math.max(Math.abs(getParameter(params, p)), 0.1);
}

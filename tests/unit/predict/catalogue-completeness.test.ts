import { describe, expect, test } from 'vitest';
import { patternCatalogue, type CataloguePattern, type PatternCatalogue } from '../../../src/predict/catalogue.js';
import { GuideModel } from '../../../src/predict/guide-model.js';
import type { Link } from '../../../src/scenario/types.js';
import { makeScenario, ringLinks } from '../../support/scenarios.js';
import {
  bruteForceStableStates,
  bruteForceSymmetries,
  moved,
  newtonLocked,
  phaseAlignedDistance,
  seededUniform,
  stabilityMargin,
  type Amplitudes,
  type OneModeNetwork,
} from './brute-force.js';

/**
 * The catalogue against an independent brute-force search (brute-force.ts: the reference closed
 * form, RK4 from many seeded random starts, Newton in the co-rotating frame, finite-difference
 * stability, symmetries by trying every permutation), on invented networks each under several
 * renumberings (nodes, detuning and the order of the links permuted together).
 *
 * What "the same pattern" means is taken from the issue, not from the code: rotations and phase
 * shifts make copies, reflections make mirror images, which are entries of their own. Every test
 * network is built round a ring (its `ring`, a cycle in construction order), so a symmetry is a
 * rotation when it carries that ring onto itself in the same direction and a reflection when it
 * reverses it (elementary).
 */

interface Invented {
  name: string;
  nodes: number;
  links: Link[];
  detuning: number[];
  coupling: { strength: number; reactive: number; dissipative: number };
  /** The ring the network is built round, in construction order. */
  ring: number[];
  /** The number of distinct stable states (up to phase) where theory gives it, with the source. */
  expected?: { count: number; source: string };
}

const twoWay = (a: number, b: number, weight = 1): Link[] => [
  { from: a, to: b, weight },
  { from: b, to: a, weight },
];
const range = (n: number): number[] => Array.from({ length: n }, (_, k) => k);
const DISSIPATIVE = { strength: 0.1, reactive: 0, dissipative: 1 };

const NETWORKS: Invented[] = [
  {
    name: 'a detuned two-way 7-ring',
    nodes: 7,
    links: ringLinks(7, true),
    detuning: [0.0012, -0.0016, 0.0004, 0.0014, -0.001, 0.0007, -0.0011],
    coupling: DISSIPATIVE,
    ring: range(7),
    // Wiley, Strogatz, Girvan 2006: q = 0, 1, 6 (cos(2 pi q / 7) > 0); a detuning small against the
    // coupling keeps each hyperbolic state (implicit function theorem, common practice)
    expected: { count: 3, source: 'Wiley, Strogatz, Girvan 2006, persisting under small detuning' },
  },
  {
    name: 'a two-way 6-ring with one chord (0-3, weight 0.4)',
    nodes: 6,
    links: [...ringLinks(6, true), ...twoWay(0, 3, 0.4)],
    detuning: new Array(6).fill(0),
    coupling: DISSIPATIVE,
    ring: range(6),
  },
  {
    name: 'a two-way 7-ring with unequal link weights',
    nodes: 7,
    links: [1, 1.3, 0.8, 1.1, 0.9, 1.2, 0.75].flatMap((w, k) => twoWay(k, (k + 1) % 7, w)),
    detuning: new Array(7).fill(0),
    coupling: DISSIPATIVE,
    ring: range(7),
    // Wiley, Strogatz, Girvan 2006 for equal weights: q = 0, 1, 6; persisting under the weight spread (common practice)
    expected: { count: 3, source: 'Wiley, Strogatz, Girvan 2006, persisting under unequal weights' },
  },
  {
    name: 'a one-way 5-ring, slightly detuned, with reactive coupling',
    nodes: 5,
    links: ringLinks(5, false),
    detuning: [0.0004, -0.0003, 0, 0.0002, -0.0004],
    coupling: { strength: 0.1, reactive: 0.2, dissipative: 1 },
    ring: range(5),
    // one-way ring with phase lag beta = atan(rho / sigma): stable iff cos(2 pi q / N + beta) > 0
    // (Gray 2006 circulant eigenvalues with the Sakaguchi-Kuramoto lag, see twisted-states.test.ts): q = 0, 1, 4
    expected: { count: 3, source: 'circulant eigenvalues (Gray 2006) with the Sakaguchi-Kuramoto lag' },
  },
  {
    name: 'a two-way 6-ring (mirror waves q = 1 and 5)',
    nodes: 6,
    links: ringLinks(6, true),
    detuning: new Array(6).fill(0),
    coupling: DISSIPATIVE,
    ring: range(6),
    // Wiley, Strogatz, Girvan 2006: q = 0, 1, 5
    expected: { count: 3, source: 'Wiley, Strogatz, Girvan 2006' },
  },
  {
    // the scenario lists the broken link at weight 0: the intact ring still tells where the ring was
    name: 'a two-way 6-ring with the link 0-1 broken (listed at weight 0)',
    nodes: 6,
    links: [...ringLinks(6, true).filter((l) => !(l.from <= 1 && l.to <= 1)), ...twoWay(0, 1, 0)],
    detuning: new Array(6).fill(0),
    coupling: DISSIPATIVE,
    ring: range(6),
  },
  {
    name: 'a two-way 5-cycle with a detuned pendant node on node 0',
    nodes: 6,
    links: [...ringLinks(5, true), ...twoWay(0, 5)],
    detuning: [0, 0, 0, 0, 0, 0.003],
    coupling: DISSIPATIVE,
    ring: range(5),
  },
];

/** Renumberings tried per network: the identity and these many random ones. */
const RENUMBERINGS = 3;
const BRUTE_FORCE_STARTS = 48;
/** Relative distance within which two Newton-polished states are the same (both solved to 1e-10). */
const SAME = 1e-5;

function networkOf(spec: Invented): OneModeNetwork {
  const weight = spec.links.reduce(
    (w, l) => ((w[l.to][l.from] = l.weight), w),
    Array.from({ length: spec.nodes }, () => new Array<number>(spec.nodes).fill(0)),
  );
  return {
    nodes: spec.nodes,
    weight,
    detuning: spec.detuning,
    gain: 1,
    loss: 0,
    omega: 1,
    kappa: spec.coupling.strength,
    sigma: spec.coupling.dissipative,
    rho: spec.coupling.reactive,
  };
}

/** The network renumbered by `perm` (node k becomes perm[k]), its links listed in a shuffled order. */
function renumbered(spec: Invented, perm: number[], random: () => number): Invented {
  const links = spec.links.map((l) => ({ from: perm[l.from], to: perm[l.to], weight: l.weight }));
  for (let i = links.length - 1; i > 0; i--) {
    const j = Math.floor(random() * (i + 1));
    [links[i], links[j]] = [links[j], links[i]];
  }
  const detuning = new Array<number>(spec.nodes);
  spec.detuning.forEach((d, k) => (detuning[perm[k]] = d));
  return { ...spec, links, detuning, ring: spec.ring.map((k) => perm[k]) };
}

function randomPermutation(n: number, random: () => number): number[] {
  const p = range(n);
  for (let i = n - 1; i > 0; i--) {
    const j = Math.floor(random() * (i + 1));
    [p[i], p[j]] = [p[j], p[i]];
  }
  return p;
}

function catalogueOf(spec: Invented): PatternCatalogue {
  const scenario = makeScenario({
    nodes: spec.nodes,
    links: spec.links,
    epsilon: 1e-6,
    modes: [{ omega: 1, gain: 1, loss: 0 }],
    coupling: spec.coupling,
    detuning: spec.detuning,
  });
  return patternCatalogue(new GuideModel(scenario));
}

/** Mode 0 amplitudes of a catalogue entry: a = u - i v. */
function amplitudesOf(p: CataloguePattern, nodes: number): Amplitudes {
  return {
    re: Float64Array.from({ length: nodes }, (_, k) => p.state[2 * k]),
    im: Float64Array.from({ length: nodes }, (_, k) => -p.state[2 * k + 1]),
  };
}

/** Splits the symmetries into rotations and reflections of the network's ring (see the header). */
function rotationsAndReflections(symmetries: Int32Array[], ring: number[]): { rotations: Int32Array[]; reflections: Int32Array[] } {
  const at = new Map(ring.map((k, i) => [k, i]));
  const rotations: Int32Array[] = [];
  const reflections: Int32Array[] = [];
  for (const g of symmetries) {
    const i0 = at.get(g[ring[0]]);
    const i1 = at.get(g[ring[1]]);
    expect(i0 !== undefined && i1 !== undefined, 'every symmetry of a test network maps its ring onto itself').toBe(true);
    (i1 === (i0! + 1) % ring.length ? rotations : reflections).push(g);
  }
  return { rotations, reflections };
}

/** a equals a rotation of b up to a common phase. */
const isCopy = (a: Amplitudes, b: Amplitudes, rotations: Int32Array[]): boolean =>
  rotations.some((g) => phaseAlignedDistance(a, moved(b, g)) < SAME);

describe('the catalogue holds every stable state a brute-force search finds, under every numbering', () => {
  for (const spec of NETWORKS) {
    test(spec.name, () => {
      const net = networkOf(spec);
      const brute = bruteForceStableStates(net, { starts: BRUTE_FORCE_STARTS, seed: 1 + spec.nodes * 31 + spec.links.length });
      // the search itself works: nearly every start settles, and where theory gives the count it finds exactly that
      expect(brute.settled).toBeGreaterThanOrEqual(0.9 * brute.starts);
      if (spec.expected) expect(brute.stable.length, spec.expected.source).toBe(spec.expected.count);

      const random = seededUniform(spec.nodes * 7919 + 17);
      const numberings = [range(spec.nodes), ...Array.from({ length: RENUMBERINGS }, () => randomPermutation(spec.nodes, random))];
      const firstSymmetries = bruteForceSymmetries(net);
      const firstRotations = rotationsAndReflections(firstSymmetries, spec.ring).rotations;
      let reference: { stable: Amplitudes[]; all: Amplitudes[] } | null = null;
      for (const perm of numberings) {
        const variant = renumbered(spec, perm, random);
        const variantNet = networkOf(variant);
        const { rotations, reflections } = rotationsAndReflections(bruteForceSymmetries(variantNet), variant.ring);
        const catalogue = catalogueOf(variant);
        const where = `${spec.name}, numbering ${perm.join(' ')}`;
        expect(catalogue.numbering.independent, where).toBe(true);
        const stable = catalogue.patterns.filter((p) => p.stable === true);
        const states = stable.map((p) => amplitudesOf(p, spec.nodes));

        // each listed stable entry is a stable locked state of the reference field (own Newton and Jacobian)
        for (const [i, a] of states.entries()) {
          const polished = newtonLocked(variantNet, a);
          expect(polished.residual, `${where}: entry ${i} is a locked state`).toBeLessThan(1e-9);
          expect(phaseAlignedDistance(polished.a, a), `${where}: entry ${i} is where Newton lands`).toBeLessThan(1e-6);
          expect(stabilityMargin(variantNet, polished.a, polished.rate), `${where}: entry ${i} is stable`).toBeLessThan(0);
        }
        // every brute-force state is listed (up to a rotation and a phase) ...
        for (const [i, s] of brute.stable.entries()) {
          const here = moved(s.a, perm);
          expect(
            states.some((a) => isCopy(here, a, rotations)),
            `${where}: brute-force state ${i} (margin ${s.margin.toExponential(2)}) is missing`,
          ).toBe(true);
        }
        // ... once: no two stable entries are copies of each other
        for (let i = 0; i < states.length; i++)
          for (let j = 0; j < i; j++)
            expect(isCopy(states[i], states[j], rotations), `${where}: entries ${i} and ${j} are copies`).toBe(false);

        // mirror links: a pair are reflections of each other, 'self' is a copy of its own reflection
        for (const p of catalogue.patterns) {
          const a = amplitudesOf(p, spec.nodes);
          const images = reflections.map((g) => moved(a, g));
          if (reflections.length === 0) {
            expect(p.mirror.relation, where).toBe('none');
          } else if (p.mirror.relation === 'self') {
            expect(
              images.some((m) => isCopy(m, a, rotations)),
              where,
            ).toBe(true);
          } else {
            expect(p.mirror.relation, where).toBe('pair');
            const partner = catalogue.patterns[p.mirror.partner!];
            expect(partner.mirror.partner, where).toBe(catalogue.patterns.indexOf(p));
            expect(
              images.some((m) => isCopy(m, amplitudesOf(partner, spec.nodes), rotations)),
              where,
            ).toBe(true);
            expect(
              images.some((m) => isCopy(m, a, rotations)),
              `${where}: a mirror pair must not be one pattern`,
            ).toBe(false);
          }
        }

        // the same set under every numbering: the stable entries carried back to the first numbering
        const inverse = new Int32Array(spec.nodes);
        perm.forEach((image, k) => (inverse[image] = k));
        const back = {
          stable: states.map((a) => moved(a, inverse)),
          all: catalogue.patterns.map((p) => moved(amplitudesOf(p, spec.nodes), inverse)),
        };
        if (!reference) reference = back;
        else {
          const first = reference;
          expect(back.stable.length, where).toBe(first.stable.length);
          for (const a of back.stable)
            expect(
              first.stable.some((r) => isCopy(a, r, firstRotations)),
              where,
            ).toBe(true);
          // and the whole list, unstable entries too, is the first numbering's list moved by one
          // symmetry of the network, to rounding
          expect(back.all.length, where).toBe(first.all.length);
          const sameList = firstSymmetries.some((g) =>
            back.all.every((a) => first.all.some((r) => phaseAlignedDistance(a, moved(r, g)) < 1e-9)),
          );
          expect(sameList, `${where}: the full list differs`).toBe(true);
        }
      }
    });
  }
});

describe('renumbering a detuned ring never drops its stable twisted waves', () => {
  test('a detuned two-way 5-ring under 20 numberings: always in-phase and both twisted waves, each confirmed by the reference field', () => {
    // Its twisted waves have small basins (about 1 and 3 in 100 random starts, so random starts
    // alone miss them): the cycle seeds must find them whatever the numbering. Expected set:
    // q = 0, 1, 4 (Wiley, Strogatz, Girvan 2006), kept by the small detuning (common practice).
    const spec: Invented = {
      name: 'detuned 5-ring',
      nodes: 5,
      links: ringLinks(5, true),
      detuning: [0.0012, -0.0016, 0.0004, 0.0014, -0.001],
      coupling: DISSIPATIVE,
      ring: range(5),
    };
    const random = seededUniform(2026);
    for (let trial = 0; trial < 20; trial++) {
      const perm = randomPermutation(5, random);
      const variant = renumbered(spec, perm, random);
      const net = networkOf(variant);
      const stable = catalogueOf(variant)
        .patterns.filter((p) => p.stable === true)
        .map((p) => amplitudesOf(p, 5));
      expect(stable, `numbering ${perm.join(' ')}`).toHaveLength(3);
      // winding of the phase round the ring (in ring order): one state each of 0, +1 and -1 turns
      const windings = stable.map((a) => {
        const polished = newtonLocked(net, a);
        expect(polished.residual).toBeLessThan(1e-9);
        expect(stabilityMargin(net, polished.a, polished.rate)).toBeLessThan(0);
        const ring = variant.ring;
        const turn = ring.reduce((sum, k, i) => {
          const l = ring[(i + 1) % ring.length];
          const d = Math.atan2(a.im[l], a.re[l]) - Math.atan2(a.im[k], a.re[k]);
          return sum + Math.atan2(Math.sin(d), Math.cos(d));
        }, 0);
        return Math.round(turn / (2 * Math.PI)) + 0; // (+ 0 turns a -0 into 0)
      });
      expect(windings.sort(), `numbering ${perm.join(' ')}`).toEqual([-1, 0, 1]);
    }
  });
});

describe('mirror-image rotating waves are listed apart and linked', () => {
  test('two-way 7-ring: every wave q = 0..6 is its own entry, q and 7 - q linked as mirror images, q = 0 its own mirror image', () => {
    // the wave a_k = e^{2 pi i q k / N} reflected (k -> -k) is e^{-2 pi i q k / N}, the wave N - q (elementary)
    const catalogue = catalogueOf({
      name: '7-ring',
      nodes: 7,
      links: ringLinks(7, true),
      detuning: new Array(7).fill(0),
      coupling: DISSIPATIVE,
      ring: range(7),
    });
    const waves = catalogue.patterns.filter((p) => p.kind === 'in-phase' || p.kind === 'rotating-wave');
    expect(waves.map((p) => p.q).sort((a, b) => a! - b!)).toEqual(range(7));
    for (const p of waves) {
      expect(p.candidate.q, 'the seed is named by its own wave number').toBe(p.q);
      if (p.q === 0) {
        expect(p.mirror).toEqual({ relation: 'self', partner: null });
        continue;
      }
      expect(p.mirror.relation).toBe('pair');
      expect(catalogue.patterns[p.mirror.partner!].q).toBe(7 - p.q!);
      // Wiley, Strogatz, Girvan 2006: stable iff cos(2 pi q / N) > 0, the same for q and N - q
      expect(p.stable).toBe(Math.cos((2 * Math.PI * p.q!) / 7) > 0);
      expect(p.candidate.conjugates, 'a rotating wave is its own rotated copy').toBe(1);
    }
    expect(catalogue.mirrors.reversing).toMatch(/^reflection/);
  });

  test('a one-way ring has no reflection: every wave q = 0..4 listed, none linked', () => {
    const catalogue = catalogueOf({
      name: '5-ring',
      nodes: 5,
      links: ringLinks(5, false),
      detuning: new Array(5).fill(0),
      coupling: DISSIPATIVE,
      ring: range(5),
    });
    const waves = catalogue.patterns.filter((p) => p.kind === 'in-phase' || p.kind === 'rotating-wave');
    expect(waves.map((p) => p.q).sort((a, b) => a! - b!)).toEqual(range(5));
    for (const p of catalogue.patterns) expect(p.mirror).toEqual({ relation: 'none', partner: null });
    expect(catalogue.mirrors.reversing).toBeNull();
  });
});

describe('the base list depends on nothing but the parameters', () => {
  const spec = NETWORKS[0];
  const model = (initial: Parameters<typeof makeScenario>[0]['initial']) =>
    new GuideModel(
      makeScenario({
        nodes: spec.nodes,
        links: spec.links,
        epsilon: 1e-6,
        modes: [{ omega: 1, gain: 1, loss: 0 }],
        coupling: spec.coupling,
        detuning: spec.detuning,
        initial,
      }),
    );

  test("the scenario's initial state is never read: two starts, the same catalogue", () => {
    const a = patternCatalogue(model({ random: { seed: 3, amplitude: 1 } }));
    const b = patternCatalogue(model({ pattern: { q: 2, amplitude: 0.5, mode: 0 } }));
    expect(JSON.stringify(b)).toBe(JSON.stringify(a));
  });

  test('extra seeds only add entries, and say where each one landed', () => {
    const base = patternCatalogue(model(undefined));
    // an uneven state, far from every locked state
    const seed = Float64Array.from([1.9, -0.2, -0.4, -1.5, 0.3, 1.7, 1.1, -0.9, -1.2, -0.4]);
    const settled = Float64Array.from(base.patterns.find((p) => p.stable === true)!.state);
    const seeded = patternCatalogue(model(undefined), { seeds: [settled, seed] });
    const own = seeded.patterns.filter((p) => p.candidate.type !== 'seed');
    expect(own.map((p) => p.state)).toEqual(base.patterns.map((p) => p.state));
    // the first seed is an entry already: it lands there
    expect(seeded.patterns[seeded.seedPatterns[0]!].state).toEqual(Array.from(settled));
    expect(seeded.seedPatterns).toHaveLength(2);
  });
});

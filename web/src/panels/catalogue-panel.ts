import { LitElement, css, html, nothing, unsafeCSS } from 'lit';
import type { SessionInfo } from '../../../src/protocol/messages.js';
import type { CatalogueEntry, CatalogueResponse } from '../data/prediction-data.js';
import { formatHz, formatNumber, formatSeconds, frequencyBasis, runScalesOf } from '../data/engineering.js';
import { secondsHeading } from './seconds-heading.js';
import {
  CAUTION,
  CHIP,
  DEFECT_ROW,
  FAULT,
  INK,
  LIVE_ROW,
  LOCKED,
  MUTED,
  ON_SOLID,
  ROW_HOVER,
  SELECTED_ROW,
  SOFT_BORDER,
  SOFT_INK,
  UNWANTED,
  columnStyles,
  panelStyles,
  tableStyles,
} from '../theme.js';
import { modeName, spreadText } from './pattern-text.js';

const KIND_WORDS: Record<string, string> = {
  'in-phase': 'in-phase',
  'anti-phase': 'anti-phase',
  'rotating-wave': 'rotating wave',
  'standing-wave': 'standing wave',
  cluster: 'cluster state',
};
const SYMMETRY_SHOWN = 2;
/** The tooltip of the output frequency column. */
const OUTPUT_FREQUENCY_TITLE =
  "frequency of the locked output against the wanted mode's nominal frequency; " +
  "below it, the carrying mode's own collective shift from its own nominal frequency";

/**
 * The catalogue of locked patterns the ring can hold under the live parameters: kind and wave
 * number, symmetry, stability with its margin and time constant, amplitudes and the collective
 * frequency shift. The row the live run is in is marked; clicking a row chooses the pattern a
 * what-if continues (sr-select-pattern with its index).
 */
export class CataloguePanel extends LitElement {
  static override properties = {
    catalogue: { attribute: false },
    session: { attribute: false },
    loading: { type: Boolean },
    error: { type: String },
    live: { attribute: false },
    selected: { type: Number },
    stale: { type: Boolean },
  };
  static override styles = [
    panelStyles,
    columnStyles,
    tableStyles,
    css`
      .facts {
        font-size: 15px;
        color: ${unsafeCSS(SOFT_INK)};
        margin: 0 0 8px;
        line-height: 1.45;
      }
      .scroll {
        overflow: auto;
        flex: 1 1 auto;
        min-height: 0;
      }
      table {
        font-size: 15px;
      }
      th {
        padding: 4px 6px 6px;
      }
      td {
        padding: 7px 6px;
      }
      tbody tr {
        cursor: pointer;
      }
      tbody tr:hover {
        background: ${unsafeCSS(ROW_HOVER)};
      }
      tr.selected {
        background: ${unsafeCSS(SELECTED_ROW)};
      }
      tr.live td {
        background: ${unsafeCSS(LIVE_ROW)};
      }
      tr.live td:first-child {
        box-shadow: inset 6px 0 0 ${unsafeCSS(LOCKED)};
      }
      .kind {
        font-weight: 700;
        font-size: 16px;
        white-space: nowrap;
      }
      .small {
        font-size: 13px;
        color: ${unsafeCSS(MUTED)};
        display: block;
        margin-top: 1px;
      }
      td.r,
      td.r .small {
        white-space: nowrap;
      }
      .badge {
        display: inline-block;
        font-size: 13px;
        font-weight: 800;
        letter-spacing: 0.06em;
        padding: 2px 8px;
        border-radius: 4px;
        color: ${unsafeCSS(ON_SOLID)};
        white-space: nowrap;
      }
      .badge.stable {
        background: ${unsafeCSS(LOCKED)};
      }
      .badge.unstable {
        background: ${unsafeCSS(FAULT)};
      }
      .badge.marginal {
        background: ${unsafeCSS(CAUTION)};
      }
      .badge.live {
        background: ${unsafeCSS(INK)};
        margin-left: 6px;
      }
      .badge.defect {
        background: ${unsafeCSS(UNWANTED)};
        display: block;
        width: max-content;
        margin-top: 3px;
      }
      tr.defect td {
        background: ${unsafeCSS(DEFECT_ROW)};
      }
      .chip {
        display: inline-block;
        font-size: 13px;
        background: ${unsafeCSS(CHIP)};
        border: 1px solid ${unsafeCSS(SOFT_BORDER)};
        border-radius: 10px;
        padding: 0 7px;
        margin: 1px 3px 1px 0;
        white-space: nowrap;
      }
      .state {
        font-size: 16px;
        padding: 16px 0;
      }
      .error {
        color: ${unsafeCSS(FAULT)};
        font-weight: 600;
      }
      .stale {
        color: ${unsafeCSS(CAUTION)};
        font-weight: 700;
      }
      ul.warnings {
        margin: 6px 0 0;
        padding-left: 18px;
        color: ${unsafeCSS(CAUTION)};
        font-size: 14px;
      }
    `,
  ];

  declare catalogue: CatalogueResponse | null;
  declare session: SessionInfo | null;
  declare loading: boolean;
  declare error: string;
  declare live: { index: number; near: boolean } | null;
  declare selected: number;
  declare stale: boolean;

  constructor() {
    super();
    this.catalogue = null;
    this.session = null;
    this.loading = false;
    this.error = '';
    this.live = null;
    this.selected = -1;
    this.stale = false;
  }

  override render() {
    const c = this.catalogue;
    return html`
      <h2>Locked patterns the ring can hold · live parameters</h2>
      ${this.error ? html`<p class="state error" data-testid="catalogue-error">${this.error}</p>` : nothing}
      ${!c ? html`<p class="state muted">${this.loading ? 'Computing the catalogue on a copy of the guiding system…' : 'No catalogue yet.'}</p>` : this.renderCatalogue(c)}
    `;
  }

  private renderCatalogue(c: CatalogueResponse) {
    const stable = c.patterns.filter((p) => p.stability === 'stable').length;
    // older servers' catalogues lack wantedMode: read it off the carrying mode
    const defects = c.patterns.filter((p) => p.stability === 'stable' && !isWanted(p)).length;
    const live = this.live;
    const broken = c.computedFor.links.filter((l) => l.weight === 0).length;
    const scales = this.session ? runScalesOf(this.session) : null;
    const numberingWarning =
      c.numbering && !c.numbering.independent
        ? html`<br /><span class="stale" data-testid="numbering-warning"
              >This list may depend on how the nodes are numbered: ${c.numbering.reason}.</span
            >`
        : nothing;
    return html`
      <p class="facts" data-testid="catalogue-facts">
        <b>${c.patterns.length}</b> locked patterns, <b style="color:${LOCKED}">${stable} stable</b>${
          defects
            ? html` (<b style="color:${UNWANTED}">${defects} of them on an unwanted mode</b>: a board that locks there puts out that mode's
                frequency, a design defect)`
            : nothing
        }
        · symmetry group of order
        ${c.group.order}${c.group.graphOrder !== c.group.order ? html` (the graph alone has ${c.group.graphOrder}; the detuning breaks the rest)` : nothing}
        ${c.mirrors ? html` · <span title=${c.mirrors.reason}>${c.mirrors.reversing ? 'mirror images listed as pairs' : 'no mirror symmetry'}</span>` : nothing}
        ${broken ? html` · ${broken} broken link${broken > 1 ? 's' : ''}` : nothing}
        <br />
        ${
          live
            ? html`The live run is in <b>#${live.index}</b>${live.near ? '' : ' (nearest of its kind)'}.`
            : html`<span class="muted">The live run is not locked to any listed pattern.</span>`
        }
        ${c.initial.settled && c.initial.pattern !== null ? html` The scenario's start settles into #${c.initial.pattern}.` : nothing}
        <span class="muted"
          >Computed in ${formatNumber(c.wallSeconds, 2)} s${c.fromCache ? ' (cached)' : ''}; output frequencies against the wanted mode's
          nominal frequency${scales ? `, in Hz ${frequencyBasis(scales)}` : ''}.</span
        >
        ${this.loading ? html` <span class="stale">Updating for the new parameters…</span>` : this.stale ? html` <span class="stale">The live parameters changed.</span>` : nothing}
        ${numberingWarning}
      </p>
      <div class="scroll">
        <table data-testid="catalogue">
          <thead>
            <tr>
              <th>#</th>
              <th>pattern</th>
              <th>symmetry</th>
              <th>stability</th>
              <th class="r" title="largest real part of the eigenvalues with the symmetry zeros removed, per slow time unit ε·τ">
                margin /slow
              </th>
              <th
                class="r"
                title="1 / |margin|: how fast a disturbance dies out (stable) or grows (unstable)"
                data-testid="catalogue-seconds"
              >
                ${secondsHeading('time constant', scales?.nominalFrequencyAssumed === true)}
              </th>
              <th class="r" title="mean over the nodes of the carrying mode's |a|, and its smallest and largest value">amplitude |a|</th>
              <th class="r" title=${OUTPUT_FREQUENCY_TITLE}>output frequency</th>
            </tr>
          </thead>
          <tbody>
            ${c.patterns.map((p) => this.renderRow(p, c))}
          </tbody>
        </table>
      </div>
      ${
        c.warnings.length
          ? html`<ul class="warnings">
              ${c.warnings.map((w) => html`<li>${w}</li>`)}
            </ul>`
          : nothing
      }
    `;
  }

  private renderRow(p: CatalogueEntry, c: CatalogueResponse) {
    const isLive = this.live?.index === p.index;
    const wanted = isWanted(p);
    const classes = [isLive ? 'live' : '', this.selected === p.index ? 'selected' : '', wanted ? '' : 'defect'].join(' ');
    const amplitudes = p.amplitudes.map((row) => row[p.mode]);
    const shift = p.frequencyShiftPpm[p.mode];
    const output = p.outputOffsetPpm ?? shift;
    const hz = this.session?.nominalFrequencyHz ?? 0;
    const clusters = p.clusters ? ` · ${p.clusters.length} clusters` : '';
    const spread = p.spread !== undefined && p.spread !== null && p.kind === 'in-phase' ? ` · spread ${spreadText(p.spread)}` : '';
    return html`
      <tr
        class=${classes}
        data-index=${p.index}
        data-kind=${p.kind}
        data-stability=${p.stability}
        ?data-live=${isLive}
        @click=${() => this.choose(p.index)}
      >
        <td class="num">${p.index}</td>
        <td>
          <span class="kind">${KIND_WORDS[p.kind] ?? p.kind}${p.q !== undefined ? ` q = ${p.q}` : ''}</span
          >${isLive ? html`<span class="badge live">LIVE</span>` : nothing}
          <span class="small">${modeName(p.mode)}${clusters}${seedNote(p)}${spread}</span>
          ${
            p.mirror?.relation === 'pair' && p.mirror.partner !== null
              ? html`<a
                  class="small mirror"
                  href="#prediction"
                  data-mirror=${p.mirror.partner}
                  @click=${(e: Event) => {
                    e.preventDefault();
                    e.stopPropagation();
                    this.choose(p.mirror.partner!);
                  }}
                  >mirror image of #${p.mirror.partner}${p.q !== undefined ? ` (q = ${p.q} ↔ ${(c.nodes - p.q) % c.nodes})` : ''}</a
                >`
              : p.mirror?.relation === 'self'
                ? html`<span class="small">its own mirror image</span>`
                : nothing
          }
        </td>
        <td>
          ${p.symmetry.slice(0, SYMMETRY_SHOWN).map((s) => html`<span class="chip">${s.element}</span>`)}
          ${p.symmetry.length > SYMMETRY_SHOWN ? html`<span class="chip">+${p.symmetry.length - SYMMETRY_SHOWN}</span>` : nothing}
          <span class="small">${p.symmetry.length} element${p.symmetry.length === 1 ? '' : 's'}</span>
        </td>
        <td>
          <span class="badge ${p.stability}">${p.stability.toUpperCase()}</span>
          ${wanted ? nothing : html`<span class="badge defect" title="the output would sit at unwanted mode ${p.mode}'s frequency">DESIGN DEFECT</span>`}
        </td>
        <td class="r" title=${`marginal band ± ${formatNumber(p.marginTolerance, 2)} per slow unit`}>${formatNumber(p.margin, 3)}</td>
        <td class="r">
          ${
            p.timeConstant
              ? html`${formatSeconds(p.timeConstant.seconds)}${p.stability === 'unstable' ? ' growth' : ''}<span class="small"
                    >${formatNumber(p.timeConstant.slowTime, 3)} slow · ${formatNumber(p.timeConstant.periods, 2)} periods</span
                  >`
              : '—'
          }
        </td>
        <td class="r">
          ${formatNumber(p.meanAmplitude[p.mode], 3)}<span class="small"
            >${formatNumber(Math.min(...amplitudes), 3)} … ${formatNumber(Math.max(...amplitudes), 3)}</span
          >
        </td>
        <td class="r">
          ${
            output === null || output === undefined
              ? '—'
              : html`${formatSignedPpm(output)}<span class="small">${hz > 0 ? formatSignedHz(output * 1e-6 * hz) : ''}</span>${
                  !wanted && shift !== null && shift !== undefined
                    ? html`<span class="small">own mode ${formatSignedPpm(shift)}</span>`
                    : nothing
                }`
          }
        </td>
      </tr>
    `;
  }

  private choose(index: number): void {
    this.dispatchEvent(new CustomEvent<number>('sr-select-pattern', { detail: index, bubbles: true, composed: true }));
  }
}

/**
 * How the entry was found, when that says something: a pattern solved outside its symmetry class
 * (the detuning or a broken link removed the exact symmetry) grew from another type's shape.
 */
function seedNote(p: CatalogueEntry): string {
  const seed = p.candidate;
  if (seed.type === 'random-start') return ' · found from a random start';
  if (seed.type === 'cycle-wave') return ` · grew from a twisted wave q = ${seed.q} along the cycle ${seed.cycle?.join('→') ?? ''}`;
  if (seed.exact) return '';
  const sameShape = seed.type === p.kind && (seed.q ?? null) === (p.q ?? null);
  return sameShape
    ? ' · symmetry approximate'
    : ` · grew from ${KIND_WORDS[seed.type] ?? seed.type}${seed.q !== undefined ? ` q = ${seed.q}` : ''}`;
}

function isWanted(p: CatalogueEntry): boolean {
  return p.wantedMode ?? p.mode === 0;
}

function formatSignedPpm(ppm: number): string {
  return `${ppm > 0 ? '+' : ''}${formatNumber(ppm, 3)} ppm`;
}

/** Hz with mHz / µHz for the tiny shifts of a weakly coupled board, kHz and up for an unwanted mode's offset. */
function formatSignedHz(hz: number): string {
  const sign = hz > 0 ? '+' : hz < 0 ? '−' : '';
  const a = Math.abs(hz);
  if (a === 0) return '0 Hz';
  if (a < 1e-3) return `${sign}${formatNumber(a * 1e6, 3)} µHz`;
  if (a < 1) return `${sign}${formatNumber(a * 1e3, 3)} mHz`;
  if (a >= 1e3) return `${sign}${formatHz(a)}`;
  return `${sign}${formatNumber(a, 3)} Hz`;
}

customElements.define('sr-catalogue-panel', CataloguePanel);

import { LitElement, css, unsafeCSS, html, nothing } from 'lit';
import type { FrameStore } from '../data/frame-store.js';
import { StoreController } from '../data/store-controller.js';
import {
  formatHz,
  formatNumber,
  formatSeconds,
  formatSimulatedSeconds,
  frequencyBasis,
  marginTimeConstant,
  runScalesOf,
  type RunScales,
} from '../data/engineering.js';
import type { WireFrame } from '../../../src/protocol/messages.js';
import type { LivePrediction } from '../../../src/predict/live.js';
import { tauToSeconds } from '../../../src/scenario/units.js';
import { CAUTION, CHIP, DIVIDER, FAULT, INK, LOCKED, MUTED, SOFT_BORDER, SOFT_INK, UNWANTED, panelStyles } from '../theme.js';
import { destinationText, modeName, modeOffset, patternLabel, spreadText, symmetryPhase, unwantedModeText } from './pattern-text.js';

const MAX_ELEMENTS_SHOWN = 8;
/** The tooltip of the array output line. */
const ARRAY_OUTPUT_TITLE =
  "spread: largest phase distance of a node from the array's mean phase; " +
  'combining loss: 20 log10(|mean a| / mean |a|), the summed output against N parts in phase';

/**
 * The read-out of what the ring is doing: the full system's pattern and its symmetry, the
 * guiding system's pattern and stability margin (also as a time constant in physical units),
 * how far the two have drifted apart, and every warning that limits what the numbers mean.
 */
export class PatternPanel extends LitElement {
  static override properties = { store: { attribute: false } };
  static override styles = [
    panelStyles,
    css`
      .headline {
        font-size: 24px;
        font-weight: 800;
        letter-spacing: 0.02em;
      }
      .sub {
        font-size: 17px;
        font-weight: 600;
        color: ${unsafeCSS(INK)};
        margin-left: 10px;
        letter-spacing: 0;
      }
      .line {
        font-size: 14px;
        color: ${unsafeCSS(SOFT_INK)};
      }
      dl {
        display: grid;
        grid-template-columns: max-content 1fr;
        gap: 3px 12px;
        margin: 6px 0 0;
      }
      dt {
        color: ${unsafeCSS(MUTED)};
        font-size: 14px;
      }
      dd {
        margin: 0;
        font-size: 14px;
        font-variant-numeric: tabular-nums;
      }
      section + section {
        margin-top: 7px;
        padding-top: 6px;
        border-top: 1px solid ${unsafeCSS(DIVIDER)};
      }
      .chips {
        display: flex;
        flex-wrap: wrap;
        gap: 4px;
        margin-top: 4px;
      }
      .chip {
        font-size: 13px;
        background: ${unsafeCSS(CHIP)};
        border: 1px solid ${unsafeCSS(SOFT_BORDER)};
        border-radius: 12px;
        padding: 1px 8px;
        white-space: nowrap;
      }
      ul.warnings {
        margin: 4px 0 0;
        padding-left: 18px;
        color: ${unsafeCSS(CAUTION)};
        font-weight: 600;
      }
      ul.warnings li.fault {
        color: ${unsafeCSS(FAULT)};
      }
      .stable {
        color: ${unsafeCSS(LOCKED)};
        font-weight: 700;
      }
      .unstable {
        color: ${unsafeCSS(FAULT)};
        font-weight: 700;
      }
      .defect {
        color: ${unsafeCSS(UNWANTED)};
        font-weight: 700;
      }
      h3 {
        margin: 0;
        font-size: 14px;
        color: ${unsafeCSS(MUTED)};
        font-weight: 700;
      }
    `,
  ];

  declare store: FrameStore | null;

  constructor() {
    super();
    this.store = null;
    new StoreController(
      this,
      () => this.store,
      () => this.requestUpdate(),
      250,
    );
  }

  override render() {
    const session = this.store?.session;
    const frame = this.store?.latest;
    if (!session || !frame)
      return html`<h2>Pattern</h2>
        <p class="muted">No frame yet.</p>`;
    const p = frame.full.pattern;
    const g = frame.guide.pattern;
    const scales = runScalesOf(session);
    const seconds = (tau: number) => formatSimulatedSeconds(tauToSeconds(tau, scales.nominalFrequencyHz, scales.omega0), scales);
    const margin = frame.guide.margin;
    const constant = margin === null ? null : marginTimeConstant(margin, scales);
    // fields added to frames later than the first protocol version; old logs lack them
    const status = p.status ?? (p.locked ? 'locked' : 'unlocked');
    const unwanted = p.locked && p.mode !== 0;
    const colour = frame.status === 'halted' ? FAULT : unwanted ? UNWANTED : status === 'locked' ? LOCKED : CAUTION;
    const warnings = this.warnings();
    const aligned = (frame.divergence as { aligned?: number }).aligned;
    const prediction = (frame as { prediction?: LivePrediction | null }).prediction ?? null;
    const slowUnits = (tau: number) => formatNumber(tau * scales.epsilon, 3);
    const settledAgain = (lockedSince: number) =>
      p.settledSince !== undefined && p.settledSince !== null && p.settledSince > lockedSince
        ? html`, settled again at τ = ${formatNumber(p.settledSince, 4)}`
        : nothing;
    return html`
      <h2>Pattern</h2>
      <section data-testid="pattern-full">
        <div class="headline" style="color:${colour}">
          ${frame.status === 'halted' ? 'halted' : p.locked ? p.kind : 'not locked'}
          <span class="sub">${patternLabel(p, { short: true })}</span>
        </div>
        <div class="line" data-testid="lock-state">
          ${
            status === 'locked' && p.lockedSince !== null
              ? html`locked since τ = ${formatNumber(p.lockedSince, 4)} (${seconds(p.lockedSince)})${settledAgain(p.lockedSince)}`
              : status === 'settling'
                ? html`<b style="color:${CAUTION}">settling</b> for ${slowUnits(frame.tau - (p.settlingSince ?? frame.tau))} slow units:
                    moved ${formatNumber(p.move, 2)} rad so far, no cycle slip (a slip is a move of π)`
                : html`not locked (shape ${p.shape})`
          }
          · phase wander ${formatNumber(p.excursion, 2)}
          rad${p.slips ? html` · ${p.slips} cycle slip${p.slips === 1 ? '' : 's'} so far` : nothing}
        </div>
        ${
          p.spread !== undefined
            ? html`<div class="line" data-testid="array-output" title=${ARRAY_OUTPUT_TITLE}>
                ${arrayOutputText(p.spread, p.combiningLossDb)}
              </div>`
            : nothing
        }
        ${unwanted ? html`<div class="line defect" data-testid="unwanted-mode">${unwantedModeLine(p.mode, session.omega, scales)}</div>` : nothing}
      </section>
      <section data-testid="pattern-symmetry">
        <h3>Symmetry: ${p.symmetry.length} element${p.symmetry.length === 1 ? '' : 's'} γ with γ·a = e<sup>iφ</sup>a</h3>
        <div class="chips">
          ${p.symmetry.slice(0, MAX_ELEMENTS_SHOWN).map((s) => html`<span class="chip">${s.element} · ${symmetryPhase(s, session.nodes)}</span>`)}
          ${p.symmetry.length > MAX_ELEMENTS_SHOWN ? html`<span class="chip">+${p.symmetry.length - MAX_ELEMENTS_SHOWN} more</span>` : nothing}
          ${p.symmetry.length === 0 ? html`<span class="muted">none (amplitudes too small)</span>` : nothing}
        </div>
      </section>
      <section data-testid="pattern-guide">
        <h3>Guiding system (averaged prediction)</h3>
        <dl>
          <dt>pattern</dt>
          <dd>${patternLabel(g)}</dd>
          <dt>margin</dt>
          <dd>
            ${
              margin === null
                ? html`<span class="muted">${g.locked ? 'not computed' : 'needs a locked guide'}</span>`
                : html`${formatNumber(margin, 3)} per slow unit
                    <span class=${margin < 0 ? 'stable' : 'unstable'}>${margin < 0 ? 'stable' : 'unstable'}</span>`
            }
          </dd>
          ${
            constant
              ? html`<dt>time constant</dt>
                  <dd>${timeConstantText(constant, scales)}</dd>`
              : nothing
          }
          <dt>full − guide</dt>
          <dd
            title="largest |a_full − a_guide| over nodes and modes; 'aligned' removes the common phase that noise makes drift, leaving the part that is a different pattern"
          >
            max |Δa| = ${formatNumber(frame.divergence.max, 3)} (${formatNumber(100 * frame.divergence.relative, 2)}
            %)${aligned !== undefined ? html` · aligned ${formatNumber(aligned, 3)}` : nothing}
          </dd>
          ${prediction ? this.renderPrediction(prediction, scales, session.omega) : nothing}
          <dt>integrator</dt>
          <dd>${integratorText(frame)}</dd>
        </dl>
      </section>
      ${
        warnings.length
          ? html`<section data-testid="pattern-warnings">
              <h3>Warnings</h3>
              <ul class="warnings">
                ${warnings.map((w) => html`<li class=${w.fault ? 'fault' : ''}>${w.text}</li>`)}
              </ul>
            </section>`
          : nothing
      }
    `;
  }

  private renderPrediction(p: LivePrediction, scales: RunScales, omega: readonly number[]) {
    const verdictClass = p.verdict === 'persists' ? 'stable' : p.verdict === 'lost' ? 'unstable' : '';
    const next = p.pattern;
    return html`<dt>after last change</dt>
      <dd data-testid="prediction">
        <span class=${verdictClass}>${p.verdict}</span> (at τ = ${formatNumber(p.tau, 4)}): ${p.message}
        ${
          next
            ? html`<br /><span class="muted">${destinationText(next, scales)}</span>
                ${next.locked && next.mode !== 0 ? html`<br /><span class="defect">${unwantedModeLine(next.mode, omega, scales)}</span>` : nothing}`
            : nothing
        }
      </dd>`;
  }

  private warnings(): { text: string; fault: boolean }[] {
    const session = this.store?.session;
    const frame = this.store?.latest;
    const events = this.store?.events ?? [];
    const out: { text: string; fault: boolean }[] = [];
    if (!session || !frame) return out;
    if (frame.status === 'halted' || session.status === 'halted') {
      const blowUp = [...events].reverse().find((e) => e.kind === 'blow-up');
      out.push({ text: blowUp ? blowUp.message : 'the run halted (blow-up); the last good state is kept', fault: true });
    }
    for (const w of session.warnings) out.push({ text: w, fault: false });
    if (events.some((e) => e.kind === 'guide-failure'))
      out.push({ text: 'the guiding system failed; its prediction is stale', fault: true });
    if (frame.full.dominantMode !== 0)
      out.push({
        text: `${modeName(frame.full.dominantMode)} carries most of the energy: the output is at that mode's frequency`,
        fault: true,
      });
    return out;
  }
}

/** The array output's spread and combining loss, one string (not text across template lines, which would read with a line break). */
function arrayOutputText(spread: number | null, combiningLossDb: number | null | undefined): string {
  const loss = combiningLossDb === null ? '—' : `${formatNumber(combiningLossDb, 2)} dB`;
  return `array output: phase spread ${spreadText(spread)} · combining loss ${loss}`;
}

/** The guide's time constant in slow units, periods and seconds, one string (as arrayOutputText). */
function timeConstantText(constant: NonNullable<ReturnType<typeof marginTimeConstant>>, scales: RunScales): string {
  const periods = `${formatNumber(constant.slow, 3)} slow units = ${formatNumber(constant.periods, 3)} periods`;
  return `${periods} ≈ ${formatSeconds(constant.seconds)} ${frequencyBasis(scales)}`;
}

/** The design-defect words for a pattern on an unwanted mode, its offset in Hz on the run's frequency basis. */
function unwantedModeLine(mode: number, omega: readonly number[], scales: RunScales): string {
  return unwantedModeText(mode, modeOffset(mode, omega, scales.nominalFrequencyHz), (hz) => `${formatHz(hz)} ${frequencyBasis(scales)}`);
}

/** Which integrator made the full system's numbers, and what that means for the noise. */
function integratorText(frame: WireFrame): string {
  const f = frame as { mode?: string; noiseModel?: string };
  if (f.mode === 'envelope') {
    const noise =
      f.noiseModel === 'averaged-diffusion'
        ? '; noise as averaged diffusion: statistically, not pathwise, equivalent to the micro steps'
        : '';
    return `second-order envelope (macro steps)${noise}`;
  }
  return f.mode === 'micro' ? 'micro steps resolving the carrier' : '—';
}

customElements.define('sr-pattern-panel', PatternPanel);

import { LitElement, css, unsafeCSS, html, nothing } from 'lit';
import type { SessionInfo, Speed } from '../../../src/protocol/messages.js';
import type { FrameStore } from '../data/frame-store.js';
import { StoreController } from '../data/store-controller.js';
import { formatNumber, formatSimulatedSeconds, rateAsPpm, runScalesOf, simulatedSecondsPerSecond } from '../data/engineering.js';
import { couplingToPull } from '../../../src/scenario/units.js';
import { DIVIDER, MUTED, NOTICE_BORDER, NOTICE_GROUND, NOTICE_INK, panelStyles } from '../theme.js';
import { commandEvent } from './commands.js';
import type { ScenarioChoice } from '../../../src/protocol/catalogue-lists.js';
import { lockIcon } from './icons.js';
import './detuning-editor.js';

/** Pace presets in slow-time units per wall second. */
const SPEEDS: Speed[] = [0.1, 0.3, 1, 3, 10, 30, 'max'];

/**
 * Every operator command, grouped by what it changes, with engineering units beside the
 * dimensionless values. For viewers and in replay the whole panel is disabled and says why.
 */
export class ControlPanel extends LitElement {
  static override properties = {
    store: { attribute: false },
    scenarios: { attribute: false },
    canEdit: { type: Boolean },
    readOnlyReason: { type: String },
    replaying: { type: Boolean },
    lastCommand: { type: String },
    drafts: { state: true },
    detuningNode: { state: true },
  };
  static override styles = [
    panelStyles,
    css`
      fieldset {
        border: 0;
        border-top: 1px solid ${unsafeCSS(DIVIDER)};
        margin: 0;
        padding: 7px 0 8px;
      }
      legend {
        font-size: 13px;
        font-weight: 700;
        color: ${unsafeCSS(MUTED)};
        padding: 0 6px 0 0;
      }
      .row {
        display: flex;
        flex-wrap: wrap;
        gap: 6px 10px;
        align-items: center;
      }
      label {
        display: inline-flex;
        gap: 4px;
        align-items: center;
        font-size: 14px;
      }
      input[type='number'] {
        width: 5.6em;
      }
      select {
        max-width: 16em;
      }
      .unit {
        font-size: 13px;
        color: ${unsafeCSS(MUTED)};
      }
      .readonly {
        background: ${unsafeCSS(NOTICE_GROUND)};
        border: 1px solid ${unsafeCSS(NOTICE_BORDER)};
        color: ${unsafeCSS(NOTICE_INK)};
        border-radius: 6px;
        padding: 6px 8px;
        font-size: 14px;
        margin-bottom: 6px;
      }
      .last {
        font-size: 13px;
        color: ${unsafeCSS(MUTED)};
        min-height: 1.2em;
      }
    `,
  ];

  declare store: FrameStore | null;
  declare scenarios: ScenarioChoice[];
  declare canEdit: boolean;
  declare readOnlyReason: string;
  declare replaying: boolean;
  declare lastCommand: string;
  declare drafts: Record<string, string>;
  declare detuningNode: number;

  constructor() {
    super();
    this.store = null;
    this.scenarios = [];
    this.canEdit = false;
    this.readOnlyReason = '';
    this.replaying = false;
    this.lastCommand = '';
    this.drafts = {};
    this.detuningNode = 0;
    new StoreController(
      this,
      () => this.store,
      (change) => (change.session || change.reset) && this.requestUpdate(),
    );
  }

  private draft(key: string, fallback: number | string): string {
    return this.drafts[key] ?? String(fallback);
  }

  private edit(key: string) {
    return (event: Event) => {
      const drafts = { ...this.drafts, [key]: (event.target as HTMLInputElement).value };
      // a typed kappa replaces a typed pull, which then reads from kappa again
      if (key === 'k') delete drafts.pull;
      this.drafts = drafts;
    };
  }

  private send(action: string, fields: Record<string, unknown> = {}, clear: string[] = []): void {
    this.dispatchEvent(commandEvent(action, fields));
    if (clear.length) {
      const drafts = { ...this.drafts };
      for (const key of clear) delete drafts[key];
      this.drafts = drafts;
    }
  }

  /** Numbers the operator changed (blank or untouched fields are left out). */
  private changed(keys: Record<string, string>): Record<string, number> {
    const out: Record<string, number> = {};
    for (const [field, key] of Object.entries(keys)) {
      const text = this.drafts[key];
      if (text !== undefined && text.trim() !== '') out[field] = Number(text);
    }
    return out;
  }

  override render() {
    const s = this.store?.session;
    if (!s)
      return html`<h2>Controls</h2>
        <p class="muted">Waiting for the session…</p>`;
    const off = !this.canEdit;
    return html`
      <h2>Controls</h2>
      ${off ? html`<div class="readonly" data-testid="controls-readonly">${lockIcon} ${this.readOnlyReason || 'View only'}</div>` : nothing}
      ${this.renderRun(s, off)} ${this.renderCoupling(s, off)} ${this.renderNoise(s, off)} ${this.renderLinks(s, off)}
      ${this.renderDetuning(s, off)} ${this.renderKick(s, off)} ${this.renderScenario(s, off)}
      <div class="last" data-testid="last-command">${this.lastCommand}</div>
    `;
  }

  private renderRun(s: SessionInfo, off: boolean) {
    if (this.replaying) {
      return html`<fieldset>
        <legend>Run</legend>
        <div class="unit">Replay: play or scrub in the bar above. The values below are the ones in force at this point of the log.</div>
      </fieldset>`;
    }
    const scales = runScalesOf(s);
    const pace = typeof s.speed === 'number' ? simulatedSecondsPerSecond(s.speed, scales) : null;
    const paused = s.status === 'paused';
    return html`
      <fieldset>
        <legend>Run</legend>
        <div class="row">
          <button
            data-action=${paused ? 'resume' : 'pause'}
            class="primary"
            ?disabled=${off || s.status === 'halted'}
            @click=${() => this.send(paused ? 'resume' : 'pause')}
          >
            ${paused ? '▶ Resume' : '❚❚ Pause'}
          </button>
          <button data-action="reset" ?disabled=${off} @click=${() => this.send('reset')}>↺ Reset</button>
          <label
            >speed
            <select
              data-action="set-speed"
              ?disabled=${off}
              @change=${(e: Event) => {
                const v = (e.target as HTMLSelectElement).value;
                this.send('set-speed', { speed: v === 'max' ? 'max' : Number(v) });
              }}
            >
              ${SPEEDS.map((v) => html`<option value=${String(v)} ?selected=${String(v) === String(s.speed)}>${v === 'max' ? 'max' : `${v} slow/s`}</option>`)}
              ${SPEEDS.some((v) => String(v) === String(s.speed)) ? nothing : html`<option selected value=${String(s.speed)}>${formatNumber(s.speed as number)} slow/s</option>`}
            </select></label
          >
          <span class="unit"
            >${pace !== null ? `≈ ${formatSimulatedSeconds(pace, scales)} simulated per second` : s.speed === 'max' ? 'as fast as the server can' : ''}</span
          >
        </div>
      </fieldset>
    `;
  }

  private renderCoupling(s: SessionInfo, off: boolean) {
    const keys = { strength: 'k', reactive: 'rho', dissipative: 'sigma' };
    const clear = [...Object.values(keys), 'pull'];
    const kappa = Number(this.draft('k', s.coupling.strength));
    return html`
      <fieldset>
        <legend>Coupling</legend>
        <div class="row">
          <label
            >κ <input type="number" step="0.01" .value=${this.draft('k', s.coupling.strength)} ?disabled=${off} @input=${this.edit('k')}
          /></label>
          <label
            >ρ <input type="number" step="0.1" .value=${this.draft('rho', s.coupling.reactive)} ?disabled=${off} @input=${this.edit('rho')}
          /></label>
          <label
            >σ
            <input
              type="number"
              step="0.1"
              .value=${this.draft('sigma', s.coupling.dissipative)}
              ?disabled=${off}
              @input=${this.edit('sigma')}
          /></label>
          <button
            data-action="set-coupling"
            ?disabled=${off}
            @click=${() => {
              const fields = this.changed(keys);
              if (Object.keys(fields).length) this.send('set-coupling', fields, clear);
            }}
          >
            Apply
          </button>
        </div>
        ${this.renderPull(s, off)}
        <div class="unit">ε·κ = ${formatNumber(rateAsPpm(kappa, s.epsilon), 3)} ppm (coupling rate as a relative frequency)</div>
      </fieldset>
    `;
  }

  /**
   * The coupling as an engineer states it (src/scenario/units.ts, couplingToPull): the largest pull
   * one link of weight 1 exerts, its angle and the pair locking range 2 P cos alpha. Typing a pull
   * sets kappa for the rho and sigma shown.
   */
  private renderPull(s: SessionInfo, off: boolean) {
    if (!(s.epsilon > 0)) return nothing;
    const shape = {
      reactive: Number(this.draft('rho', s.coupling.reactive)),
      dissipative: Number(this.draft('sigma', s.coupling.dissipative)),
    };
    if (![shape.reactive, shape.dissipative].every(Number.isFinite)) return nothing;
    const perUnit = couplingToPull({ strength: 1, ...shape }, s.epsilon, s.omega[0]);
    const kappa = Number(this.draft('k', s.coupling.strength));
    const pull = Number.isFinite(kappa) ? couplingToPull({ strength: kappa, ...shape }, s.epsilon, s.omega[0]) : null;
    const onPull = (event: Event) => {
      const text = (event.target as HTMLInputElement).value;
      this.drafts = {
        ...this.drafts,
        pull: text,
        ...(perUnit.pullPpm > 0 && text.trim() !== '' ? { k: String(Number(text) / perUnit.pullPpm) } : {}),
      };
    };
    const shown = this.drafts.pull ?? (pull ? formatNumber(pull.pullPpm, 4) : '');
    return html`<div class="row">
      <label
        >pull <input type="number" step="0.1" data-testid="coupling-pull" .value=${shown} ?disabled=${off || !(perUnit.pullPpm > 0)} @input=${onPull} /> ppm
        per link</label
      >
      <span class="unit" data-testid="coupling-pull-reading"
        >${
          pull
            ? `at α = ${formatNumber((pull.angle * 180) / Math.PI, 3)}°, pair locking range ${formatNumber(2 * pull.pullPpm * Math.cos(pull.angle), 3)} ppm`
            : ''
        }</span
      >
    </div>`;
  }

  private renderNoise(s: SessionInfo, off: boolean) {
    const keys = { intensity: 'q', detuningWalk: 'walk' };
    return html`
      <fieldset>
        <legend>Noise</legend>
        <div class="row">
          <label
            >q
            <input type="number" step="any" min="0" .value=${this.draft('q', s.noise.intensity)} ?disabled=${off} @input=${this.edit('q')}
          /></label>
          <label
            >Δ walk
            <input
              type="number"
              step="any"
              min="0"
              .value=${this.draft('walk', s.noise.detuningWalk)}
              ?disabled=${off}
              @input=${this.edit('walk')}
          /></label>
          <button
            data-action="set-noise"
            ?disabled=${off}
            @click=${() => {
              const fields = this.changed(keys);
              if (Object.keys(fields).length) this.send('set-noise', fields, Object.values(keys));
            }}
          >
            Apply
          </button>
        </div>
        <div class="unit">seed ${s.noise.seed}; q per unit τ on each x″, Δ walk per unit τ</div>
      </fieldset>
    `;
  }

  private renderLinks(s: SessionInfo, off: boolean) {
    const index = Math.min(s.links.length - 1, Number(this.draft('link', 0)));
    const link = s.links[index];
    if (!link) return nothing;
    const weight = Number(this.draft('weight', link.weight));
    return html`
      <fieldset>
        <legend>Link</legend>
        <div class="row">
          <select
            ?disabled=${off}
            @change=${(e: Event) => {
              const { weight: _stale, ...rest } = this.drafts;
              this.drafts = { ...rest, link: (e.target as HTMLSelectElement).value };
            }}
          >
            ${s.links.map((l, i) => html`<option value=${i} ?selected=${i === index}>${l.from} → ${l.to}${l.weight === 0 ? ' ✕' : ''}</option>`)}
          </select>
          <label
            >weight
            <input
              type="number"
              step="0.1"
              min="0"
              .value=${this.draft('weight', link.weight)}
              ?disabled=${off}
              @input=${this.edit('weight')}
          /></label>
          <button
            data-action="set-link-weight"
            ?disabled=${off}
            @click=${() => this.send('set-link-weight', { from: link.from, to: link.to, weight }, ['weight'])}
          >
            Set
          </button>
          <button
            data-action=${link.weight > 0 ? 'break-link' : 'restore-link'}
            ?disabled=${off}
            @click=${() => this.send(link.weight > 0 ? 'break-link' : 'restore-link', { from: link.from, to: link.to })}
          >
            ${link.weight > 0 ? 'Break' : 'Restore'}
          </button>
        </div>
        <div class="unit">
          ${formatNumber((100 * weight) / (link.nominal || 1), 3)} % of nominal (${formatNumber(link.nominal)}); a broken link has weight 0
        </div>
      </fieldset>
    `;
  }

  private renderDetuning(s: SessionInfo, off: boolean) {
    const k = Math.min(s.nodes - 1, this.detuningNode);
    return html`
      <fieldset>
        <legend>Detuning</legend>
        <div class="row">
          <label
            >node
            <select ?disabled=${off} @change=${(e: Event) => (this.detuningNode = Number((e.target as HTMLSelectElement).value))}>
              ${Array.from({ length: s.nodes }, (_, i) => html`<option value=${i} ?selected=${i === k}>${i}</option>`)}
            </select></label
          >
          <sr-detuning-editor
            inline
            .node=${k}
            .delta=${s.detuning[k] ?? 0}
            .epsilon=${s.epsilon}
            .crystal=${s.parts?.[k] ?? null}
            .nominalFrequencyHz=${s.nominalFrequencyHz}
            ?disabled=${off}
          ></sr-detuning-editor>
        </div>
      </fieldset>
    `;
  }

  private renderKick(s: SessionInfo, off: boolean) {
    const node = Number(this.draft('kickNode', 0));
    const mode = Number(this.draft('kickMode', s.modes > 1 ? 1 : 0));
    return html`
      <fieldset>
        <legend>Kick a mode</legend>
        <div class="row">
          <label
            >node
            <select ?disabled=${off} @change=${this.edit('kickNode')}>
              ${Array.from({ length: s.nodes }, (_, i) => html`<option value=${i} ?selected=${i === node}>${i}</option>`)}
            </select></label
          >
          <label
            >mode
            <select ?disabled=${off} @change=${this.edit('kickMode')}>
              ${Array.from({ length: s.modes }, (_, j) => html`<option value=${j} ?selected=${j === mode}>${j === 0 ? '0 (wanted)' : `${j} (unwanted)`}</option>`)}
            </select></label
          >
          <label
            >|Δa|
            <input type="number" step="0.1" .value=${this.draft('kickAmount', 0.5)} ?disabled=${off} @input=${this.edit('kickAmount')}
          /></label>
          <label
            >phase
            <input type="number" step="0.1" .value=${this.draft('kickPhase', 0)} ?disabled=${off} @input=${this.edit('kickPhase')} /><span
              class="unit"
              >rad</span
            ></label
          >
          <button
            data-action="kick-mode"
            ?disabled=${off}
            @click=${() =>
              this.send('kick-mode', {
                node,
                mode,
                amount: Number(this.draft('kickAmount', 0.5)),
                phase: Number(this.draft('kickPhase', 0)),
              })}
          >
            Kick
          </button>
        </div>
      </fieldset>
    `;
  }

  private renderScenario(s: SessionInfo, off: boolean) {
    const current = this.scenarios.find((c) => c.title === s.scenarioName || c.name === s.scenarioName);
    const chosen = this.draft('scenario', current?.name ?? this.scenarios[0]?.name ?? '');
    return html`
      <fieldset>
        <legend>Scenario</legend>
        <div class="row">
          <select ?disabled=${off || this.scenarios.length === 0} @change=${this.edit('scenario')}>
            ${this.scenarios.map((c) => html`<option value=${c.name} ?selected=${c.name === chosen}>${c.title}</option>`)}
          </select>
          <button data-action="load-scenario" ?disabled=${off || !chosen} @click=${() => this.send('load-scenario', { name: chosen })}>
            Load
          </button>
          <span class="unit">now: ${s.scenarioName}</span>
        </div>
      </fieldset>
    `;
  }
}

customElements.define('sr-control-panel', ControlPanel);

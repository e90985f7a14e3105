import { LitElement, css, html, unsafeCSS, type PropertyValues } from 'lit';
import type { NodePartsView } from '../../../src/protocol/messages.js';
import { loadChangeToPpm, ppmToLoadChange } from '../../../src/scenario/parts/trim.js';
import { deltaOf, formatNumber, ppmOf } from '../data/engineering.js';
import { MUTED, POPOVER_SHADOW, panelStyles } from '../theme.js';
import { commandEvent } from './commands.js';

const PICOFARAD = 1e-12;

/**
 * Edits one node's detuning with the physical offset (ppm) and the model's Delta side by side;
 * typing in either updates the other through the units mapping. Apply sends set-detuning with
 * the field that was typed, so the server does the one authoritative conversion. On a board
 * described by its parts a third field takes the detuning as a change of the node's load
 * capacitance from as built, in pF (docs/parts.md, 'Load resonance'), and sends it as ppm.
 */
export class DetuningEditor extends LitElement {
  static override properties = {
    node: { type: Number },
    delta: { type: Number },
    epsilon: { type: Number },
    crystal: { attribute: false },
    nominalFrequencyHz: { type: Number },
    disabled: { type: Boolean },
    closable: { type: Boolean },
    typed: { state: true },
    ppmText: { state: true },
    deltaText: { state: true },
    trimText: { state: true },
  };
  static override styles = [
    panelStyles,
    css`
      :host {
        padding: 10px 12px;
        box-shadow: 0 6px 24px ${unsafeCSS(POPOVER_SHADOW)};
      }
      :host([inline]) {
        box-shadow: none;
        border: 0;
        padding: 0;
      }
      .row {
        display: grid;
        grid-template-columns: auto auto auto;
        gap: 6px 8px;
        align-items: center;
      }
      label {
        font-size: 13px;
        color: ${unsafeCSS(MUTED)};
      }
      .eq {
        font-size: 13px;
        color: ${unsafeCSS(MUTED)};
      }
      .actions {
        display: flex;
        gap: 8px;
        margin-top: 8px;
        justify-content: flex-end;
      }
      h3 {
        margin: 0 0 8px;
        font-size: 15px;
      }
    `,
  ];

  declare node: number;
  declare delta: number;
  declare epsilon: number;
  declare disabled: boolean;
  declare closable: boolean;
  declare typed: 'ppm' | 'delta' | null;
  declare ppmText: string;
  declare deltaText: string;
  declare trimText: string;
  declare crystal: NodePartsView | null;
  declare nominalFrequencyHz: number;

  constructor() {
    super();
    this.node = 0;
    this.delta = 0;
    this.epsilon = 0;
    this.disabled = false;
    this.closable = false;
    this.typed = null;
    this.ppmText = '';
    this.deltaText = '';
    this.trimText = '';
    this.crystal = null;
    this.nominalFrequencyHz = 0;
  }

  /** The load change (pF) that gives `ppm`, as text; blank without parts or where no load reaches it. */
  private trimFor(ppm: number | null): string {
    if (!this.crystal || ppm === null || !Number.isFinite(ppm)) return '';
    const change = ppmToLoadChange(this.crystal, ppm, this.nominalFrequencyHz) / PICOFARAD;
    // to 0.1 fF: a node at its built load reads 0, not the rounding left by solving the load formula back
    return Number.isFinite(change) ? String(Number(change.toFixed(4))) : '';
  }

  protected override willUpdate(changed: PropertyValues<this>): void {
    // A new node or a new value from the server replaces whatever has not been typed yet.
    if (changed.has('node') || ((changed.has('delta') || changed.has('epsilon') || changed.has('crystal')) && this.typed === null)) {
      this.typed = null;
      this.deltaText = formatNumber(this.delta, 4);
      const ppm = ppmOf(this.delta, this.epsilon);
      this.ppmText = ppm === null ? '' : formatNumber(ppm, 4);
      this.trimText = this.trimFor(ppm);
    }
  }

  private onPpm(event: Event): void {
    this.typed = 'ppm';
    this.ppmText = (event.target as HTMLInputElement).value;
    const delta = deltaOf(Number(this.ppmText), this.epsilon);
    this.deltaText = delta === null || this.ppmText.trim() === '' ? '' : formatNumber(delta, 4);
    this.trimText = this.ppmText.trim() === '' ? '' : this.trimFor(Number(this.ppmText));
  }

  private onTrim(event: Event): void {
    // sent as ppm: the server maps ppm, the trim is this editor's reading of it
    this.typed = 'ppm';
    this.trimText = (event.target as HTMLInputElement).value;
    const ppm =
      this.crystal && this.trimText.trim() !== ''
        ? loadChangeToPpm(this.crystal, Number(this.trimText) * PICOFARAD, this.nominalFrequencyHz)
        : NaN;
    this.ppmText = Number.isFinite(ppm) ? formatNumber(ppm, 6) : '';
    const delta = Number.isFinite(ppm) ? deltaOf(ppm, this.epsilon) : null;
    this.deltaText = delta === null ? '' : formatNumber(delta, 4);
  }

  private onDelta(event: Event): void {
    this.typed = 'delta';
    this.deltaText = (event.target as HTMLInputElement).value;
    const ppm = ppmOf(Number(this.deltaText), this.epsilon);
    this.ppmText = ppm === null || this.deltaText.trim() === '' ? '' : formatNumber(ppm, 4);
    this.trimText = this.deltaText.trim() === '' ? '' : this.trimFor(ppm);
  }

  private apply(): void {
    const fields: Record<string, unknown> = { node: this.node };
    if (this.typed === 'ppm') fields.ppm = Number(this.ppmText);
    else fields.delta = Number(this.deltaText);
    this.dispatchEvent(commandEvent('set-detuning', fields));
    this.typed = null;
    if (this.closable) this.close();
  }

  private close(): void {
    this.dispatchEvent(new CustomEvent('sr-close', { bubbles: true, composed: true }));
  }

  override render() {
    const canPpm = this.epsilon > 0;
    return html`
      ${this.closable ? html`<h3>Detuning of node ${this.node}</h3>` : ''}
      <div class="row">
        <label for="ppm">offset (ppm)</label>
        <span></span>
        <label for="delta">Δ (model)</label>
        <input
          id="ppm"
          type="number"
          step="0.01"
          .value=${this.ppmText}
          ?disabled=${this.disabled || !canPpm}
          @input=${this.onPpm}
          @keydown=${(e: KeyboardEvent) => e.key === 'Enter' && this.apply()}
        />
        <span class="eq">⇄</span>
        <input
          id="delta"
          type="number"
          step="0.01"
          .value=${this.deltaText}
          ?disabled=${this.disabled}
          @input=${this.onDelta}
          @keydown=${(e: KeyboardEvent) => e.key === 'Enter' && this.apply()}
        />
      </div>
      ${
        this.crystal
          ? html`<div class="row trim">
            <label for="trim">C_L change (pF)</label>
            <input
              id="trim"
              type="number"
              step="0.01"
              .value=${this.trimText}
              ?disabled=${this.disabled || !canPpm}
              @input=${this.onTrim}
              @keydown=${(e: KeyboardEvent) => e.key === 'Enter' && this.apply()}
            />
            <span class="eq" data-testid="trim-basis"
              >from ${formatNumber(this.crystal.loadCapacitanceF / PICOFARAD, 4)} pF as built, ${formatNumber(this.crystal.pullabilityPpmPerPf, 3)} ppm/pF there</span
            >
          </div>`
          : ''
      }
      <div class="eq">Δ = ppm·10⁻⁶ / ε, ε = ${formatNumber(this.epsilon)}</div>
      <div class="actions">
        ${this.closable ? html`<button @click=${this.close}>Cancel</button>` : ''}
        <button class="primary" data-action="apply-detuning" ?disabled=${this.disabled} @click=${this.apply}>Set detuning</button>
      </div>
    `;
  }
}

customElements.define('sr-detuning-editor', DetuningEditor);

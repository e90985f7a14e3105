import { LitElement, css, html, nothing, unsafeCSS, type PropertyValues } from 'lit';
import type { SessionInfo } from '../../../src/protocol/messages.js';
import type { BranchLimit } from '../../../src/predict/continuation.js';
import {
  branchX,
  defaultRange,
  isLossLimit,
  LIMIT_WORDS,
  liveValue,
  whatIfParameters,
  type BranchQuantity,
  type CatalogueResponse,
  type WhatIfParameter,
  type WhatIfResponse,
} from '../data/prediction-data.js';
import { getJson } from '../data/api-client.js';
import { deltaOf, formatNumber, ppmOf } from '../data/engineering.js';
import { BRAND_HOVER, FAULT, LOCKED, MUTED, SOFT_INK, columnStyles, panelStyles } from '../theme.js';
import '../charts/branch-chart.js';

/**
 * The what-if control: choose a parameter (a node's detuning, the coupling, a link's weight),
 * the pattern and a range, and have the server continue that pattern of the guiding system along
 * it (GET /api/what-if: a copy of the live parameters in a worker; the live run is never
 * touched). Shows where the pattern is lost, in ppm for a detuning, and the branch diagram.
 */
export class WhatIfPanel extends LitElement {
  static override properties = {
    session: { attribute: false },
    catalogue: { attribute: false },
    livePattern: { type: Number },
    selected: { type: Number },
    param: { state: true },
    from: { state: true },
    to: { state: true },
    quantity: { state: true },
    running: { state: true },
    result: { state: true },
    error: { state: true },
    elapsed: { state: true },
  };
  static override styles = [
    panelStyles,
    columnStyles,
    css`
      .note {
        font-size: 14px;
        color: ${unsafeCSS(MUTED)};
        margin: -2px 0 8px;
      }
      .row {
        display: flex;
        flex-wrap: wrap;
        gap: 8px 14px;
        align-items: center;
        margin-bottom: 8px;
      }
      label {
        display: inline-flex;
        gap: 6px;
        align-items: center;
        font-size: 15px;
      }
      select,
      input,
      button {
        font-size: 15px;
      }
      input[type='number'] {
        width: 6.5em;
      }
      button.primary {
        font-weight: 700;
        padding: 5px 14px;
      }
      button.primary:hover:not(:disabled) {
        background: ${unsafeCSS(BRAND_HOVER)};
      }
      .headline {
        font-size: 21px;
        font-weight: 800;
        margin: 2px 0 4px;
      }
      .limits {
        display: grid;
        grid-template-columns: max-content 1fr;
        gap: 2px 12px;
        font-size: 15px;
        margin: 0 0 6px;
        font-variant-numeric: tabular-nums;
      }
      .limits dt {
        color: ${unsafeCSS(MUTED)};
      }
      .limits dd {
        margin: 0;
      }
      .lost {
        color: ${unsafeCSS(FAULT)};
        font-weight: 700;
      }
      .holds {
        color: ${unsafeCSS(LOCKED)};
      }
      .error {
        color: ${unsafeCSS(FAULT)};
        font-weight: 600;
        font-size: 15px;
        margin: 0 0 6px;
      }
      .busy {
        font-size: 15px;
        color: ${unsafeCSS(SOFT_INK)};
        margin: 0 0 6px;
      }
      sr-branch-chart {
        flex: 1 1 auto;
        min-height: 0;
      }
    `,
  ];

  declare session: SessionInfo | null;
  declare catalogue: CatalogueResponse | null;
  declare livePattern: number;
  declare selected: number;
  declare param: string;
  declare from: string;
  declare to: string;
  declare quantity: BranchQuantity;
  declare running: boolean;
  declare result: WhatIfResponse | null;
  declare error: string;
  declare elapsed: number;

  private abort: AbortController | null = null;
  private clock: ReturnType<typeof setInterval> | null = null;

  constructor() {
    super();
    this.session = null;
    this.catalogue = null;
    this.livePattern = -1;
    this.selected = -1;
    this.param = '';
    this.from = '';
    this.to = '';
    this.quantity = 'phase';
    this.running = false;
    this.result = null;
    this.error = '';
    this.elapsed = 0;
  }

  override disconnectedCallback(): void {
    super.disconnectedCallback();
    this.abort?.abort();
    this.stopClock();
  }

  protected override willUpdate(changed: PropertyValues): void {
    const s = this.session;
    if (!s) return;
    const known = whatIfParameters(s);
    // A new network (another scenario) may not have the chosen parameter.
    if (changed.has('session') && !known.some((p) => p.id === this.param)) this.chooseParameter(known[0]?.id ?? '');
  }

  private get parameter(): WhatIfParameter | undefined {
    return this.session ? whatIfParameters(this.session).find((p) => p.id === this.param) : undefined;
  }

  /** Pick a parameter and fill in its default range (in ppm for a detuning). */
  chooseParameter(id: string): void {
    this.param = id;
    const s = this.session;
    if (!s || !id) return;
    const range = defaultRange(s, id);
    const ppm = whatIfParameters(s).find((p) => p.id === id)?.ppm ?? false;
    const show = (v: number) => String(Number((ppm ? (ppmOf(v, s.epsilon) ?? v) : v).toPrecision(3)));
    this.from = show(range.min);
    this.to = show(range.max);
  }

  /** The pattern index sent: the one clicked in the catalogue, else the live one, else the server's choice. */
  private get patternIndex(): number | null {
    if (this.selected >= 0) return this.selected;
    if (this.livePattern >= 0) return this.livePattern;
    return null;
  }

  /** Start a continuation (the previous one, if still running, is abandoned). */
  async run(): Promise<void> {
    const s = this.session;
    const p = this.parameter;
    if (!s || !p) return;
    const bound = (text: string, name: string): number | null => {
      if (text.trim() === '') return null;
      const value = Number(text);
      if (!Number.isFinite(value)) throw new Error(`${name} must be a number (got ${JSON.stringify(text)})`);
      return p.ppm ? deltaOf(value, s.epsilon) : value;
    };
    let query: URLSearchParams;
    try {
      const min = bound(this.from, 'from');
      const max = bound(this.to, 'to');
      query = new URLSearchParams({ param: p.id });
      const index = this.patternIndex;
      if (index !== null) query.set('pattern', String(index));
      if (min !== null || max !== null) query.set('range', `${min ?? ''}:${max ?? ''}`);
    } catch (error) {
      this.error = (error as Error).message;
      return;
    }
    this.abort?.abort();
    const abort = (this.abort = new AbortController());
    this.running = true;
    this.error = '';
    this.startClock();
    try {
      const result = await getJson<WhatIfResponse>(`/api/what-if?${query}`, abort.signal);
      if (abort.signal.aborted) return;
      this.result = result;
    } catch (error) {
      if (abort.signal.aborted) return;
      this.error = (error as Error).message;
    } finally {
      if (this.abort === abort) {
        this.running = false;
        this.stopClock();
      }
    }
  }

  private startClock(): void {
    this.stopClock();
    const started = performance.now();
    this.elapsed = 0;
    this.clock = setInterval(() => (this.elapsed = (performance.now() - started) / 1000), 250);
  }

  private stopClock(): void {
    if (this.clock !== null) clearInterval(this.clock);
    this.clock = null;
  }

  override render() {
    const s = this.session;
    if (!s)
      return html`<h2>What-if</h2>
        <p class="muted">Waiting for the session…</p>`;
    const params = whatIfParameters(s);
    const p = this.parameter;
    const patterns = this.catalogue?.patterns ?? [];
    const chosen = this.patternIndex;
    const r = this.result;
    const resultParam = r ? params.find((q) => q.id === r.continuation.parameter) : undefined;
    const busyText = `Continuing ${p?.label ?? ''}… ${formatNumber(this.elapsed, 2)} s (the live run keeps going)`;
    return html`
      <h2>What-if · follow one pattern as one parameter moves</h2>
      <div class="note">Computed on a copy of the guiding system with the live parameters; the live run is not touched.</div>
      <div class="row">
        <label
          >parameter
          <select data-testid="what-if-param" @change=${(e: Event) => this.chooseParameter((e.target as HTMLSelectElement).value)}>
            ${params.map((q) => html`<option value=${q.id} ?selected=${q.id === this.param}>${q.label}</option>`)}
          </select></label
        >
        <label
          >pattern
          <select data-testid="what-if-pattern" @change=${(e: Event) => this.pickPattern(Number((e.target as HTMLSelectElement).value))}>
            <option value="-1" ?selected=${chosen === null}>
              ${this.livePattern >= 0 ? `live (#${this.livePattern})` : 'the one the start settles into'}
            </option>
            ${patterns.map(
              (e) =>
                html`<option value=${e.index} ?selected=${this.selected === e.index}>
                  #${e.index} ${e.kind}${e.q !== undefined ? ` q=${e.q}` : ''} · mode ${e.mode} · ${e.stability}
                </option>`,
            )}
          </select></label
        >
      </div>
      <div class="row">
        <label
          >from
          <input
            type="number"
            step="any"
            data-testid="what-if-from"
            .value=${this.from}
            @input=${(e: Event) => (this.from = (e.target as HTMLInputElement).value)}
        /></label>
        <label
          >to
          <input
            type="number"
            step="any"
            data-testid="what-if-to"
            .value=${this.to}
            @input=${(e: Event) => (this.to = (e.target as HTMLInputElement).value)}
        /></label>
        <span class="muted">${p?.ppm ? 'ppm' : 'model units'} · live ${p ? this.valueText(p, liveValue(s, p.id)) : '—'}</span>
        <label
          >y
          <select
            data-testid="what-if-quantity"
            @change=${(e: Event) => (this.quantity = (e.target as HTMLSelectElement).value as BranchQuantity)}
          >
            <option value="phase" ?selected=${this.quantity === 'phase'}>phase differences</option>
            <option value="amplitude" ?selected=${this.quantity === 'amplitude'}>amplitudes</option>
          </select></label
        >
        <button class="primary" data-action="run-what-if" ?disabled=${!p} @click=${() => void this.run()}>
          ${this.running ? '↻ Running…' : '▶ Run what-if'}
        </button>
      </div>
      ${this.running ? html`<div class="busy" data-testid="what-if-busy">${busyText}</div>` : nothing}
      ${this.error ? html`<div class="error" data-testid="what-if-error">${this.error}</div>` : nothing}
      ${r && resultParam ? this.renderResult(r, resultParam) : nothing}
      <sr-branch-chart
        .continuation=${r?.continuation ?? null}
        .quantity=${this.quantity}
        .current=${resultParam ? liveValue(s, resultParam.id) : null}
        ?inPpm=${resultParam?.ppm ?? false}
        .symbol=${resultParam?.symbol ?? ''}
        .epsilon=${s.epsilon}
      ></sr-branch-chart>
    `;
  }

  private pickPattern(index: number): void {
    this.dispatchEvent(new CustomEvent<number>('sr-select-pattern', { detail: index, bubbles: true, composed: true }));
  }

  private renderResult(r: WhatIfResponse, p: WhatIfParameter) {
    const c = r.continuation;
    const lower = c.limits.decreasing;
    const upper = c.limits.increasing;
    const unit = p.ppm ? ' ppm' : '';
    const at = (limit: BranchLimit | null, fallback: number | undefined): string =>
      limit ? `${formatNumber(branchX(limit, p.ppm), 4)}${unit}` : fallback !== undefined ? `${formatNumber(fallback, 4)}${unit}` : '—';
    const first = c.branch[0];
    const last = c.branch[c.branch.length - 1];
    const startStable = c.branch[c.startIndex]?.stable;
    // the words of a limit as strings, not text across template lines (which would read with line breaks)
    const where = (limit: BranchLimit) => ` at ${p.symbol} = ${formatNumber(limit.parameter, 4)}`;
    const inPpm = (limit: BranchLimit) => (p.ppm && limit.ppm !== null ? html` = <b>${formatNumber(limit.ppm, 4)} ppm</b>` : nothing);
    const distance = (limit: BranchLimit) =>
      `(${formatSignedNumber(p.ppm && limit.distancePpm !== null ? limit.distancePpm : limit.distance)}${unit} from the live value)`;
    const side = (limit: BranchLimit | null, name: string) =>
      html`<dt>${name}</dt>
        <dd data-testid=${`limit-${name}`}>
          ${
            limit
              ? html`<span class=${isLossLimit(limit) ? 'lost' : ''}>${LIMIT_WORDS[limit.kind]}</span>${where(limit)}${inPpm(limit)}
                  ${distance(limit)}`
              : html`<span class="muted">not continued this way</span>`
          }
        </dd>`;
    return html`
      <div class="headline" data-testid="what-if-headline">
        <span class=${startStable ? 'holds' : 'lost'}
          >#${c.pattern.index} ${c.pattern.kind}${c.pattern.q !== null ? ` q = ${c.pattern.q}` : ''}</span
        >
        ${startStable ? 'holds' : 'exists (unstable)'} for ${p.symbol} from
        <span class=${isLossLimit(lower) ? 'lost' : ''}>${isLossLimit(lower) ? '' : '≤ '}${at(lower, first && branchX(first, p.ppm))}</span>
        to
        <span class=${isLossLimit(upper) ? 'lost' : ''}>${isLossLimit(upper) ? '' : '≥ '}${at(upper, last && branchX(last, p.ppm))}</span>
      </div>
      <dl class="limits">
        ${side(lower, 'lower')} ${side(upper, 'upper')}
        <dt>branch</dt>
        <dd class="muted">
          ${c.name} · ${c.branch.length} points · ${c.steps} steps · ${formatNumber(r.wallSeconds, 2)} s${r.fromCache ? ' (cached)' : ''}
        </dd>
      </dl>
    `;
  }

  private valueText(p: WhatIfParameter, value: number | null): string {
    if (value === null) return '—';
    if (p.ppm && this.session) return `${formatNumber(ppmOf(value, this.session.epsilon), 4)} ppm`;
    return formatNumber(value, 4);
  }
}

function formatSignedNumber(value: number): string {
  return `${value > 0 ? '+' : ''}${formatNumber(value, 3)}`;
}

customElements.define('sr-what-if-panel', WhatIfPanel);

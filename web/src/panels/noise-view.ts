import { LitElement, css, html, nothing, unsafeCSS, type PropertyValues } from 'lit';
import type { NoiseResponse } from '../../../src/protocol/noise-output.js';
import type { FrameStore } from '../data/frame-store.js';
import { StoreController } from '../data/store-controller.js';
import { livePatternIndex, predictionKey, type CatalogueResponse } from '../data/prediction-data.js';
import { getJson } from '../data/api-client.js';
import { PollingController } from '../data/polling-controller.js';
import { formatHz, formatNumber } from '../data/engineering.js';
import { BRAND, CAUTION, FAULT, MUTED, NOTICE_BORDER, NOTICE_GROUND, NOTICE_INK, SOFT_INK, nodeColour, panelStyles } from '../theme.js';
import type { NoiseCurve, NoiseMark } from '../charts/noise-chart.js';
import '../charts/noise-chart.js';

/** Wait this long after the live parameters change before asking again (slider drags, bursts of faults). */
const REFETCH_DELAY_MS = 600;

type Deviation = 'adev' | 'mdev' | 'tdev';
const DEVIATIONS: { id: Deviation; label: string; axis: string }[] = [
  { id: 'adev', label: 'Allan deviation', axis: 'σy(τ)' },
  { id: 'mdev', label: 'modified Allan deviation', axis: 'mod σy(τ)' },
  { id: 'tdev', label: 'time deviation', axis: 'TDEV x(τ) in seconds' },
];

/** The pattern analysed: the one the live run is in, or a catalogue index. */
type PatternChoice = 'live' | number;

/**
 * The Noise tab: phase noise L(f) and ADEV / MDEV / TDEV at every time scale of one locked
 * pattern of the live parameters (GET /api/noise), for the array output, each node and one part
 * alone, with the locking bandwidth marked and the range beyond the averaged model washed. The
 * pattern defaults to the one the live run is in (from the catalogue); a part noise in the
 * trade's power-law coefficients can be added. The stability caution stands beside the figures.
 */
export class NoiseView extends LitElement {
  static override properties = {
    store: { attribute: false },
    active: { type: Boolean },
    catalogue: { state: true },
    noise: { state: true },
    error: { state: true },
    choice: { state: true },
    deviation: { state: true },
    partNoise: { state: true },
  };
  static override styles = [
    panelStyles,
    css`
      :host {
        display: flex;
        flex-direction: column;
        gap: 10px;
        margin: 12px;
        overflow-y: auto;
      }
      .controls {
        display: flex;
        flex-wrap: wrap;
        align-items: center;
        gap: 8px 18px;
      }
      .controls label {
        display: inline-flex;
        align-items: center;
        gap: 6px;
        color: ${unsafeCSS(SOFT_INK)};
      }
      input.coefficients {
        width: 18em;
        padding: 2px 6px;
      }
      .facts {
        margin: 0;
        font-size: 16px;
        line-height: 1.5;
      }
      .facts b {
        font-variant-numeric: tabular-nums;
      }
      .caution {
        margin: 0;
        padding: 6px 10px;
        border-left: 4px solid ${unsafeCSS(CAUTION)};
        background: ${unsafeCSS(NOTICE_GROUND)};
        color: ${unsafeCSS(NOTICE_INK)};
        font-weight: 600;
      }
      .warnings {
        margin: 0;
        padding: 6px 10px 6px 26px;
        border: 1px solid ${unsafeCSS(NOTICE_BORDER)};
        color: ${unsafeCSS(NOTICE_INK)};
      }
      .error {
        color: ${unsafeCSS(FAULT)};
        margin: 0;
      }
      .charts {
        display: grid;
        grid-template-columns: minmax(0, 1fr) minmax(0, 1fr);
        gap: 16px;
      }
      sr-noise-chart {
        --chart-height: 460px;
      }
      .charts h3 {
        margin: 0 0 2px;
        font-size: 15px;
        color: ${unsafeCSS(SOFT_INK)};
      }
      .note {
        margin: 0;
        font-size: 13px;
        color: ${unsafeCSS(MUTED)};
      }
      @media (max-width: 1250px) {
        .charts {
          grid-template-columns: 1fr;
        }
      }
    `,
  ];

  declare store: FrameStore | null;
  declare active: boolean;
  declare catalogue: CatalogueResponse | null;
  declare noise: NoiseResponse | null;
  declare error: string;
  declare choice: PatternChoice;
  declare deviation: Deviation;
  /** The part noise applied ("" for none). */
  declare partNoise: string;

  /** What the last read asked for; a read is due when the live parameters or the choices differ. */
  private requestedKey = '';
  private readonly reader = new PollingController(this, {
    read: (signal) => this.read(signal),
    due: () => this.key() !== '' && this.key() !== this.requestedKey,
    whileReading: 'supersede',
  });

  constructor() {
    super();
    this.store = null;
    this.active = false;
    this.catalogue = null;
    this.noise = null;
    this.error = '';
    this.choice = 'live';
    this.deviation = 'adev';
    this.partNoise = '';
    new StoreController(
      this,
      () => this.store,
      () => this.scheduleRead(),
      1000,
    );
  }

  protected override updated(changed: PropertyValues): void {
    if (changed.has('active') || changed.has('choice') || changed.has('partNoise')) this.scheduleRead();
  }

  private key(): string {
    const session = this.store?.session ?? null;
    const parameters = predictionKey(session);
    if (parameters === '') return '';
    const live =
      this.choice === 'live' && this.catalogue ? (livePatternIndex(this.catalogue.patterns, this.store?.latest ?? null)?.index ?? '') : '';
    return [parameters, JSON.stringify(session?.noise ?? null), this.choice, live, this.partNoise].join('|');
  }

  private scheduleRead(): void {
    if (this.active) this.reader.readSoon(this.noise ? REFETCH_DELAY_MS : 0);
  }

  private async read(signal: AbortSignal): Promise<void> {
    this.requestedKey = this.key();
    try {
      const catalogue = await getJson<CatalogueResponse>('/api/catalogue', signal);
      if (signal.aborted) return;
      this.catalogue = catalogue;
      const index = this.choice === 'live' ? livePatternIndex(catalogue.patterns, this.store?.latest ?? null)?.index : this.choice;
      const query = new URLSearchParams();
      if (index !== undefined) query.set('pattern', String(index));
      if (this.partNoise !== '') query.set('partNoise', this.partNoise);
      const text = query.toString();
      const noise = await getJson<NoiseResponse>(`/api/noise${text ? `?${text}` : ''}`, signal);
      if (signal.aborted) return;
      this.noise = noise;
      this.error = '';
      this.requestedKey = this.key();
    } catch (error) {
      if (signal.aborted) return;
      this.error = `The noise analysis could not be made: ${(error as Error).message}`;
    } finally {
      this.scheduleRead();
    }
  }

  private applyPartNoise(): void {
    const input = this.renderRoot.querySelector('input.coefficients') as HTMLInputElement | null;
    this.partNoise = (input?.value ?? '').trim();
  }

  override render() {
    const n = this.noise;
    const stable = (this.catalogue?.patterns ?? []).filter((p) => p.stable !== false);
    return html`
      <h2>Noise of a locked pattern, at every time scale</h2>
      <div class="controls">
        <label
          >Pattern
          <select
            data-testid="noise-pattern"
            @change=${(e: Event) => {
              const value = (e.target as HTMLSelectElement).value;
              this.choice = value === 'live' ? 'live' : Number(value);
            }}
          >
            <option value="live" ?selected=${this.choice === 'live'}>the one the live run is in</option>
            ${stable.map(
              (p) =>
                html`<option value=${p.index} ?selected=${this.choice === p.index}>
                  ${p.index} · ${p.kind}${p.q !== undefined ? ` q=${p.q}` : ''} · mode ${p.mode}
                </option>`,
            )}
          </select>
        </label>
        <label
          >Deviation
          <select data-testid="noise-deviation" @change=${(e: Event) => (this.deviation = (e.target as HTMLSelectElement).value as Deviation)}>
            ${DEVIATIONS.map((d) => html`<option value=${d.id} ?selected=${this.deviation === d.id}>${d.label}</option>`)}
          </select>
        </label>
        <label title="power-law coefficients of each part's fractional-frequency noise, added to the model's own: h2 white PM, h0 white FM, h-1 flicker FM, h-2 random-walk FM"
          >Part noise
          <input
            class="coefficients"
            data-testid="noise-part"
            placeholder="e.g. h0=2e-22,h-1=1e-24"
            .value=${this.partNoise}
            @keydown=${(e: KeyboardEvent) => e.key === 'Enter' && this.applyPartNoise()}
          />
          <button @click=${() => this.applyPartNoise()}>Apply</button>
        </label>
        ${this.reader.busy ? html`<span class="muted">computing…</span>` : nothing}
      </div>
      ${this.error ? html`<p class="error" role="alert">${this.error}</p>` : nothing} ${n ? this.renderFacts(n) : nothing}
      ${n ? this.renderCharts(n) : html`<p class="muted">${this.active ? 'Analysing the live pattern…' : ''}</p>`}
    `;
  }

  private renderFacts(n: NoiseResponse) {
    const bandwidth = n.lockingBandwidthHz;
    return html`
      <p class="facts" data-testid="noise-facts">
        Pattern <b>${n.pattern.index}</b> (${n.pattern.kind}${n.pattern.q !== null ? `, q = ${n.pattern.q}` : ''}, mode ${n.pattern.mode}) at a
        carrier of <b>${formatHz(n.carrierHz)}</b>${n.carrierAssumed ? ' (assumed)' : ''}. The array output is
        <b>${formatNumber(n.arrayImprovementDb, 3)} dB</b> below one part alone at low offsets, each node
        <b>${formatNumber(n.nodeImprovementDb, 3)} dB</b>;
        ${
          bandwidth !== null
            ? html`the coupling takes hold below a locking bandwidth of <b>${formatHz(bandwidth)}</b>.`
            : html`the coupling does not make a node quieter than a part alone.`
        }
      </p>
      <p class="caution" data-testid="noise-caution">${n.caution}</p>
      ${n.warnings.length > 0 ? html`<ul class="warnings">${n.warnings.map((w) => html`<li>${w}</li>`)}</ul>` : nothing}
    `;
  }

  private renderCharts(n: NoiseResponse) {
    const deviation = DEVIATIONS.find((d) => d.id === this.deviation)!;
    const table = n[this.deviation];
    const curves = (array: number[], nodes: number[][], uncoupled: number[]): NoiseCurve[] => [
      ...nodes.map((values, k) => ({ label: `node ${k}`, values, colour: nodeColour(k), width: 1.5 })),
      { label: 'array output', values: array, colour: BRAND, width: 3.5 },
      { label: 'one part alone', values: uncoupled, colour: MUTED, width: 2.5, dashed: true },
    ];
    const bandwidth = n.lockingBandwidthHz;
    const spectrumMarks: NoiseMark[] =
      bandwidth !== null ? [{ x: bandwidth, label: `locking bandwidth ${formatHz(bandwidth)}`, colour: SOFT_INK }] : [];
    const deviationMarks: NoiseMark[] =
      bandwidth !== null ? [{ x: 1 / (2 * Math.PI * bandwidth), label: `1/(2π · locking bandwidth)`, colour: SOFT_INK }] : [];
    const beyondLabel = 'averaged model beyond its range';
    return html`
      <div class="charts">
        <div>
          <h3>Phase noise L(f), dBc/Hz</h3>
          <sr-noise-chart
            data-testid="noise-spectrum"
            label="phase noise against offset frequency"
            .x=${n.offsetsHz}
            .curves=${curves(n.phaseNoise.array, n.phaseNoise.nodes, n.phaseNoise.uncoupled)}
            .marks=${spectrumMarks}
            .beyond=${{ from: n.averagedModelLimitHz, to: Infinity, label: beyondLabel }}
            xTitle="offset from the carrier"
            yTitle="L(f) dBc/Hz"
            .xTick=${hertzTick}
            .yTick=${(v: number) => String(v)}
          ></sr-noise-chart>
        </div>
        <div>
          <h3>${deviation.label}</h3>
          <sr-noise-chart
            data-testid="noise-deviation-chart"
            label="${deviation.label} against averaging time"
            logY
            .x=${table.tau}
            .curves=${curves(table.array, table.nodes, table.uncoupled)}
            .marks=${deviationMarks}
            .beyond=${{ from: -Infinity, to: 1 / n.averagedModelLimitHz, label: beyondLabel }}
            xTitle="averaging time τ"
            yTitle=${deviation.axis}
            .xTick=${secondsTick}
            .yTick=${exponentTick}
          ></sr-noise-chart>
        </div>
      </div>
      <p class="note">
        Linear analysis of the guiding system at the locked state, the common phase kept: it holds while the pattern stays locked and
        the noise is small. Washed: where the averaged model is beyond its range (offsets above ${formatHz(n.averagedModelLimitHz)},
        averaging times below ${secondsTick(1 / n.averagedModelLimitHz)}); the resonator's own selectivity, which it leaves out, shapes
        real noise there. Deviations are measured in a bandwidth of ${formatHz(n.bandwidthHz)}.
      </p>
    `;
  }
}

/** A decade of frequency as a tick label: 1 mHz, 10 Hz, 1 MHz. */
function hertzTick(hz: number): string {
  if (hz < 1e-3) return `${Number((hz * 1e6).toPrecision(2))} µHz`;
  if (hz < 1) return `${Number((hz * 1e3).toPrecision(2))} mHz`;
  return formatHz(hz).replace(/\.0+ /, ' ');
}

/** A decade of time as a tick label: 100 ns, 1 ms, 1 s, 1e4 s. */
function secondsTick(s: number): string {
  if (s < 1e-6) return `${Number((s * 1e9).toPrecision(2))} ns`;
  if (s < 1e-3) return `${Number((s * 1e6).toPrecision(2))} µs`;
  if (s < 1) return `${Number((s * 1e3).toPrecision(2))} ms`;
  if (s < 1000) return `${Number(s.toPrecision(2))} s`;
  return `1e${Math.round(Math.log10(s))} s`;
}

/** A decade as 1e-9. */
function exponentTick(v: number): string {
  return `1e${Math.round(Math.log10(v))}`;
}

customElements.define('sr-noise-view', NoiseView);

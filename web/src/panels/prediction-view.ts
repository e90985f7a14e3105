import { LitElement, css, html, nothing, unsafeCSS, type PropertyValues } from 'lit';
import type { LivePrediction } from '../../../src/predict/live.js';
import type { FrameStore } from '../data/frame-store.js';
import { StoreController } from '../data/store-controller.js';
import { livePatternIndex, predictionKey, type CatalogueResponse } from '../data/prediction-data.js';
import { getJson } from '../data/api-client.js';
import { PollingController } from '../data/polling-controller.js';
import { formatNumber, runScalesOf, type RunScales } from '../data/engineering.js';
import { destinationText } from './pattern-text.js';
import { FAULT, LOCKED, MUTED, panelStyles } from '../theme.js';
import './catalogue-panel.js';
import './what-if-panel.js';

/** Wait this long after the live parameters change before asking for a new catalogue (drags of a slider, bursts of faults). */
const REFETCH_DELAY_MS = 400;

/**
 * The Prediction tab: the catalogue for the live parameters (fetched again whenever they
 * change, while the tab is shown), the live run's place in it, the live prediction after the
 * last change, and the what-if control with its branch diagram. Reads the live store only.
 */
export class PredictionView extends LitElement {
  static override properties = {
    store: { attribute: false },
    active: { type: Boolean },
    catalogue: { state: true },
    error: { state: true },
    selected: { state: true },
  };
  static override styles = [
    css`
      :host {
        display: grid;
        grid-template-columns: minmax(0, 52fr) minmax(0, 48fr);
        gap: 12px;
        padding: 12px;
        min-height: 0;
        box-sizing: border-box;
      }
      .column {
        display: flex;
        flex-direction: column;
        gap: 12px;
        min-height: 0;
        min-width: 0;
      }
      sr-catalogue-panel {
        flex: 1 1 auto;
      }
      sr-what-if-panel {
        flex: 1 1 auto;
      }
      @media (max-width: 1250px) {
        :host {
          grid-template-columns: 1fr;
        }
      }
    `,
  ];

  declare store: FrameStore | null;
  declare active: boolean;
  declare catalogue: CatalogueResponse | null;
  declare error: string;
  declare selected: number;

  private requestedKey = '';
  /** A newer set of parameters abandons the catalogue being computed for the older one. */
  private readonly reader = new PollingController(this, {
    read: (signal) => this.readCatalogue(signal),
    due: () => {
      const key = predictionKey(this.store?.session ?? null);
      return key !== '' && key !== this.requestedKey;
    },
    whileReading: 'supersede',
  });

  constructor() {
    super();
    this.store = null;
    this.active = false;
    this.catalogue = null;
    this.error = '';
    this.selected = -1;
    // Twice a second is enough for the live row and the prediction text; parameters are checked each time.
    new StoreController(
      this,
      () => this.store,
      () => {
        this.requestUpdate();
        this.scheduleFetch();
      },
      500,
    );
    this.addEventListener('sr-select-pattern', (e) => (this.selected = (e as CustomEvent<number>).detail));
  }

  protected override updated(changed: PropertyValues): void {
    if (changed.has('active')) this.scheduleFetch();
  }

  /** Ask for the catalogue when the tab is shown and the live parameters differ from the last request. */
  private scheduleFetch(): void {
    if (this.active) this.reader.readSoon(this.catalogue ? REFETCH_DELAY_MS : 0);
  }

  private async readCatalogue(signal: AbortSignal): Promise<void> {
    this.requestedKey = predictionKey(this.store?.session ?? null);
    try {
      const catalogue = await getJson<CatalogueResponse>('/api/catalogue', signal);
      if (signal.aborted) return;
      if (catalogue.computedFor.scenarioName !== this.catalogue?.computedFor.scenarioName) this.selected = -1;
      this.catalogue = catalogue;
      this.error = '';
    } catch (error) {
      if (signal.aborted) return;
      // Not asked again for the same parameters (the answer would be the same); a change retries.
      this.error = `The catalogue could not be computed: ${(error as Error).message}`;
    } finally {
      // The parameters may have moved on while this one was computed.
      this.scheduleFetch();
    }
  }

  override render() {
    const session = this.store?.session ?? null;
    const frame = this.store?.latest ?? null;
    const live = this.catalogue ? livePatternIndex(this.catalogue.patterns, frame) : null;
    const stale = this.catalogue !== null && predictionKey(session) !== this.requestedKey;
    const prediction = (frame as { prediction?: LivePrediction | null } | null)?.prediction ?? null;
    return html`
      <div class="column">
        <sr-catalogue-panel
          .catalogue=${this.catalogue}
          .session=${session}
          ?loading=${this.reader.busy}
          .error=${this.error}
          .live=${live}
          .selected=${this.selected}
          ?stale=${stale}
        ></sr-catalogue-panel>
        <sr-live-prediction .prediction=${prediction} .scales=${session ? runScalesOf(session) : null}></sr-live-prediction>
      </div>
      <div class="column">
        <sr-what-if-panel
          .session=${session}
          .catalogue=${this.catalogue}
          .livePattern=${live?.index ?? -1}
          .selected=${this.selected}
        ></sr-what-if-panel>
      </div>
    `;
  }
}

/** The live predictor's verdict after the last change, beside the catalogue it can be checked against. */
export class LivePredictionCard extends LitElement {
  static override properties = { prediction: { attribute: false }, scales: { attribute: false } };
  static override styles = [
    panelStyles,
    css`
      p {
        margin: 0;
        font-size: 16px;
        line-height: 1.45;
      }
      .persists {
        color: ${unsafeCSS(LOCKED)};
        font-weight: 800;
      }
      .lost {
        color: ${unsafeCSS(FAULT)};
        font-weight: 800;
      }
      .muted {
        color: ${unsafeCSS(MUTED)};
      }
    `,
  ];

  declare prediction: LivePrediction | null;
  declare scales: RunScales | null;

  constructor() {
    super();
    this.prediction = null;
    this.scales = null;
  }

  override render() {
    const p = this.prediction;
    if (!p)
      return html`<h2>Live prediction</h2>
        <p class="muted">No change yet: after each fault the guiding system predicts whether the live pattern persists.</p>`;
    const next = p.pattern;
    return html`
      <h2>Live prediction after the last change</h2>
      <p data-testid="live-prediction">
        <span class=${p.verdict === 'persists' ? 'persists' : p.verdict === 'lost' ? 'lost' : ''}>${p.verdict.toUpperCase()}</span>
        at τ = ${formatNumber(p.tau, 4)}: ${p.message}
        ${next ? html`<br /><span class="muted">${destinationText(next, this.scales)}</span>` : nothing}
      </p>
    `;
  }
}

customElements.define('sr-live-prediction', LivePredictionCard);
customElements.define('sr-prediction-view', PredictionView);

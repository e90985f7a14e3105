import { LitElement, css, html, nothing, unsafeCSS, type PropertyValues } from 'lit';
import type { SoakListing } from '../../../src/protocol/soak-files.js';
import { getJson, postJson } from '../data/api-client.js';
import { formatNumber, formatSeconds } from '../data/engineering.js';
import { FAULT, INSET_SURFACE, MUTED, OUTLINE, SOFT_BORDER, SURFACE, panelStyles } from '../theme.js';
import type { CampaignChoice, ScenarioChoice } from '../../../src/protocol/catalogue-lists.js';

/** Default length of a soak started here: past the fixed faults of the built-in campaign (the last re-lock window closes by 245). */
const DEFAULT_UNTIL_SLOW = 300;

/** NAME-MMDD-HHMM, with -2, -3 ... until no soak has it. */
export function uniqueSoakName(base: string, taken: ReadonlySet<string>, now = new Date()): string {
  const two = (n: number) => String(n).padStart(2, '0');
  const stem = `${base}-${two(now.getMonth() + 1)}${two(now.getDate())}-${two(now.getHours())}${two(now.getMinutes())}`;
  let name = stem;
  for (let k = 2; taken.has(name); k++) name = `${stem}-${k}`;
  return name;
}

/**
 * Slow time units per wall second of earlier soaks of the scenario, newest first: a soak started
 * here and never resumed (its wall clock counts from its start), or a finished one whose summary
 * names the scenario's title.
 */
export function measuredRate(soaks: readonly SoakListing[], scenario: ScenarioChoice): { rate: number; from: string } | null {
  for (const s of soaks) {
    const p = s.progress;
    if (!p || !(p.wallSeconds > 2) || !(p.slowTime > 0)) continue;
    const same = s.launch ? s.launch.scenario === scenario.name && s.launch.runs === 1 : s.scenario === scenario.title;
    if (same) return { rate: p.slowTime / p.wallSeconds, from: s.name };
  }
  return null;
}

/**
 * The operator's form for a new soak in the Soaks tab: name, built-in scenario and campaign,
 * length in slow time units (with the wall time it should take at the rate earlier soaks ran)
 * and an optional pace. POST /api/soaks; the server's refusal is shown beside the form.
 * Fires `sr-soak-started` (detail: the name) once the server has started it.
 */
export class SoakStartForm extends LitElement {
  static override properties = {
    token: { type: String },
    soaks: { attribute: false },
    scenarios: { state: true },
    campaigns: { state: true },
    name: { state: true },
    scenario: { state: true },
    campaign: { state: true },
    until: { state: true },
    pace: { state: true },
    error: { state: true },
    busy: { state: true },
  };
  static override styles = [
    panelStyles,
    css`
      :host {
        background: ${unsafeCSS(INSET_SURFACE)};
        border-color: ${unsafeCSS(SOFT_BORDER)};
        margin: 4px 0 12px;
      }
      form {
        display: grid;
        grid-template-columns: auto minmax(0, 1fr);
        gap: 6px 10px;
        align-items: center;
      }
      label {
        font-size: 14px;
        color: ${unsafeCSS(MUTED)};
        font-weight: 600;
      }
      input[type='text'],
      select {
        width: 100%;
        box-sizing: border-box;
        padding: 3px 5px;
        border: 1px solid ${unsafeCSS(OUTLINE)};
        border-radius: 4px;
        background: ${unsafeCSS(SURFACE)};
      }
      .with-unit {
        display: flex;
        gap: 6px;
        align-items: center;
        font-size: 13px;
        color: ${unsafeCSS(MUTED)};
      }
      .hint {
        grid-column: 2;
        font-size: 13px;
        color: ${unsafeCSS(MUTED)};
        margin-top: -3px;
      }
      .actions {
        grid-column: 1 / span 2;
        display: flex;
        gap: 10px;
        align-items: flex-start;
        margin-top: 2px;
      }
      button.primary {
        font-weight: 700;
        padding: 5px 16px;
      }
      .error {
        color: ${unsafeCSS(FAULT)};
        font-size: 14px;
        font-weight: 600;
      }
    `,
  ];

  declare token: string;
  declare soaks: SoakListing[];
  declare scenarios: ScenarioChoice[];
  declare campaigns: CampaignChoice[];
  declare name: string;
  declare scenario: string;
  declare campaign: string;
  declare until: string;
  declare pace: string;
  declare error: string;
  declare busy: boolean;

  /** The name was typed by the operator: keep it instead of the generated one. */
  private nameTyped = false;

  constructor() {
    super();
    this.token = '';
    this.soaks = [];
    this.scenarios = [];
    this.campaigns = [];
    this.name = '';
    this.scenario = '';
    this.campaign = '';
    this.until = String(DEFAULT_UNTIL_SLOW);
    this.pace = '';
    this.error = '';
    this.busy = false;
  }

  override connectedCallback(): void {
    super.connectedCallback();
    void this.load();
  }

  private async load(): Promise<void> {
    try {
      const [scenarios, campaigns] = await Promise.all([
        getJson<ScenarioChoice[]>('/api/scenarios'),
        getJson<CampaignChoice[]>('/api/campaigns'),
      ]);
      this.scenarios = scenarios;
      this.campaigns = campaigns;
      this.campaign ||= campaigns[0]?.name ?? '';
      this.scenario ||= campaigns[0]?.scenarios[0] ?? scenarios[0]?.name ?? '';
    } catch (error) {
      this.error = `Could not read the scenarios and campaigns: ${(error as Error).message}`;
    }
  }

  protected override willUpdate(changed: PropertyValues): void {
    if (!this.nameTyped && (changed.has('soaks') || changed.has('scenario') || this.name === '') && this.scenario) {
      this.name = uniqueSoakName(this.scenario, new Set(this.soaks.map((s) => s.name)));
    }
  }

  private fits(scenario: string): boolean {
    const campaign = this.campaigns.find((c) => c.name === this.campaign);
    return !campaign || campaign.scenarios.includes(scenario);
  }

  private chooseCampaign(name: string): void {
    this.campaign = name;
    if (!this.fits(this.scenario)) this.scenario = this.campaigns.find((c) => c.name === name)?.scenarios[0] ?? this.scenario;
  }

  /** What the length means in wall time: the measured rate, capped by the pace. */
  private wallHint(): string {
    const until = Number(this.until);
    if (!(until > 0)) return 'slow time units (εt): how far the soak runs';
    const pace = this.pace.trim() === '' ? null : Number(this.pace);
    const choice = this.scenarios.find((s) => s.name === this.scenario);
    const measured = choice ? measuredRate(this.soaks, choice) : null;
    if (measured) {
      const rate = pace && pace > 0 ? Math.min(pace, measured.rate) : measured.rate;
      const limit = pace && pace < measured.rate ? 'the pace' : `measured on ${measured.from}`;
      return `≈ ${formatSeconds(until / rate)} of wall time at ${formatNumber(rate, 2)} slow units/s (${limit})`;
    }
    if (pace && pace > 0)
      return `at least ${formatSeconds(until / pace)} of wall time at the pace; no earlier soak of this scenario to measure the rate on`;
    return 'no earlier soak of this scenario yet to tell the wall time from';
  }

  private async start(event: Event): Promise<void> {
    event.preventDefault();
    this.busy = true;
    this.error = '';
    const body: Record<string, unknown> = {
      name: this.name.trim(),
      scenario: this.scenario,
      campaign: this.campaign,
      until: this.until.trim() === '' ? null : Number(this.until),
    };
    if (this.pace.trim() !== '') body.pace = Number(this.pace);
    try {
      await postJson('/api/soaks', this.token, body);
      this.nameTyped = false;
      this.dispatchEvent(new CustomEvent<string>('sr-soak-started', { detail: String(body.name), bubbles: true, composed: true }));
      this.name = uniqueSoakName(this.scenario, new Set([...this.soaks.map((s) => s.name), String(body.name)]));
    } catch (error) {
      this.error = (error as Error).message;
    } finally {
      this.busy = false;
    }
  }

  override render() {
    const title = this.campaigns.find((c) => c.name === this.campaign)?.description;
    return html`
      <h2>Start a soak</h2>
      <form novalidate data-testid="soak-start-form" @submit=${(e: Event) => void this.start(e)}>
        <label for="name">name</label>
        <input
          id="name"
          type="text"
          data-testid="soak-start-name"
          spellcheck="false"
          .value=${this.name}
          @input=${(e: Event) => {
            this.name = (e.target as HTMLInputElement).value;
            this.nameTyped = true;
          }}
        />
        <label for="campaign">campaign</label>
        <select
          id="campaign"
          data-testid="soak-start-campaign"
          title=${title ?? ''}
          @change=${(e: Event) => this.chooseCampaign((e.target as HTMLSelectElement).value)}
        >
          ${this.campaigns.map((c) => html`<option value=${c.name} ?selected=${c.name === this.campaign}>${c.title}</option>`)}
        </select>
        <label for="scenario">scenario</label>
        <select
          id="scenario"
          data-testid="soak-start-scenario"
          @change=${(e: Event) => (this.scenario = (e.target as HTMLSelectElement).value)}
        >
          ${this.scenarios.map(
            (s) =>
              html`<option value=${s.name} ?selected=${s.name === this.scenario} ?disabled=${!this.fits(s.name)}>
                ${s.title}${this.fits(s.name) ? '' : ' (the campaign does not fit)'}
              </option>`,
          )}
        </select>
        <label for="until">length</label>
        <span class="with-unit"
          ><input
            id="until"
            type="number"
            min="0"
            step="any"
            data-testid="soak-start-until"
            .value=${this.until}
            @input=${(e: Event) => (this.until = (e.target as HTMLInputElement).value)}
          />
          slow time units</span
        >
        <span class="hint" data-testid="soak-start-hint">${this.wallHint()}</span>
        <label for="pace">pace</label>
        <span class="with-unit"
          ><input
            id="pace"
            type="number"
            min="0"
            step="any"
            placeholder="max"
            data-testid="soak-start-pace"
            .value=${this.pace}
            @input=${(e: Event) => (this.pace = (e.target as HTMLInputElement).value)}
          />
          slow units per second (empty: as fast as it goes)</span
        >
        <div class="actions">
          <button
            class="primary"
            type="submit"
            data-action="start-soak"
            ?disabled=${this.busy || !this.name.trim() || !this.scenario || !this.campaign}
          >
            ${this.busy ? 'Starting…' : 'Start'}
          </button>
          ${this.error ? html`<span class="error" data-testid="soak-start-error" role="alert">${this.error}</span>` : nothing}
        </div>
      </form>
    `;
  }
}

customElements.define('sr-soak-start-form', SoakStartForm);

import { LitElement, css, html, nothing, unsafeCSS } from 'lit';
import type { Role, SessionInfo } from '../../../src/protocol/messages.js';
import type { ConnectionState } from '../data/connection.js';
import type { FrameStore } from '../data/frame-store.js';
import { StoreController } from '../data/store-controller.js';
import { formatHz, formatNumber, formatSimulatedSeconds, runScalesOf } from '../data/engineering.js';
import {
  BRAND,
  CAUTION,
  FAULT,
  HEADER_BADGE,
  HEADER_HOVER,
  HEADER_OUTLINE,
  INK,
  LOCKED,
  LOGO_NODES,
  LOGO_RING,
  ON_SOLID,
  UNWANTED,
  stripStyles,
} from '../theme.js';
import { ASSUMED_FREQUENCY_NOTE } from '../../../src/scenario/units.js';

/**
 * The top bar: what run this is, who I am in it (operator, viewer, replay), whether the live
 * link is up, how many people watch, the run clock, and the log links (save / open for replay).
 */
export class StatusHeader extends LitElement {
  static override properties = {
    store: { attribute: false },
    role: { type: String },
    replaying: { type: Boolean },
    connection: { attribute: false },
    viewers: { type: Number },
  };
  static override styles = [
    stripStyles,
    css`
      :host {
        background: ${unsafeCSS(INK)};
      }
      .bar {
        gap: 18px;
        flex-wrap: wrap;
      }
      .brand {
        display: flex;
        align-items: center;
        gap: 8px;
        font-size: 24px;
        font-weight: 800;
        letter-spacing: 0.02em;
      }
      .scenario {
        font-size: 17px;
        font-weight: 600;
      }
      .scenario small {
        display: block;
        font-size: 13px;
        font-weight: 400;
        opacity: 0.75;
      }
      .badge {
        font-size: 13px;
        font-weight: 800;
        letter-spacing: 0.1em;
        padding: 3px 10px;
        border-radius: 4px;
        background: ${unsafeCSS(HEADER_BADGE)};
      }
      .clock {
        font-variant-numeric: tabular-nums;
        font-size: 16px;
        display: flex;
        gap: 14px;
      }
      .clock b {
        font-weight: 700;
      }
      .clock span {
        opacity: 0.95;
      }
      .spacer {
        flex: 1;
      }
      .pill {
        display: inline-flex;
        align-items: center;
        gap: 6px;
        font-size: 15px;
      }
      .dot {
        width: 11px;
        height: 11px;
        border-radius: 50%;
        display: inline-block;
      }
      a,
      label.open {
        color: ${unsafeCSS(ON_SOLID)};
        font-size: 14px;
        border: 1px solid ${unsafeCSS(HEADER_OUTLINE)};
        border-radius: 6px;
        padding: 4px 10px;
        text-decoration: none;
        cursor: pointer;
      }
      a:hover,
      label.open:hover {
        background: ${unsafeCSS(HEADER_HOVER)};
      }
      input[type='file'] {
        display: none;
      }
    `,
  ];

  declare store: FrameStore | null;
  declare role: Role | null;
  declare replaying: boolean;
  declare connection: ConnectionState | null;
  declare viewers: number;

  constructor() {
    super();
    this.store = null;
    this.role = null;
    this.replaying = false;
    this.connection = null;
    this.viewers = 0;
    new StoreController(
      this,
      () => this.store,
      () => this.requestUpdate(),
      100,
    );
  }

  private onFile(event: Event): void {
    const input = event.target as HTMLInputElement;
    const file = input.files?.[0];
    input.value = '';
    if (file) this.dispatchEvent(new CustomEvent<File>('sr-open-log', { detail: file, bubbles: true, composed: true }));
  }

  override render() {
    const s = this.store?.session;
    const f = this.store?.latest;
    const live = this.connection?.phase === 'open';
    const badge = this.replaying
      ? html`<span class="badge" style="background:${UNWANTED}" data-testid="role">REPLAY · READ-ONLY</span>`
      : this.role === 'operator'
        ? html`<span class="badge" style="background:${BRAND}" data-testid="role">OPERATOR</span>`
        : this.role === 'viewer'
          ? html`<span class="badge" data-testid="role">VIEWER</span>`
          : nothing;
    const status = f?.status === 'halted' ? 'halted' : (s?.status ?? '');
    const statusColour = status === 'running' ? LOCKED : status === 'halted' ? FAULT : CAUTION;
    const saveLog = this.replaying
      ? nothing
      : html`<a
          href="./api/log"
          download="syncring-session.ndjson"
          data-testid="save-log"
          title="download the live run's session log (NDJSON)"
          >⤓ Save log</a
        >`;
    return html`<div class="bar">
      <div class="brand">
        <svg width="30" height="30" viewBox="0 0 32 32" aria-hidden="true">
          <circle cx="16" cy="16" r="11" fill="none" stroke=${LOGO_RING} stroke-width="3.5"></circle>
          <circle cx="16" cy="5" r="4" fill=${LOGO_NODES[0]}></circle>
          <circle cx="25.5" cy="21.5" r="4" fill=${LOGO_NODES[1]}></circle>
          <circle cx="6.5" cy="21.5" r="4" fill=${LOGO_NODES[2]}></circle>
        </svg>
        syncring
      </div>
      ${
        s
          ? html`<div class="scenario" data-testid="scenario">
              ${s.scenarioName}
              <small title=${s.nominalFrequencyAssumed ? ASSUMED_FREQUENCY_NOTE : ''}>${scenarioFacts(s)}</small>
            </div>`
          : nothing
      }
      ${badge}
      ${status && !this.replaying ? html`<span class="pill" data-testid="run-status"><span class="dot" style="background:${statusColour}"></span>${status}</span>` : nothing}
      <div class="clock">
        ${
          f
            ? html`<span>τ <b data-testid="tau">${formatNumber(f.tau, 6)}</b></span>
                <span>ε·τ <b>${formatNumber(f.slowTime, 4)}</b></span>
                <span data-testid="clock-seconds">t <b>${s ? formatSimulatedSeconds(f.seconds, runScalesOf(s)) : '—'}</b></span>
                <span>${this.replaying ? 'sample' : 'frame'} <b data-testid="frame-count">${this.store?.frameCount ?? 0}</b></span>`
            : nothing
        }
      </div>
      <div class="spacer"></div>
      ${
        this.replaying
          ? nothing
          : html`<span class="pill" title="connection to the live run"
                ><span class="dot" style="background:${live ? LOCKED : FAULT}"></span
                ><span data-testid="connection">${live ? 'live' : 'offline'}</span></span
              >
              <span class="pill" title="browsers connected to this run" data-testid="viewers">
                <svg width="20" height="14" viewBox="0 0 20 14" aria-hidden="true">
                  <path d="M1 7 Q10 -3 19 7 Q10 17 1 7 Z" fill="none" stroke=${ON_SOLID} stroke-width="1.8"></path>
                  <circle cx="10" cy="7" r="3" fill=${ON_SOLID}></circle>
                </svg>
                ${this.viewers} watching
              </span>`
      }
      ${saveLog}
      <label class="open" data-testid="open-log"
        >⤒ Open log…<input type="file" accept=".ndjson,.jsonl,.log,.json,application/x-ndjson,text/plain" @change=${this.onFile}
      /></label>
    </div>`;
  }
}

/**
 * The scenario's size and frequency basis, one string: text written across lines of the template
 * would read with a line break inside it.
 */
function scenarioFacts(s: SessionInfo): string {
  const frequency = `f₀ = ${formatHz(s.nominalFrequencyHz)}${s.nominalFrequencyAssumed ? ' assumed (not in the scenario)' : ''}`;
  return `${s.nodes} nodes · ${s.modes} mode${s.modes > 1 ? 's' : ''} · ε = ${formatNumber(s.epsilon)} · ${frequency}`;
}

customElements.define('sr-status-header', StatusHeader);

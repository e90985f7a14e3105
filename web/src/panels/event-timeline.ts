import { LitElement, css, unsafeCSS, html } from 'lit';
import type { SessionEvent, SessionEventKind } from '../../../src/session/session.js';
import type { FrameStore } from '../data/frame-store.js';
import { StoreController } from '../data/store-controller.js';
import { formatNumber, formatSeconds, runScalesOf } from '../data/engineering.js';
import { secondsHeading } from './seconds-heading.js';
import { tauToSeconds } from '../../../src/scenario/units.js';
import { CAUTION, FAINT_RULE, FAULT, LOCKED, MUTED, BRAND, ON_SOLID, SURFACE, UNWANTED, columnStyles, panelStyles } from '../theme.js';

const KIND_COLOUR: Record<SessionEventKind, string> = {
  perturbation: BRAND,
  lock: LOCKED,
  unlock: CAUTION,
  'pattern-change': UNWANTED,
  'blow-up': FAULT,
  'guide-failure': FAULT,
  warning: CAUTION,
  control: MUTED,
};

/** The session's events, newest first: when (tau and seconds), who, what. */
export class EventTimeline extends LitElement {
  static override properties = { store: { attribute: false } };
  static override styles = [
    panelStyles,
    columnStyles,
    css`
      .scroll {
        flex: 1 1 0;
        min-height: 120px;
        overflow-y: auto;
      }
      table {
        width: 100%;
        border-collapse: collapse;
        font-size: 14px;
      }
      th {
        text-align: left;
        font-size: 12px;
        color: ${unsafeCSS(MUTED)};
        font-weight: 600;
        position: sticky;
        top: 0;
        background: ${unsafeCSS(SURFACE)};
        padding: 2px 6px 4px 0;
      }
      td {
        padding: 3px 6px 3px 0;
        vertical-align: top;
        border-top: 1px solid ${unsafeCSS(FAINT_RULE)};
      }
      td.num {
        white-space: nowrap;
        text-align: right;
      }
      .kind {
        display: inline-block;
        font-size: 11px;
        font-weight: 700;
        text-transform: uppercase;
        color: ${unsafeCSS(ON_SOLID)};
        border-radius: 4px;
        padding: 0 5px;
        margin-right: 4px;
      }
      .who {
        color: ${unsafeCSS(MUTED)};
        white-space: nowrap;
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
      (change) => (change.events || change.reset || change.session) && this.requestUpdate(),
    );
  }

  override render() {
    const events = this.store?.events ?? [];
    const session = this.store?.session;
    const scales = session ? runScalesOf(session) : null;
    const seconds = (e: SessionEvent) => (scales ? formatSeconds(tauToSeconds(e.tau, scales.nominalFrequencyHz, scales.omega0)) : '—');
    return html`
      <h2>Timeline · ${events.length} event${events.length === 1 ? '' : 's'}</h2>
      <div class="scroll">
        <table data-testid="timeline">
          <thead>
            <tr>
              <th>τ</th>
              <th data-testid="timeline-seconds">${secondsHeading('time', scales?.nominalFrequencyAssumed === true)}</th>
              <th>who</th>
              <th>what</th>
            </tr>
          </thead>
          <tbody>
            ${[...events].reverse().map(
              (e) =>
                html`<tr data-kind=${e.kind}>
                  <td class="num">${formatNumber(e.tau, 4)}</td>
                  <td class="num">${seconds(e)}</td>
                  <td class="who">${e.by}</td>
                  <td><span class="kind" style="background:${KIND_COLOUR[e.kind] ?? MUTED}">${e.kind}</span>${e.message}</td>
                </tr>`,
            )}
          </tbody>
        </table>
        ${events.length === 0 ? html`<p class="muted">Nothing has happened yet.</p>` : ''}
      </div>
    `;
  }
}

customElements.define('sr-event-timeline', EventTimeline);

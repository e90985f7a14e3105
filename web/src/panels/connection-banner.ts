import { LitElement, css, html, nothing, unsafeCSS } from 'lit';
import type { ConnectionState } from '../data/connection.js';
import { CAUTION, FAULT, ON_SOLID, stripButtonStyles } from '../theme.js';

/** A loud strip across the top while the live connection is down, with the retry countdown. */
export class ConnectionBanner extends LitElement {
  static override properties = { state: { attribute: false }, now: { state: true } };
  static override styles = [
    stripButtonStyles,
    css`
      .banner {
        display: flex;
        align-items: center;
        gap: 14px;
        background: ${unsafeCSS(FAULT)};
        color: ${unsafeCSS(ON_SOLID)};
        font-size: 17px;
        font-weight: 600;
        padding: 8px 18px;
      }
      .banner.connecting {
        background: ${unsafeCSS(CAUTION)};
      }
      button {
        color: ${unsafeCSS(FAULT)};
        padding: 3px 10px;
      }
      .why {
        font-weight: 400;
        opacity: 0.9;
        font-size: 14px;
      }
    `,
  ];

  declare state: ConnectionState | null;
  declare now: number;
  private ticker: ReturnType<typeof setInterval> | null = null;

  constructor() {
    super();
    this.state = null;
    this.now = Date.now();
  }

  override connectedCallback(): void {
    super.connectedCallback();
    this.ticker = setInterval(() => (this.now = Date.now()), 500);
  }

  override disconnectedCallback(): void {
    super.disconnectedCallback();
    if (this.ticker !== null) clearInterval(this.ticker);
    this.ticker = null;
  }

  override render() {
    const s = this.state;
    if (!s || s.phase === 'open' || s.phase === 'stopped') return nothing;
    if (s.phase === 'connecting') {
      return html`<div class="banner connecting" role="status" data-testid="banner">
        Connecting to the simulation server…${s.attempt ? html` <span class="why">(attempt ${s.attempt + 1})</span>` : ''}
      </div>`;
    }
    const seconds = s.retryAt ? Math.max(0, Math.ceil((s.retryAt - this.now) / 1000)) : 0;
    return html`<div class="banner" role="alert" data-testid="banner">
      Disconnected from the live run — reconnecting in ${seconds} s (attempt ${s.attempt})
      <button @click=${() => this.dispatchEvent(new CustomEvent('sr-retry', { bubbles: true, composed: true }))}>Retry now</button>
      ${s.lastClose ? html`<span class="why">${s.lastClose}</span>` : ''}
    </div>`;
  }
}

customElements.define('sr-connection-banner', ConnectionBanner);

import { LitElement, css, unsafeCSS, html } from 'lit';
import { FAULT, INK, ON_SOLID, TOAST_SHADOW } from '../theme.js';

interface Toast {
  id: number;
  kind: 'info' | 'error';
  text: string;
}

/** Short-lived messages in the lower right corner: refused commands, notes on clicks. */
export class ToastStack extends LitElement {
  static override properties = { toasts: { state: true } };
  static override styles = css`
    :host {
      position: fixed;
      right: 18px;
      bottom: 18px;
      z-index: 50;
      display: flex;
      flex-direction: column;
      gap: 8px;
      max-width: 460px;
    }
    .toast {
      display: flex;
      gap: 10px;
      align-items: flex-start;
      background: ${unsafeCSS(INK)};
      color: ${unsafeCSS(ON_SOLID)};
      padding: 10px 14px;
      border-radius: 8px;
      box-shadow: 0 6px 20px ${unsafeCSS(TOAST_SHADOW)};
      font-size: 15px;
      line-height: 1.35;
    }
    .toast.error {
      background: ${unsafeCSS(FAULT)};
    }
    button {
      background: transparent;
      border: 0;
      color: inherit;
      font-size: 18px;
      cursor: pointer;
      line-height: 1;
    }
    .text {
      flex: 1;
    }
  `;

  declare toasts: Toast[];
  private nextId = 1;

  constructor() {
    super();
    this.toasts = [];
  }

  show(kind: Toast['kind'], text: string, ttlMs = kind === 'error' ? 9000 : 4500): void {
    const toast = { id: this.nextId++, kind, text };
    this.toasts = [...this.toasts.slice(-4), toast];
    setTimeout(() => this.dismiss(toast.id), ttlMs);
  }

  private dismiss(id: number): void {
    this.toasts = this.toasts.filter((t) => t.id !== id);
  }

  override render() {
    return this.toasts.map(
      (t) =>
        html`<div class="toast ${t.kind}" role=${t.kind === 'error' ? 'alert' : 'status'} data-testid="toast-${t.kind}">
          <span class="text">${t.text}</span><button aria-label="dismiss" @click=${() => this.dismiss(t.id)}>×</button>
        </div>`,
    );
  }
}

customElements.define('sr-toast-stack', ToastStack);

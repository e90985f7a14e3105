import { html, type TemplateResult } from 'lit';

/**
 * A panel heading written as words and symbols. Headings are set in upper case (panelStyles),
 * which would turn φ into Φ and |a| into |A|, a different quantity: symbols are kept apart so
 * that they keep the case they are written in.
 */
export type HeadingPart = string | { symbol: string };

export function symbol(text: string): HeadingPart {
  return { symbol: text };
}

/** The heading as plain text (for aria-label and tests), symbols as written. */
export function headingText(parts: readonly HeadingPart[]): string {
  return parts.map((p) => (typeof p === 'string' ? p : p.symbol)).join('');
}

/** The heading's content, symbols in a span that panelStyles exempts from the upper case. */
export function headingMarkup(parts: readonly HeadingPart[]): TemplateResult {
  // one wrapper, so a flex heading lays the words and symbols out as one line of text
  return html`<span>${parts.map((p) => (typeof p === 'string' ? p : html`<span class="symbol">${p.symbol}</span>`))}</span>`;
}

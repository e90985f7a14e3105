import { css, unsafeCSS } from 'lit';

/**
 * Colours and shared panel styles. Chosen for a projector: light ground, dark ink, saturated
 * node colours that stay apart when washed out, and red reserved for faults only.
 */
export const INK = '#15202b';
export const MUTED = '#5b6875';
export const GRID = '#d5dbe1';
export const FAULT = '#c62828';
export const LOCKED = '#0b7a55';
export const CAUTION = '#b86e00';
export const UNWANTED = '#7b2fbf';
export const BRAND = '#0b6e69';

const NODE_COLOURS = ['#2457c5', '#e06c00', '#13896f', '#b2308a', '#8a6d00', '#6b46d6', '#0a8db5', '#5b7f1a', '#a0522d', '#d1407a', '#33658a', '#4f4f4f'];

/** Colour of node k (also of the phase difference k -> k+1 and of node k's amplitude lines). */
export function nodeColour(k: number): string {
  return NODE_COLOURS[k % NODE_COLOURS.length];
}

/** The base look of every panel element. */
export const panelStyles = css`
  :host {
    display: block;
    box-sizing: border-box;
    background: #ffffff;
    border: 1px solid ${unsafeCSS(GRID)};
    border-radius: 10px;
    padding: 10px 14px 12px;
    color: ${unsafeCSS(INK)};
    font-size: 15px;
    min-width: 0;
  }
  h2 {
    margin: 0 0 6px;
    font-size: 13px;
    font-weight: 700;
    letter-spacing: 0.08em;
    text-transform: uppercase;
    color: ${unsafeCSS(MUTED)};
    display: flex;
    align-items: center;
    gap: 8px;
  }
  /* symbols in a heading keep their case: phi is not Phi, |a| is not |A| (heading-text.ts) */
  h2 .symbol {
    text-transform: none;
    letter-spacing: 0.02em;
  }
  .num {
    font-variant-numeric: tabular-nums;
  }
  /* the second line of a seconds heading (seconds-heading.ts) */
  .assumed-frequency {
    font-weight: 400;
    font-size: 11px;
    color: ${unsafeCSS(MUTED)};
  }
  .muted {
    color: ${unsafeCSS(MUTED)};
  }
  button,
  select,
  input {
    font: inherit;
    font-size: 14px;
  }
  button {
    border: 1px solid #9aa7b3;
    background: #f3f6f8;
    color: ${unsafeCSS(INK)};
    border-radius: 6px;
    padding: 4px 10px;
    cursor: pointer;
  }
  button:hover:not(:disabled) {
    background: #e2eaf0;
  }
  button.primary {
    background: ${unsafeCSS(BRAND)};
    border-color: ${unsafeCSS(BRAND)};
    color: #fff;
  }
  button:disabled,
  input:disabled,
  select:disabled {
    cursor: not-allowed;
    opacity: 0.5;
  }
  input[type='number'] {
    width: 7em;
    padding: 2px 4px;
    border: 1px solid #9aa7b3;
    border-radius: 4px;
  }
`;

import { svg } from 'lit';

/** A padlock, drawn inline (emoji fonts are missing on many kiosk and projector machines). */
export const lockIcon = svg`<svg width="14" height="16" viewBox="0 0 14 16" aria-hidden="true" style="vertical-align:-2px">
  <rect x="1" y="7" width="12" height="8.5" rx="1.5" fill="currentColor"></rect>
  <path d="M3.5 7 V4.8 a3.5 3.5 0 0 1 7 0 V7" fill="none" stroke="currentColor" stroke-width="2"></path>
</svg>`;

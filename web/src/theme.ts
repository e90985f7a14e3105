import { css, unsafeCSS } from 'lit';

/**
 * Colours and shared panel styles. Chosen for a projector: light ground, dark ink, saturated
 * node colours that stay apart when washed out, and red reserved for faults only.
 * Every colour the dashboard draws comes from here, named by what it is for.
 */
export const INK = '#15202b';
export const MUTED = '#5b6875';
export const GRID = '#d5dbe1';
export const FAULT = '#c62828';
export const LOCKED = '#0b7a55';
export const CAUTION = '#b86e00';
export const UNWANTED = '#7b2fbf';
export const BRAND = '#0b6e69';

/** The ground of panels, tables and charts; also hollow marks and the halos drawn around text on it. */
export const SURFACE = '#ffffff';
/** Ink and marks on a saturated ground: badges, the top bar, the banners, toasts, the replay strip. */
export const ON_SOLID = '#ffffff';
/** The page behind the panels. */
export const PAGE = '#e9edf1';
/** Running text under a heading: facts, legends, progress lines. */
export const SOFT_INK = '#33404d';
/** The caution line in the page footer. */
export const FOOTER_INK = '#3a4754';
/** Outlines of buttons and inputs, and the charts' axis lines. */
export const OUTLINE = '#9aa7b3';
export const CONTROL_FACE = '#f3f6f8';
export const CONTROL_HOVER = '#e2eaf0';
export const BRAND_HOVER = '#095a56';
/** The rule between sections of a panel. */
export const DIVIDER = '#e3e8ec';
/** The part of a progress bar not yet done. */
export const PROGRESS_TRACK = '#e3e8ec';
/** The rule under each table row. */
export const ROW_RULE = '#e6eaee';
/** The lighter rule between the many rows of the event timeline. */
export const FAINT_RULE = '#eef1f4';
/** A box set into a panel (a soak in the list, the start form) and its border, also the chips' border. */
export const INSET_SURFACE = '#f7f9fb';
export const SOFT_BORDER = '#d3dce3';
/** Chips (symmetry elements) and inline code. */
export const CHIP = '#eef3f6';
export const ROW_HOVER = '#f4f7f9';
/** The catalogue row a what-if continues. */
export const SELECTED_ROW = '#eef5f4';
/** The soak chosen in the list. */
export const CHOSEN_ITEM = '#eef6f5';
/** The catalogue row the live run is in. */
export const LIVE_ROW = '#e4f3ec';
/** A catalogue row on an unwanted mode (a design defect). */
export const DEFECT_ROW = '#f6f0fb';
/** The outline of the view tabs. */
export const TAB_BORDER = '#cfd7de';
/** The note that says why the controls are read-only. */
export const NOTICE_GROUND = '#fff4e0';
export const NOTICE_BORDER = '#f0c47a';
export const NOTICE_INK = '#7a4a00';
/** Links of the ring that carry a signal, and the rim of each node's disc. */
export const LINK_LINE = '#41505e';
export const NODE_RIM = '#8794a1';
/** The dark top bar: the viewer badge, the outlined links and their hover. */
export const HEADER_BADGE = '#3c4a57';
export const HEADER_OUTLINE = '#6b7a88';
export const HEADER_HOVER = '#2b3946';
/** The logo: a ring with three nodes. */
export const LOGO_RING = '#4fd1c5';
export const LOGO_NODES = ['#ff9d3d', '#7cb7ff', '#b2f28c'] as const;
/** Ticks on the replay scrubber where something was changed. */
export const REPLAY_TICK = '#ffd166';

/** A colour of this module as rgba() with the given opacity, for washes over a chart or a ground. */
export function translucent(hex: string, alpha: number): string {
  const n = Number.parseInt(hex.slice(1), 16);
  return `rgba(${(n >> 16) & 255}, ${(n >> 8) & 255}, ${n & 255}, ${alpha})`;
}

/** The band under the lock chart while the full system is locked. */
export const LOCKED_BAND = translucent(LOCKED, 0.18);
/** The interval of a branch diagram where the pattern holds, and its label. */
export const HOLDS_BAND = translucent(LOCKED, 0.1);
export const HOLDS_LABEL = translucent(LOCKED, 0.85);
/** The ground behind a marker's label on a chart, so the curves under it do not hide it. */
export const LABEL_GROUND = translucent(SURFACE, 0.92);
/** The dashed lines on the live charts where something was changed. */
export const EVENT_MARKER = translucent(FAULT, 0.55);
/** The log-problems note on the replay strip. */
export const REPLAY_NOTE_GROUND = translucent(ON_SOLID, 0.2);
/** Shadows under what floats over the page: the detuning editor and the toasts. */
export const POPOVER_SHADOW = translucent(INK, 0.25);
export const TOAST_SHADOW = 'rgba(0, 0, 0, 0.3)';

const NODE_COLOURS = [
  '#2457c5',
  '#e06c00',
  '#13896f',
  '#b2308a',
  '#8a6d00',
  '#6b46d6',
  '#0a8db5',
  '#5b7f1a',
  '#a0522d',
  '#d1407a',
  '#33658a',
  '#4f4f4f',
];

/** Colour of node k (also of the phase difference k -> k+1 and of node k's amplitude lines). */
export function nodeColour(k: number): string {
  return NODE_COLOURS[k % NODE_COLOURS.length];
}

/** The base look of every panel element. */
export const panelStyles = css`
  :host {
    display: block;
    box-sizing: border-box;
    background: ${unsafeCSS(SURFACE)};
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
    border: 1px solid ${unsafeCSS(OUTLINE)};
    background: ${unsafeCSS(CONTROL_FACE)};
    color: ${unsafeCSS(INK)};
    border-radius: 6px;
    padding: 4px 10px;
    cursor: pointer;
  }
  button:hover:not(:disabled) {
    background: ${unsafeCSS(CONTROL_HOVER)};
  }
  button.primary {
    background: ${unsafeCSS(BRAND)};
    border-color: ${unsafeCSS(BRAND)};
    color: ${unsafeCSS(ON_SOLID)};
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
    border: 1px solid ${unsafeCSS(OUTLINE)};
    border-radius: 4px;
  }
`;

/** A panel whose content stacks in a column that may shrink (a scrolling table or a chart fills the rest). */
export const columnStyles = css`
  :host {
    display: flex;
    flex-direction: column;
    min-height: 0;
  }
`;

/**
 * A table of figures under a header that stays in view while it scrolls; each panel sets its own
 * font size and cell padding.
 */
export const tableStyles = css`
  table {
    width: 100%;
    border-collapse: collapse;
    font-variant-numeric: tabular-nums;
  }
  th {
    text-align: left;
    font-size: 13px;
    font-weight: 700;
    color: ${unsafeCSS(MUTED)};
    border-bottom: 2px solid ${unsafeCSS(GRID)};
    position: sticky;
    top: 0;
    background: ${unsafeCSS(SURFACE)};
    white-space: nowrap;
  }
  td {
    border-bottom: 1px solid ${unsafeCSS(ROW_RULE)};
    vertical-align: top;
  }
  td.r,
  th.r {
    text-align: right;
  }
`;

/** A strip across the page on a saturated ground (the top bar, the replay strip): a row of white items; each strip gives its ground and spacing. */
export const stripStyles = css`
  :host {
    display: block;
    color: ${unsafeCSS(ON_SOLID)};
  }
  .bar {
    display: flex;
    align-items: center;
    padding: 8px 18px;
  }
`;

/** A button on a saturated strip (the connection banner, the replay strip): white and borderless; each strip gives its own ink. */
export const stripButtonStyles = css`
  button {
    font: inherit;
    font-size: 14px;
    background: ${unsafeCSS(ON_SOLID)};
    border: 0;
    border-radius: 5px;
    cursor: pointer;
  }
`;

import { LitElement, css, html, unsafeCSS, type PropertyDeclarations, type TemplateResult } from 'lit';
import type { Chart, ChartConfiguration } from 'chart.js';
import type { FrameStore, StoreChange } from '../data/frame-store.js';
import { StoreController } from '../data/store-controller.js';
import { GRID, MUTED, OUTLINE, SOFT_INK, panelStyles } from '../theme.js';
import { ChartController } from './chart-controller.js';
import { headingMarkup, headingText, type HeadingPart } from '../panels/heading-text.js';
import { formatSeconds, frequencyBasis, runScalesOf } from '../data/engineering.js';
import { tauToSeconds } from '../../../src/scenario/units.js';

/**
 * A panel with one chart fed from the store: subclasses say how to configure the chart, how
 * to fill it from the store and what the legend says. Filling happens at most once per
 * animation frame, imperatively, followed by chart.update('none').
 */
/** Legend keys with a line swatch (solid, dashed or dotted), shared by every chart's legend. */
export const legendKeyStyles = css`
  .key {
    display: inline-flex;
    align-items: center;
    gap: 5px;
    white-space: nowrap;
  }
  .swatch {
    display: inline-block;
    width: 22px;
    height: 0;
    border-top: 3px solid currentColor;
  }
  .swatch.dashed {
    border-top-style: dashed;
  }
  .swatch.dotted {
    border-top-style: dotted;
  }
`;

export abstract class StreamingChart extends LitElement {
  static override properties: PropertyDeclarations = { store: { attribute: false } };
  static override styles = [
    panelStyles,
    legendKeyStyles,
    css`
      :host {
        display: flex;
        flex-direction: column;
        flex: 1 1 0;
      }
      .frame {
        position: relative;
        flex: 1 1 0;
        min-height: var(--chart-height, 190px);
      }
      .legend {
        display: flex;
        flex-wrap: wrap;
        gap: 4px 12px;
        font-size: 13px;
        color: ${unsafeCSS(SOFT_INK)};
        margin-bottom: 4px;
        min-height: 18px;
      }
      .swatch.block {
        height: 10px;
        border: 0;
        background: currentColor;
        opacity: 0.35;
      }
    `,
  ];

  declare store: FrameStore | null;
  protected readonly charts: ChartController;
  private readonly feed: StoreController;

  constructor() {
    super();
    this.store = null;
    this.charts = new ChartController(
      this,
      () => this.configure(),
      (chart) => this.store && this.refresh(chart, this.store, { frame: true, reset: true, session: true, events: true }),
    );
    this.feed = new StoreController(
      this,
      () => this.store,
      (change, store) => {
        if (change.reset || change.session) this.requestUpdate();
        const chart = this.charts.chart;
        if (chart) this.refresh(chart, store, change);
      },
    );
  }

  abstract get heading(): readonly HeadingPart[];
  protected abstract configure(): ChartConfiguration;
  protected abstract fill(chart: Chart, store: FrameStore, change: StoreChange): number;
  protected legend(): TemplateResult | string {
    return '';
  }

  /**
   * The x axis of the time charts: slow time, with the board time it stands for (ms, s at the
   * nominal frequency, src/scenario/units.ts) as a second line under each tick.
   */
  protected timeAxis() {
    const base = axis(SLOW_TIME_TITLE);
    return {
      type: 'linear' as const,
      ...base,
      ticks: {
        ...base.ticks,
        callback: (value: number | string): string[] => {
          const slow = Number(value);
          const board = this.boardSeconds(slow);
          const label = String(Number(slow.toPrecision(6)));
          return board === null ? [label] : [label, formatSeconds(board)];
        },
      },
    };
  }

  /** Board seconds at a slow time, or null when the session has no scale for it (eps = 0). */
  private boardSeconds(slow: number): number | null {
    const session = this.store?.session;
    if (!session || !(session.epsilon > 0)) return null;
    const scales = runScalesOf(session);
    return tauToSeconds(slow / scales.epsilon, scales.nominalFrequencyHz, scales.omega0);
  }

  private refresh(chart: Chart, store: FrameStore, change: StoreChange): void {
    const x = chart.options.scales?.x as { title?: { text?: unknown } } | undefined;
    if (x?.title && store.session && String(x.title.text).startsWith(SLOW_TIME_TITLE)) {
      // the board time's basis (given or assumed frequency) is known once the session is
      x.title.text =
        store.session.epsilon > 0 ? `${SLOW_TIME_TITLE} and board time ${frequencyBasis(runScalesOf(store.session))}` : SLOW_TIME_TITLE;
    }
    const points = this.fill(chart, store, change);
    chart.update('none');
    // Exposed for tests and for anyone inspecting the page: how many points the chart holds.
    chart.canvas.dataset.points = String(points);
  }

  override render() {
    return html`
      <h2>${headingMarkup(this.heading)}</h2>
      <div class="legend">${this.legend()}</div>
      <div class="frame"><canvas role="img" aria-label=${headingText(this.heading)}></canvas></div>
    `;
  }
}

/** The time charts' x axis title; the board time's basis is added once the session is known. */
export const SLOW_TIME_TITLE = 'slow time ε·τ';

/** Fixed axis widths, so that the time axes of all charts line up one above the other. */
export const LEFT_AXIS_WIDTH = 66;
export const RIGHT_AXIS_WIDTH = 62;

/** A left (value) axis of the standard width. */
export function leftAxis(title: string) {
  return { ...axis(title), afterFit: (scale: { width: number }) => void (scale.width = LEFT_AXIS_WIDTH) };
}

/**
 * A tick label that is the tick's value as written. chart.js's default label rounds to the
 * decimals of the tick spacing, so ticks placed at 0.25 and 0.75 would read 0.3 and 0.8.
 */
export function plainTickLabel(value: number | string): string {
  return String(Number(value));
}

/** Axis styling shared by the charts. */
export function axis(title: string) {
  return {
    grid: { color: GRID },
    border: { color: OUTLINE },
    ticks: { color: MUTED, font: { size: 14 }, includeBounds: false },
    title: { display: true, text: title, color: MUTED, font: { size: 14 } },
  };
}

import { LitElement, css, html, unsafeCSS, type PropertyDeclarations, type TemplateResult } from 'lit';
import type { Chart, ChartConfiguration } from 'chart.js';
import type { FrameStore, StoreChange } from '../data/frame-store.js';
import { StoreController } from '../data/store-controller.js';
import { GRID, MUTED, OUTLINE, SOFT_INK, panelStyles } from '../theme.js';
import { ChartController } from './chart-controller.js';
import { headingMarkup, headingText, type HeadingPart } from '../panels/heading-text.js';

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

  private refresh(chart: Chart, store: FrameStore, change: StoreChange): void {
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

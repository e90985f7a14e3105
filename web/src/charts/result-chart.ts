import { LitElement, css, unsafeCSS, type PropertyValues } from 'lit';
import type { Chart, ChartConfiguration } from 'chart.js';
import { MUTED, SOFT_INK, columnStyles } from '../theme.js';
import { ChartController } from './chart-controller.js';
import { legendKeyStyles } from './streaming-chart.js';

/**
 * The legend row, the chart frame and the "nothing to draw yet" overlay of a chart drawn once
 * from a result (a branch diagram, a noise analysis), not streamed.
 */
export const resultChartStyles = css`
  .legend {
    display: flex;
    flex-wrap: wrap;
    gap: 4px 14px;
    font-size: 14px;
    color: ${unsafeCSS(SOFT_INK)};
    margin: 2px 0 4px;
  }
  .frame {
    position: relative;
    flex: 1 1 0;
    min-height: var(--chart-height, 360px);
  }
  .empty {
    position: absolute;
    inset: 0;
    display: flex;
    align-items: center;
    justify-content: center;
    color: ${unsafeCSS(MUTED)};
    font-size: 17px;
    text-align: center;
    padding: 0 40px;
    pointer-events: none;
  }
`;

/**
 * A chart drawn from one result held in properties (a branch diagram, a noise analysis), not
 * streamed from the store: subclasses say how to configure the chart and how to fill it; it is
 * filled again after every update of the element.
 */
export abstract class ResultChart extends LitElement {
  static override styles = [legendKeyStyles, columnStyles, resultChartStyles];

  private readonly charts = new ChartController(
    this,
    () => this.configure(),
    (chart) => this.fill(chart),
  );

  protected abstract configure(): ChartConfiguration;
  protected abstract fill(chart: Chart): void;

  protected override updated(changed: PropertyValues): void {
    super.updated(changed);
    const chart = this.charts.chart;
    if (chart) this.fill(chart);
  }
}

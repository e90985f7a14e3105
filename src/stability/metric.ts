/** Builds the public, validating entry point of a statistic from its kernel. */
import { checkSeries, seriesKind, toPhase } from './series.js';
import type { MetricKernel, SeriesOptions, StabilityPoint } from './types.js';
import { requireAveragingFactor, requirePhasePoints } from './validate.js';

/** Signature shared by adev, oadev, mdev, tdev, hdev, hdevNonOverlapping and mtie. */
export type MetricFunction = (data: ArrayLike<number>, tau0: number, m: number, options?: SeriesOptions) => StabilityPoint;

export function publicMetric(name: string, kernel: MetricKernel): MetricFunction {
  return (data, tau0, m, options) => {
    const kind = seriesKind(name, options);
    checkSeries(name, data, tau0, kind);
    requireAveragingFactor(name, m);
    const phasePoints = kind === 'phase' ? data.length : data.length + 1;
    requirePhasePoints(name, m, phasePoints, kernel.minPhasePoints(m));
    return kernel.evaluate(toPhase(data, tau0, kind, kernel.offsetSensitive), tau0, m);
  };
}

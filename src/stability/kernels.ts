/** Every statistic by name, for callers that pick them at run time (the sweep). */
import { adevKernel, oadevKernel } from './allan.js';
import { hdevKernel, hdevNonOverlappingKernel } from './hadamard.js';
import { mdevKernel, tdevKernel } from './modified-allan.js';
import { mtieKernel } from './time-error.js';
import type { MetricKernel, StabilityMetric } from './types.js';

export const METRIC_KERNELS: Readonly<Record<StabilityMetric, MetricKernel>> = {
  adev: adevKernel,
  oadev: oadevKernel,
  mdev: mdevKernel,
  tdev: tdevKernel,
  hdev: hdevKernel,
  hdevNonOverlapping: hdevNonOverlappingKernel,
  mtie: mtieKernel,
};

export const METRIC_NAMES = Object.keys(METRIC_KERNELS) as StabilityMetric[];

export function isStabilityMetric(name: unknown): name is StabilityMetric {
  return typeof name === 'string' && Object.prototype.hasOwnProperty.call(METRIC_KERNELS, name);
}

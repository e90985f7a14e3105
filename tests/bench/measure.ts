/** Small measuring helpers for the benchmark: errors, throughput on a shared machine, step search. */

/** max_i |y_i - ref_i| / ||ref||_2, the "relative error of the slow variables". */
export function relativeError(y: Float64Array, reference: Float64Array): number {
  let worst = 0;
  let norm = 0;
  for (let i = 0; i < y.length; i++) {
    worst = Math.max(worst, Math.abs(y[i] - reference[i]));
    norm += reference[i] * reference[i];
  }
  return worst / Math.sqrt(norm);
}

export interface Throughput {
  /** Best trial (least disturbed by other processes), periods per wall second. */
  best: number;
  median: number;
  /**
   * Best trial in periods per second of this process's CPU time (user + system): what one free
   * core delivers, nearly independent of other load on the machine.
   */
  bestCpu: number;
  trials: number;
}

/**
 * Periods per wall second of `advanceBy(periods)` on fresh integrators from `make`, in chunks of
 * `chunk` periods, over `trials` trials of at least `trialMs` each after one warm-up trial. On a
 * machine shared with other work the best trial is the figure to compare; the median is kept too.
 */
export function measureThroughput<T>(
  make: () => T,
  advanceTo: (integrator: T, periods: number) => void,
  chunk: number,
  trials: number,
  trialMs: number,
): Throughput {
  const rates: number[] = [];
  const cpuRates: number[] = [];
  for (let t = 0; t <= trials; t++) {
    const integrator = make();
    let periods = 0;
    const cpu = process.cpuUsage();
    const start = performance.now();
    let elapsed: number;
    do {
      periods += chunk;
      advanceTo(integrator, periods);
      elapsed = performance.now() - start;
    } while (elapsed < trialMs);
    const used = process.cpuUsage(cpu);
    if (t > 0) {
      rates.push(periods / (elapsed / 1000));
      cpuRates.push(periods / ((used.user + used.system) / 1e6));
    }
  }
  rates.sort((a, b) => a - b);
  return { best: rates[rates.length - 1], median: rates[Math.floor(rates.length / 2)], bestCpu: Math.max(...cpuRates), trials };
}

export interface StepSearch {
  stepsPerPeriod: number;
  error: number;
  tried: { stepsPerPeriod: number; error: number }[];
}

/**
 * The smallest step count whose error is at most `target`, for a method whose error falls like a
 * power of the step count: fit the power from two starting counts, jump to the predicted count,
 * correct upwards until the target is met, then (where runs are cheap, below 64 steps) step down
 * while the target still holds.
 */
export function searchSteps(errorAt: (steps: number) => number, target: number, first: number, second: number): StepSearch {
  const tried: { stepsPerPeriod: number; error: number }[] = [];
  const run = (steps: number) => {
    const error = errorAt(steps);
    tried.push({ stepsPerPeriod: steps, error });
    return error;
  };
  const e1 = run(first);
  const e2 = run(second);
  const power = Math.log(e1 / e2) / Math.log(second / first);
  if (!(power > 0.5)) throw new Error(`searchSteps: the error does not fall with the step count (${e1} at ${first}, ${e2} at ${second})`);
  let steps = Math.max(1, Math.ceil(first * (e1 / target) ** (1 / power)));
  let error = steps === first ? e1 : steps === second ? e2 : run(steps);
  for (let round = 0; round < 8 && error > target; round++) {
    steps = Math.ceil(steps * Math.max(1.02, (error / target) ** (1 / power)));
    error = run(steps);
  }
  while (steps > 1 && steps <= 64) {
    const lower = run(steps - 1);
    if (lower > target) break;
    steps -= 1;
    error = lower;
  }
  return { stepsPerPeriod: steps, error, tried };
}

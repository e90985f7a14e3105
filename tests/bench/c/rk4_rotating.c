/*
 * C yardstick of the benchmark: classic RK4 (Hairer, Norsett, Wanner, Solving ODEs I, II.1) on the
 * rotating-frame system y' = eps f(y, omega tau) of docs/model.md, 'The frame', for two modes,
 * written to mirror src/model/slow-field.ts (forcesTwoModes) and src/integrate/rk4-scheme.ts
 * operation by operation: the same fused stages, the same half-step rotation recurrence for the
 * carrier angles, reseeded from cos/sin every 1024 steps, and the same step grid (equal steps, at
 * most the nominal 2 pi / (S max omega)). Only the compiler's rounding choices differ.
 * The engine runs rings through a one-pass form of the same kernel (src/model/ring-kernel.ts, the
 * same operations in the same order, bit for bit); that form written in C ran at the same speed
 * as this two-pass one (measured with gcc -O3 -march=native), so this stays the yardstick.
 *
 * Input on stdin (whitespace-separated numbers):
 *   N steps_per_period periods trials eps
 *   omega0 omega1 gain0 gain1 loss0 loss1 kappa rho sigma
 *   N lines: detuning fromA weightA fromB weightB    (in-neighbour slots; a missing slot is the node itself)
 *   4N numbers: the start [u0 v0 u1 v1] per node
 * Output on stdout, one JSON object: periods, trials, best wall and CPU seconds of one trial,
 * periods per second (best trial) and the final state of the last trial.
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#define RESEED_STEPS 1024

static int n;
static double eps, w0, w1, g0, g1, d0, d1, kr, ks;
static double *detuning, *weightA, *weightB, *signal_, *rate, *motion;
static int *fromA, *fromB;

/* next = base + a F(yIn), accOut = accIn + b F(yIn); yIn is read completely first. */
static void combine(const double *cs, const double *sn, const double *yIn, const double *base, double a, double *next,
                    const double *accIn, double b, double *accOut) {
  const double c0 = cs[0], s0 = sn[0], c1 = cs[1], s1 = sn[1];
  for (int k = 0, i = 0; k < n; k++, i += 4) {
    const double u0 = yIn[i], v0 = yIn[i + 1], u1 = yIn[i + 2], v1 = yIn[i + 3];
    const double x0 = u0 * c0 + v0 * s0;
    const double r0 = w0 * (v0 * c0 - u0 * s0);
    const double x1 = u1 * c1 + v1 * s1;
    const double r1 = w1 * (v1 * c1 - u1 * s1);
    motion[i] = x0;
    motion[i + 1] = r0;
    motion[i + 2] = x1;
    motion[i + 3] = r1;
    signal_[k] = x0 + x1;
    rate[k] = r0 + r1;
  }
  const double q0 = 2 * w0 * w0, q1 = 2 * w1 * w1;
  const double su0 = -s0 / w0, sv0 = c0 / w0, su1 = -s1 / w1, sv1 = c1 / w1;
  for (int k = 0, i = 0; k < n; k++, i += 4) {
    const double sk = signal_[k], rk = rate[k];
    const int la = fromA[k], lb = fromB[k];
    const double wa = weightA[k], wb = weightB[k];
    const double coupling = kr * (wa * (signal_[la] - sk) + wb * (signal_[lb] - sk)) + ks * (wa * (rate[la] - rk) + wb * (rate[lb] - rk));
    const double sustain = (1 - sk * sk) * rk;
    const double dk = detuning[k];
    const double f0 = g0 * sustain - d0 * motion[i + 1] - q0 * dk * motion[i] + coupling;
    const double f1 = g1 * sustain - d1 * motion[i + 3] - q1 * dk * motion[i + 2] + coupling;
    const double fu0 = f0 * su0, fv0 = f0 * sv0, fu1 = f1 * su1, fv1 = f1 * sv1;
    next[i] = base[i] + a * fu0;
    next[i + 1] = base[i + 1] + a * fv0;
    next[i + 2] = base[i + 2] + a * fu1;
    next[i + 3] = base[i + 3] + a * fv1;
    accOut[i] = accIn[i] + b * fu0;
    accOut[i + 1] = accIn[i + 1] + b * fv0;
    accOut[i + 2] = accIn[i + 2] + b * fu1;
    accOut[i + 3] = accIn[i + 3] + b * fv1;
  }
}

static void run(double *y, double *trial, double *sum, double tau0, double tauEnd, long steps) {
  const double h = (tauEnd - tau0) / steps;
  const double half = 0.5 * h * eps, full = h * eps, sixth = full / 6, third = full / 3;
  const double cstep[2] = {cos(w0 * 0.5 * h), cos(w1 * 0.5 * h)};
  const double sstep[2] = {sin(w0 * 0.5 * h), sin(w1 * 0.5 * h)};
  double cs[2] = {cos(w0 * tau0), cos(w1 * tau0)};
  double sn[2] = {sin(w0 * tau0), sin(w1 * tau0)};
  for (long step = 0; step < steps; step++) {
    combine(cs, sn, y, y, half, trial, y, sixth, sum);
    for (int j = 0; j < 2; j++) {
      const double c = cs[j], s = sn[j];
      cs[j] = c * cstep[j] - s * sstep[j];
      sn[j] = s * cstep[j] + c * sstep[j];
    }
    combine(cs, sn, trial, y, half, trial, sum, third, sum);
    combine(cs, sn, trial, y, full, trial, sum, third, sum);
    for (int j = 0; j < 2; j++) {
      const double c = cs[j], s = sn[j];
      cs[j] = c * cstep[j] - s * sstep[j];
      sn[j] = s * cstep[j] + c * sstep[j];
    }
    combine(cs, sn, trial, y, 0, trial, sum, sixth, y);
    if ((step + 1) % RESEED_STEPS == 0) {
      const double tau = tau0 + (step + 1) * h;
      cs[0] = cos(w0 * tau), cs[1] = cos(w1 * tau);
      sn[0] = sin(w0 * tau), sn[1] = sin(w1 * tau);
    }
  }
}

static double seconds(clockid_t clock) {
  struct timespec t;
  clock_gettime(clock, &t);
  return t.tv_sec + 1e-9 * t.tv_nsec;
}

static void fail(const char *what) {
  fprintf(stderr, "rk4_rotating: could not read %s from stdin\n", what);
  exit(2);
}

int main(void) {
  double stepsPerPeriod, periods;
  int trials;
  if (scanf("%d %lf %lf %d %lf", &n, &stepsPerPeriod, &periods, &trials, &eps) != 5 || n < 1 || trials < 1) fail("N, steps per period, periods, trials, eps");
  double rho, sigma, kappa;
  if (scanf("%lf %lf %lf %lf %lf %lf %lf %lf %lf", &w0, &w1, &g0, &g1, &d0, &d1, &kappa, &rho, &sigma) != 9) fail("the mode and coupling parameters");
  kr = kappa * rho;
  ks = kappa * sigma;
  detuning = malloc(n * sizeof(double));
  weightA = malloc(n * sizeof(double));
  weightB = malloc(n * sizeof(double));
  signal_ = malloc(n * sizeof(double));
  rate = malloc(n * sizeof(double));
  fromA = malloc(n * sizeof(int));
  fromB = malloc(n * sizeof(int));
  motion = malloc(4 * n * sizeof(double));
  double *start = malloc(4 * n * sizeof(double)), *y = malloc(4 * n * sizeof(double));
  double *trial = malloc(4 * n * sizeof(double)), *sum = malloc(4 * n * sizeof(double));
  for (int k = 0; k < n; k++) {
    if (scanf("%lf %d %lf %d %lf", &detuning[k], &fromA[k], &weightA[k], &fromB[k], &weightB[k]) != 5) fail("a node line");
    if (fromA[k] < 0 || fromA[k] >= n || fromB[k] < 0 || fromB[k] >= n) fail("a neighbour index in 0..N-1");
  }
  for (int i = 0; i < 4 * n; i++)
    if (scanf("%lf", &start[i]) != 1) fail("the start state");

  const double tauEnd = 2 * M_PI * periods;
  const double nominal = 2 * M_PI / (stepsPerPeriod * (w0 > w1 ? w0 : w1));
  long steps = (long)ceil(tauEnd / nominal * (1 - 1e-10));
  if (steps < 1) steps = 1;
  double bestWall = INFINITY, bestCpu = INFINITY;
  for (int t = 0; t < trials; t++) {
    memcpy(y, start, 4 * n * sizeof(double));
    const double wall0 = seconds(CLOCK_MONOTONIC), cpu0 = seconds(CLOCK_PROCESS_CPUTIME_ID);
    run(y, trial, sum, 0, tauEnd, steps);
    const double wall = seconds(CLOCK_MONOTONIC) - wall0, cpu = seconds(CLOCK_PROCESS_CPUTIME_ID) - cpu0;
    if (wall < bestWall) bestWall = wall;
    if (cpu < bestCpu) bestCpu = cpu;
  }
  printf("{\"periods\":%.17g,\"steps\":%ld,\"trials\":%d,\"wallSeconds\":%.9g,\"cpuSeconds\":%.9g,\"periodsPerSecond\":%.9g,\"cpuPeriodsPerSecond\":%.9g,\"state\":[",
         periods, steps, trials, bestWall, bestCpu, periods / bestWall, periods / bestCpu);
  for (int i = 0; i < 4 * n; i++) printf("%s%.17g", i ? "," : "", y[i]);
  printf("]}\n");
  return 0;
}

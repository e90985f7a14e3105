#!/usr/bin/env python3
"""Independent reference solutions of syncring's full coupled equations (docs/model.md,
'Reference model').

Integrates the model in the ORIGINAL coordinates (x, x') with SciPy's DOP853, writes each case's
scenario (tests/reference/<case>.scenario.json) and its samples (tests/reference/<case>.dop853.json).
Nothing here shares code with the TypeScript engine: the right-hand side is written straight from
docs/model.md, and the coupling matrix is expanded from the scenario JSON that is written out,
so the samples belong to exactly that file.

Run by hand (not by CI):  python3 tests/reference/make_reference.py
"""

import json
import math
import os
import sys
import time

import numpy as np
import scipy
from scipy.integrate import solve_ivp

HERE = os.path.dirname(os.path.abspath(__file__))
TWO_PI = 2.0 * math.pi

# Stored run and the tighter self-check run.
RTOL, ATOL = 1e-12, 1e-13
CHECK_RTOL, CHECK_ATOL = 1e-13, 1e-14


# ---------------------------------------------------------------- scenarios (invented demo data)

def state_from_pairs(pairs_per_node):
    """[[(x, xdot) per mode] per node] -> the scenario's state shape."""
    return [[{"x": x, "xdot": xd} for (x, xd) in node] for node in pairs_per_node]


def ring_two_way_edges(n):
    edges = []
    for k in range(n):
        edges.append([k, (k + 1) % n, 1])
        edges.append([(k + 1) % n, k, 1])
    return edges


# Case 1: amplitudes 1.8, 1.6, 1.9, 1.7 (mode 0, omega 1) and 0.5, 0.7, 0.35, 0.6 (mode 1, omega 1.37)
# at scattered phases; x = A cos(phi), xdot = -omega A sin(phi), rounded to 6 decimals.
ONE_WAY_TWO_MODE = {
    "name": "one-way-two-mode",
    "nodes": 4,
    "topology": "ring-one-way",
    "epsilon": 1e-3,
    "modes": [
        {"omega": 1, "gain": 1, "loss": 0.2},
        {"omega": 1.37, "gain": 0.8, "loss": 0.1},
    ],
    "coupling": {"strength": 0.3, "reactive": 0.4, "dissipative": 0.7},
    "detuning": [0.3, -0.2, 0.1, -0.25],
    "initial": {"state": state_from_pairs([
        [(1.8, 0.0), (0.46053, -0.266752)],
        [(0.427998, -1.541693), (-0.353392, -0.827818)],
        [(-1.717737, -0.812022), (-0.313865, 0.212189)],
        [(-0.833443, 1.481679), (0.332625, 0.684124)],
    ])},
}

# Case 2: two-way ring of 5 with the link carrying node 2 into node 3 removed.
# Amplitudes 2.0, 1.9, 2.1, 1.95, 2.05 at phases 0, 1.9, 3.7, 5.1, 0.8 (omega 1).
TWO_WAY_BROKEN_LINK = {
    "name": "two-way-broken-link",
    "nodes": 5,
    "topology": {"edges": [e for e in ring_two_way_edges(5) if e != [2, 3, 1]]},
    "epsilon": 1e-3,
    "modes": [{"omega": 1, "gain": 1, "loss": 0}],
    "coupling": {"strength": 0.5, "reactive": 0.2, "dissipative": 1},
    "detuning": [0.1, 0, -0.1, 0.2, -0.05],
    "initial": {"state": state_from_pairs([
        [(2.0, 0.0)],
        [(-0.61425, -1.79797)],
        [(-1.78101, 1.112656)],
        [(0.737057, 1.805339)],
        [(1.428249, -1.47058)],
    ])},
}

# Case 3: one uncoupled node = van der Pol oscillator x'' - eps (1 - x^2) x' + x = 0.
VAN_DER_POL = {
    "name": "van-der-pol",
    "nodes": 1,
    "topology": {"edges": []},
    "epsilon": 0.1,
    "modes": [{"omega": 1, "gain": 1, "loss": 0}],
    "coupling": {"strength": 0, "reactive": 0, "dissipative": 0},
    "detuning": [0],
    "initial": {"state": state_from_pairs([[(0.5, 0.0)]])},
}

CASES = [
    # (scenario, final tau, sample spacing, number of samples including tau = 0)
    (ONE_WAY_TWO_MODE, TWO_PI * 500, TWO_PI * 25, 21),
    (TWO_WAY_BROKEN_LINK, TWO_PI * 500, TWO_PI * 25, 21),
    (VAN_DER_POL, 200.0, 10.0, 21),
]


# ---------------------------------------------------------------- model (docs/model.md, 'Reference model')

def coupling_matrix(scenario):
    """A[k][l] = weight of the link carrying node l's signal into node k."""
    n = scenario["nodes"]
    a = np.zeros((n, n))
    topology = scenario["topology"]
    if topology == "ring-one-way":
        for k in range(n):
            a[k, (k - 1) % n] += 1.0
    elif topology == "ring-two-way":
        for k in range(n):
            a[k, (k - 1) % n] += 1.0
            a[k, (k + 1) % n] += 1.0
    else:
        for (src, dst, weight) in topology["edges"]:
            a[dst, src] = weight
    return a


class Model:
    """y = [x (N*M, node-major), xdot (N*M)]; returns y' for x'' + omega^2 x = eps F."""

    def __init__(self, scenario):
        self.n = scenario["nodes"]
        self.m = len(scenario["modes"])
        self.eps = float(scenario["epsilon"])
        self.omega = np.array([float(md["omega"]) for md in scenario["modes"]])
        self.gain = np.array([float(md["gain"]) for md in scenario["modes"]])
        self.loss = np.array([float(md["loss"]) for md in scenario["modes"]])
        c = scenario["coupling"]
        self.kappa = float(c["strength"])
        self.rho = float(c["reactive"])
        self.sigma = float(c["dissipative"])
        self.delta = np.array([float(v) for v in scenario["detuning"]])
        self.a = coupling_matrix(scenario)
        self.in_weight = self.a.sum(axis=1)  # sum_l A_kl, for the "- s_k" part of the coupling
        self.omega2 = self.omega ** 2

    def rhs(self, _tau, y):
        size = self.n * self.m
        x = y[:size].reshape(self.n, self.m)
        xd = y[size:].reshape(self.n, self.m)
        s = x.sum(axis=1)
        sd = xd.sum(axis=1)
        # sum_l A_kl (s_l - s_k) = (A s)_k - (sum_l A_kl) s_k
        coupling = self.kappa * (
            self.rho * (self.a @ s - self.in_weight * s)
            + self.sigma * (self.a @ sd - self.in_weight * sd)
        )
        force = (
            self.gain[None, :] * ((1.0 - s * s) * sd)[:, None]
            - self.loss[None, :] * xd
            - 2.0 * self.omega2[None, :] * self.delta[:, None] * x
            + coupling[:, None]
        )
        xdd = -self.omega2[None, :] * x + self.eps * force
        return np.concatenate((xd.ravel(), xdd.ravel()))

    def initial_vector(self, scenario):
        state = scenario["initial"]["state"]
        x = [[md["x"] for md in node] for node in state]
        xd = [[md["xdot"] for md in node] for node in state]
        return np.concatenate((np.array(x, float).ravel(), np.array(xd, float).ravel()))

    def to_state(self, y):
        size = self.n * self.m
        x = y[:size].reshape(self.n, self.m)
        xd = y[size:].reshape(self.n, self.m)
        return [[{"x": float(x[k, j]), "xdot": float(xd[k, j])} for j in range(self.m)]
                for k in range(self.n)]


def integrate(model, y0, sample_taus, rtol, atol):
    """Integrates segment by segment so every sample is an integrator step end, not an
    interpolant value. Returns (array of states at sample_taus, rhs evaluations)."""
    out = [np.array(y0, float)]
    y = np.array(y0, float)
    evaluations = 0
    for t0, t1 in zip(sample_taus[:-1], sample_taus[1:]):
        sol = solve_ivp(model.rhs, (t0, t1), y, method="DOP853", rtol=rtol, atol=atol)
        if not sol.success:
            raise RuntimeError(f"DOP853 failed on [{t0}, {t1}]: {sol.message}")
        evaluations += sol.nfev
        y = sol.y[:, -1]
        out.append(y.copy())
    return np.array(out), evaluations


def loop_rhs(scenario, y):
    """The same equations written term by term with plain loops, to catch slips in the
    vectorised Model.rhs (index order, broadcasting, the sign of each term)."""
    n, m = scenario["nodes"], len(scenario["modes"])
    eps = scenario["epsilon"]
    c = scenario["coupling"]
    a = coupling_matrix(scenario)
    x = lambda k, j: y[k * m + j]
    xd = lambda k, j: y[n * m + k * m + j]
    s = [sum(x(k, j) for j in range(m)) for k in range(n)]
    sd = [sum(xd(k, j) for j in range(m)) for k in range(n)]
    out = [0.0] * (2 * n * m)
    for k in range(n):
        for j in range(m):
            md = scenario["modes"][j]
            w = md["omega"]
            f = md["gain"] * (1 - s[k] ** 2) * sd[k]
            f -= md["loss"] * xd(k, j)
            f -= 2 * w ** 2 * scenario["detuning"][k] * x(k, j)
            for l in range(n):
                f += c["strength"] * a[k][l] * (c["reactive"] * (s[l] - s[k])
                                                + c["dissipative"] * (sd[l] - sd[k]))
            out[k * m + j] = xd(k, j)
            out[n * m + k * m + j] = -w ** 2 * x(k, j) + eps * f
    return np.array(out)


def check_rhs(scenario, model, trials=20):
    rng = np.random.default_rng(12345)
    worst = 0.0
    for _ in range(trials):
        y = rng.uniform(-2.5, 2.5, 2 * model.n * model.m)
        worst = max(worst, float(np.max(np.abs(model.rhs(0.0, y) - loop_rhs(scenario, y)))))
    if worst > 1e-13:
        raise AssertionError(f"{scenario['name']}: vectorised and loop right-hand sides differ by {worst}")
    return worst


def complex_amplitudes(model, y, tau):
    """a_kj with x = Re(a e^{i omega tau}), x' = Re(i omega a e^{i omega tau}) (docs/model.md,
    'The frame')."""
    size = model.n * model.m
    x = y[:size].reshape(model.n, model.m)
    xd = y[size:].reshape(model.n, model.m)
    return (x - 1j * xd / model.omega[None, :]) * np.exp(-1j * model.omega[None, :] * tau)


def averaged_rhs(model, a):
    """First-order guiding system in closed form (docs/model.md, 'Closed form for M = 1' and 'Two
    modes away from resonance'): per mode, self saturation
    |a_j|^2/4 and cross saturation |a_other|^2/2, coupling of like modes only (no resonance)."""
    power = np.abs(a) ** 2
    cross = power.sum(axis=1, keepdims=True) - power
    w = model.omega[None, :]
    neighbour = model.a @ a - model.in_weight[:, None] * a
    return 0.5 * model.eps * (
        model.gain[None, :] * (1.0 - power / 4.0 - cross / 2.0) * a
        - model.loss[None, :] * a
        + 2j * w * model.delta[:, None] * a
        + model.kappa * (model.sigma - 1j * model.rho / w) * neighbour
    )


def guiding_deviation(model, y0, taus, states):
    """Largest |a_full - a_guide| over the samples. It must be O(eps) on times O(1/eps)
    (averaging theorem, Sanders, Verhulst, Murdock 2007); a sign slip in any term would make it O(1)."""
    shape = (model.n, model.m)
    a0 = complex_amplitudes(model, y0, 0.0)

    def rhs(_t, v):
        a = (v[:a0.size] + 1j * v[a0.size:]).reshape(shape)
        da = averaged_rhs(model, a).ravel()
        return np.concatenate((da.real, da.imag))

    sol = solve_ivp(rhs, (taus[0], taus[-1]), np.concatenate((a0.real.ravel(), a0.imag.ravel())),
                    method="DOP853", rtol=1e-12, atol=1e-13, t_eval=taus)
    worst = 0.0
    for i, tau in enumerate(taus):
        guide = (sol.y[:a0.size, i] + 1j * sol.y[a0.size:, i]).reshape(shape)
        worst = max(worst, float(np.max(np.abs(complex_amplitudes(model, states[i], tau) - guide))))
    return worst


# ---------------------------------------------------------------- van der Pol period at eps = 1

PUBLISHED_VDP_PERIOD = 6.66328686   # Sanders, Verhulst, Murdock 2007 (docs/model.md, 'Reference values')
PUBLISHED_VDP_MAX_X = 2.00861986    # same source: the cycle's largest x


def van_der_pol_limit_cycle(mu=1.0, rtol=CHECK_RTOL, atol=CHECK_ATOL):
    """Period from successive upward zero crossings of x, and the cycle's largest x (at x' = 0,
    x > 0), after transients have died out. Event roots are found on DOP853's dense output."""
    def rhs(_t, y):
        return [y[1], mu * (1.0 - y[0] ** 2) * y[1] - y[0]]

    def upward_zero(_t, y):
        return y[0]
    upward_zero.direction = 1.0

    def velocity_zero(_t, y):
        return y[1]
    velocity_zero.direction = -1.0  # x' goes + to -: a maximum of x

    sol = solve_ivp(rhs, (0.0, 400.0), [2.0, 0.0], method="DOP853", rtol=rtol, atol=atol,
                    events=(upward_zero, velocity_zero))
    crossings = sol.t_events[0]
    late = crossings[crossings > 200.0]
    periods = np.diff(late)
    maxima = sol.y_events[1][sol.t_events[1] > 200.0][:, 0]
    return {
        "epsilon": mu,
        "period": float(periods.mean()),
        "periodSpread": float(periods.max() - periods.min()),
        "cycles": int(periods.size),
        "maxX": float(maxima.mean()),
        "publishedPeriod": PUBLISHED_VDP_PERIOD,
        "publishedMaxX": PUBLISHED_VDP_MAX_X,
        "source": "Sanders, Verhulst, Murdock, Averaging Methods in Nonlinear Dynamical Systems, "
                  "2nd ed., Springer 2007",
        "rtol": rtol,
        "atol": atol,
    }


# ---------------------------------------------------------------- output

def write_json(path, obj):
    # json.dumps writes floats with repr, i.e. the shortest string that round-trips exactly.
    with open(path, "w") as f:
        json.dump(obj, f, indent=1)
        f.write("\n")


def run_case(scenario, tau_end, spacing, count):
    name = scenario["name"]
    scenario_file = f"{name}.scenario.json"
    write_json(os.path.join(HERE, scenario_file), scenario)
    # Build the model from the file just written, so the samples belong to exactly that file.
    with open(os.path.join(HERE, scenario_file)) as f:
        scenario = json.load(f)
    model = Model(scenario)
    rhs_diff = check_rhs(scenario, model)
    y0 = model.initial_vector(scenario)
    taus = [i * spacing for i in range(count)]
    assert abs(taus[-1] - tau_end) <= 1e-9 * tau_end, (name, taus[-1], tau_end)

    start = time.perf_counter()
    states, nfev = integrate(model, y0, taus, RTOL, ATOL)
    seconds = time.perf_counter() - start
    start = time.perf_counter()
    check, check_nfev = integrate(model, y0, taus, CHECK_RTOL, CHECK_ATOL)
    check_seconds = time.perf_counter() - start
    diff = float(np.max(np.abs(states - check)))
    final_diff = float(np.max(np.abs(states[-1] - check[-1])))
    guide_diff = guiding_deviation(model, y0, taus, states)

    record = {
        "case": name,
        "scenario": scenario_file,
        "solver": "scipy.integrate.solve_ivp DOP853",
        "scipy": scipy.__version__,
        "rtol": RTOL,
        "atol": ATOL,
        "selfCheckRtol": CHECK_RTOL,
        "selfCheckAtol": CHECK_ATOL,
        "selfCheckMaxDiff": diff,
        "samples": [{"tau": t, "state": model.to_state(y)} for t, y in zip(taus, states)],
    }
    print(f"{name}: {count} samples to tau = {taus[-1]:.6f}; "
          f"rtol {RTOL:g}: {seconds:.2f} s, {nfev} rhs evaluations; "
          f"rtol {CHECK_RTOL:g}: {check_seconds:.2f} s, {check_nfev} rhs evaluations; "
          f"max |difference| {diff:.3e} (at the last sample {final_diff:.3e})")
    print(f"  loop vs vectorised rhs: {rhs_diff:.1e}; full vs first-order guiding system, max "
          f"|a_full - a_guide| = {guide_diff:.3e} (eps = {model.eps:g}, eps * tau_end = "
          f"{model.eps * taus[-1]:.3g})")
    if diff >= 1e-8:
        print(f"  WARNING: self-check difference {diff:.3e} is not well below 1e-8", file=sys.stderr)
    return record


def main():
    print(f"python {sys.version.split()[0]}, numpy {np.__version__}, scipy {scipy.__version__}")
    for scenario, tau_end, spacing, count in CASES:
        record = run_case(scenario, tau_end, spacing, count)
        if scenario["name"] == "van-der-pol":
            start = time.perf_counter()
            cycle = van_der_pol_limit_cycle()
            seconds = time.perf_counter() - start
            period_rel = abs(cycle["period"] - PUBLISHED_VDP_PERIOD) / PUBLISHED_VDP_PERIOD
            max_rel = abs(cycle["maxX"] - PUBLISHED_VDP_MAX_X) / PUBLISHED_VDP_MAX_X
            cycle["periodRelativeDifference"] = period_rel
            cycle["maxXRelativeDifference"] = max_rel
            record["limitCycle"] = cycle
            print(f"van der Pol at eps = 1 ({seconds:.2f} s): period {cycle['period']!r} over "
                  f"{cycle['cycles']} cycles (spread {cycle['periodSpread']:.1e}) vs published "
                  f"{PUBLISHED_VDP_PERIOD}: relative difference {period_rel:.2e}; largest x "
                  f"{cycle['maxX']!r} vs {PUBLISHED_VDP_MAX_X}: relative difference {max_rel:.2e}")
            if period_rel > 1e-8 or max_rel > 1e-8:
                print("  WARNING: van der Pol limit cycle disagrees with the published values",
                      file=sys.stderr)
        write_json(os.path.join(HERE, f"{record['case']}.dop853.json"), record)


if __name__ == "__main__":
    main()

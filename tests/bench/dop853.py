"""SciPy DOP853 on the bench's problem in the original coordinates z = [x, x'] per node and mode.

Reads one JSON object on stdin (the model of docs/model.md, 'Reference model', for two modes on a
graph with at most two incoming links per node, the start z0, rtol, atol, maxPeriods,
budgetSeconds), times a short pilot run, then integrates from tau = 0 over as many whole carrier
periods as fit in the budget (at most maxPeriods) and prints one JSON object: periods, wall and CPU
seconds of that run, right-hand-side evaluations and the final state.
"""
import json
import sys
import time

import numpy as np
from scipy.integrate import solve_ivp


def main():
    p = json.load(sys.stdin)
    eps = p["epsilon"]
    w0, w1 = p["omega"]
    g0, g1 = p["gain"]
    d0, d1 = p["loss"]
    kr = p["strength"] * p["reactive"]
    ks = p["strength"] * p["dissipative"]
    det2 = 2 * np.array(p["detuning"])
    from_a, from_b = np.array(p["fromA"]), np.array(p["fromB"])
    wa, wb = np.array(p["weightA"]), np.array(p["weightB"])
    z0 = np.array(p["z0"], dtype=float)

    def rhs(_tau, z):
        z = z.reshape(-1, 4)
        x0, r0, x1, r1 = z[:, 0], z[:, 1], z[:, 2], z[:, 3]
        s, sd = x0 + x1, r0 + r1
        coupling = kr * (wa * (s[from_a] - s) + wb * (s[from_b] - s)) + ks * (wa * (sd[from_a] - sd) + wb * (sd[from_b] - sd))
        sustain = (1 - s * s) * sd
        out = np.empty_like(z)
        out[:, 0] = r0
        out[:, 1] = -w0 * w0 * x0 + eps * (g0 * sustain - d0 * r0 - det2 * w0 * w0 * x0 + coupling)
        out[:, 2] = r1
        out[:, 3] = -w1 * w1 * x1 + eps * (g1 * sustain - d1 * r1 - det2 * w1 * w1 * x1 + coupling)
        return out.ravel()

    def integrate(periods):
        t0, c0 = time.perf_counter(), time.process_time()
        sol = solve_ivp(rhs, (0.0, 2 * np.pi * periods), z0, method="DOP853", rtol=p["rtol"], atol=p["atol"])
        if not sol.success:
            raise SystemExit(f"dop853.py: DOP853 failed: {sol.message}")
        return sol, time.perf_counter() - t0, time.process_time() - c0

    pilot_periods = min(10, p["maxPeriods"])
    _, pilot_seconds, _ = integrate(pilot_periods)
    periods = int(min(p["maxPeriods"], max(pilot_periods, pilot_periods * p["budgetSeconds"] / max(pilot_seconds, 1e-9))))
    sol, wall, cpu = integrate(periods)
    print(json.dumps({"periods": periods, "wallSeconds": wall, "cpuSeconds": cpu, "evaluations": int(sol.nfev), "state": sol.y[:, -1].tolist()}))


main()

"""Reference values for driftlight's matrix exponential and kinetic-scheme solver, from scipy.linalg.expm.

Regenerate (from the repository root):
    python3 test/reference/photophysics/expm_reference.py > test/reference/photophysics/expm_reference.json

Writes JSON to stdout: (1) generic matrices of increasing 1-norm (seeded), with expm(A); (2) a four-state
first-order scheme S0, S1, S2, T1 (rate matrix K, dP/dt = K P) with populations P(t) = expm(K t) P0 after
a delta pulse into S2, and the integrated populations -inv(K_excited) P0_excited (scipy.linalg.solve);
(3) a stiff scheme (ps, ns and ms rates, with reverse crossing T1 -> S1 so K is not triangular) out to
20 ms: populations from mpmath.expm at 60 significant digits (the truth), from scipy.linalg.expm and
from scipy.integrate.solve_ivp (Radau, rtol 1e-13, atol 1e-30, exact Jacobian), so the test can state the
accuracy driftlight meets against both scipy routes.
"""
import json
import sys

import mpmath
import numpy as np
import scipy
import scipy.linalg
from scipy.integrate import solve_ivp


def rate_matrix(states, processes):
    n = len(states)
    k = np.zeros((n, n))
    for _kind, src, dst, rate in processes:
        i, j = states.index(src), states.index(dst)
        k[j, i] += rate
        k[i, i] -= rate
    return k


def main():
    rng = np.random.default_rng(20261201)
    generic = []
    for size, scale in [(3, 0.01), (4, 1.0), (4, 8.0), (5, 40.0), (6, 300.0)]:
        a = rng.standard_normal((size, size)) * scale / size
        generic.append({"matrix": a.tolist(), "expm": scipy.linalg.expm(a).tolist(), "oneNorm": float(np.abs(a).sum(axis=0).max())})

    states = ["S0", "S1", "S2", "T1"]
    processes = [
        ("internal-conversion", "S2", "S1", 1.0e12),
        ("fluorescence", "S1", "S0", 1.0e8),
        ("nonradiative-decay", "S1", "S0", 5.0e7),
        ("intersystem-crossing", "S1", "T1", 5.0e7),
        ("phosphorescence", "T1", "S0", 1.0e2),
        ("nonradiative-decay", "T1", "S0", 9.0e2),
    ]
    k = rate_matrix(states, processes)
    p0 = np.array([0.0, 0.0, 1.0, 0.0])
    times = [0.0, 1e-13, 1e-12, 1e-11, 1e-9, 5e-9, 2e-8, 1e-6, 1e-4, 1e-3, 5e-3]
    populations = [(scipy.linalg.expm(k * t) @ p0).tolist() for t in times]
    integrated = scipy.linalg.solve(-k[1:, 1:], p0[1:]).tolist()
    stiff_processes = [
        ("internal-conversion", "S2", "S1", 1.0e12),
        ("fluorescence", "S1", "S0", 1.0e8),
        ("internal-conversion", "S1", "S0", 5.0e7),
        ("intersystem-crossing", "S1", "T1", 5.0e7),
        ("intersystem-crossing", "T1", "S1", 1.0e3),
        ("phosphorescence", "T1", "S0", 1.0e2),
        ("intersystem-crossing", "T1", "S0", 9.0e2),
    ]
    ks = rate_matrix(states, stiff_processes)
    stiff_times = [1e-12, 1e-10, 1e-9, 2e-8, 1e-6, 1e-4, 1e-3, 5e-3, 2e-2]
    mpmath.mp.dps = 60
    truth = []
    for t in stiff_times:
        e = mpmath.expm(mpmath.matrix(ks.tolist()) * mpmath.mpf(t))
        truth.append([float(e[i, 2]) for i in range(4)])
    ivp = solve_ivp(lambda _t, y: ks @ y, (0, stiff_times[-1]), p0, method="Radau", t_eval=stiff_times, rtol=1e-13, atol=1e-30, jac=ks)
    json.dump(
        {
            "generator": "test/reference/photophysics/expm_reference.py",
            "scipyVersion": scipy.__version__,
            "numpyVersion": np.__version__,
            "generic": generic,
            "scheme": {
                "states": states,
                "processes": [{"kind": kd, "from": s, "to": d, "ratePerS": r} for kd, s, d, r in processes],
                "initialPopulation": {"S2": 1.0},
                "timesS": times,
                "populations": populations,
                "integratedExcitedPopulationsS": integrated,
            },
            "stiffScheme": {
                "states": states,
                "processes": [{"kind": kd, "from": s, "to": d, "ratePerS": r} for kd, s, d, r in stiff_processes],
                "initialPopulation": {"S2": 1.0},
                "timesS": stiff_times,
                "populationsMpmath60Digits": truth,
                "populationsScipyExpm": [(scipy.linalg.expm(ks * t) @ p0).tolist() for t in stiff_times],
                "populationsSolveIvpRadau": ivp.y.T.tolist(),
            },
        },
        sys.stdout,
        indent=1,
    )
    sys.stdout.write("\n")


if __name__ == "__main__":
    main()

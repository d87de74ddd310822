"""Benchmark of the elliptic Kepler solver beside scipy's vectorised Newton (the baseline).

Called by ``perifocal bench kepler``; scipy is needed only here (a test extra).
"""

from __future__ import annotations

import time
import warnings
from typing import Any

import numpy as np

from .anomaly import _cores, _elliptic_blocks, eccentric_anomaly, kepler_residual


def _best_of(fn: Any, repeats: int) -> tuple[float, Any]:
    best, out = float("inf"), None
    for _ in range(repeats):
        t0 = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t0)
    return best, out


def bench_kepler(n: int = 1_000_000, seed: int = 20301) -> dict[str, Any]:
    """1e6 solves, M ~ U[-pi, pi), e ~ U[0, 0.99), seeded; best of 5 (ours) and of 2 (scipy)."""
    rng = np.random.default_rng(seed)
    M = rng.uniform(-np.pi, np.pi, n)
    e = rng.uniform(0.0, 0.99, n)
    eccentric_anomaly(M[:1000], e[:1000])  # warm up
    t_ours, E = _best_of(lambda: eccentric_anomaly(M, e), 5)
    res_ours = float(kepler_residual(E, M, e).max())
    t_one, E1 = _best_of(lambda: _elliptic_blocks(M, e, 1e-13, threads=1), 5)
    rows = [(f"perifocal eccentric_anomaly (Markley + guard, {min(_cores(), 31)} threads)",
             t_ours * 1e3, "ms", f"max residual {res_ours:.1e} rad"),
            ("the same on one thread", t_one * 1e3, "ms",
             f"max residual {float(kepler_residual(E1, M, e).max()):.1e} rad")]
    verdicts = [f"target <= 40 ms at residual <= 1e-12: "
                f"{'met' if t_ours <= 0.04 and res_ours <= 1e-12 else 'NOT met'}"]
    try:
        from scipy.optimize import newton
    except ImportError:
        rows.append(("scipy.optimize.newton (baseline)", float("nan"), "ms", "scipy not installed"))
    else:
        def baseline() -> Any:
            with warnings.catch_warnings():  # it warns when some inputs do not converge
                warnings.simplefilter("ignore", RuntimeWarning)
                return newton(lambda x: x - e * np.sin(x) - M, M.copy(),
                              fprime=lambda x: 1.0 - e * np.cos(x), tol=1e-12, maxiter=50)

        t_base, Eb = _best_of(baseline, 2)
        with np.errstate(invalid="ignore", over="ignore"):
            res_b = kepler_residual(Eb, M, e)
        failed = int(np.count_nonzero(~(res_b <= 1e-12)))
        rows.append(("scipy.optimize.newton, tol 1e-12 (baseline)", t_base * 1e3, "ms",
                     f"{failed} of {n:,} not within 1e-12 rad after 50 steps"))
        rows.append(("speed-up over the baseline", t_base / t_ours, "x", "target >= 30x"))
        rows.append(("speed-up over the baseline, one thread", t_base / t_one, "x", ""))
        verdicts.append(f"speed-up >= 30x: {'met' if t_base / t_ours >= 30 else 'NOT met'}")
    return {"title": f"{n:,} elliptic Kepler solves, M ~ U[-pi, pi), e ~ U[0, 0.99), seed {seed}",
            "rows": rows, "verdicts": verdicts}

"""Roots of many decreasing functions at once (OAS and workout yields), without scipy.optimize.

The solve is element by element but vectorized: ``f(x, idx)`` gives the values at ``x`` of the
functions numbered ``idx`` (only the unsolved ones are asked), so one call prices every bond still
open. Method: grow the bracket geometrically until it holds a sign change, then the Illinois variant
of regula falsi (M. Dowell and P. Jarratt (1971), "A modified regula falsi method for computing the
root of an equation", BIT 11, 168-174): superlinear, and the root never leaves the bracket.
The command line avoids scipy.optimize for start-up time (importing it costs about half a second).
"""

from __future__ import annotations

import numpy as np


def decreasing_roots(f, lo, hi, *, xtol: float, xmin=-np.inf, xmax=np.inf, max_iter: int = 200) -> np.ndarray:
    """x with f_k(x) = 0 for each k, each f_k decreasing; NaN where no sign change is found in
    [xmin, xmax] or the search does not converge to within ``xtol`` in x."""
    lo, hi = np.array(lo, float), np.array(hi, float)
    n = len(lo)
    xmin, xmax = np.broadcast_to(np.asarray(xmin, float), (n,)), np.broadcast_to(np.asarray(xmax, float), (n,))
    idx = np.arange(n)
    f_lo, f_hi = f(lo, idx), f(hi, idx)
    for _ in range(64):                        # grow: f(lo) must be >= 0 and f(hi) <= 0
        down = (f_lo < 0) & (lo > xmin)
        up = (f_hi > 0) & (hi < xmax)
        if not (down.any() or up.any()):
            break
        width = hi - lo
        if down.any():
            d = np.flatnonzero(down)
            hi[d], f_hi[d] = lo[d], f_lo[d]
            lo[d] = np.maximum(lo[d] - 2 * width[d], xmin[d])
            f_lo[d] = f(lo[d], d)
        if up.any():
            u = np.flatnonzero(up)
            lo[u], f_lo[u] = hi[u], f_hi[u]
            hi[u] = np.minimum(hi[u] + 2 * width[u], xmax[u])
            f_hi[u] = f(hi[u], u)
    root = np.full(n, np.nan)
    ok = (f_lo >= 0) & (f_hi <= 0)
    exact = ok & ((f_lo == 0) | (f_hi == 0))
    root[exact] = np.where(f_lo[exact] == 0, lo[exact], hi[exact])
    open_ = np.flatnonzero(ok & ~exact)
    side = np.zeros(n, int)                    # which end was kept last time (Illinois halving)
    for _ in range(max_iter):
        if not len(open_):
            break
        a, b, fa, fb = lo[open_], hi[open_], f_lo[open_], f_hi[open_]
        x = np.clip(b - fb * (b - a) / (fb - fa), a, b)
        narrow = (b - a) <= 2 * xtol
        x = np.where(narrow | ~np.isfinite(x), 0.5 * (a + b), x)
        fx = f(x, open_)
        above = fx > 0
        lo[open_] = np.where(above, x, a)
        hi[open_] = np.where(above, b, x)
        # Illinois: an end kept twice in a row has its value halved
        keep_hi, keep_lo = above & (side[open_] == 1), ~above & (side[open_] == -1)
        f_lo[open_] = np.where(above, fx, np.where(keep_lo, 0.5 * fa, fa))
        f_hi[open_] = np.where(above, np.where(keep_hi, 0.5 * fb, fb), fx)
        side[open_] = np.where(above, 1, -1)
        done = (fx == 0) | (hi[open_] - lo[open_] <= xtol) | np.isnan(fx)
        root[open_[done]] = np.where(np.isnan(fx[done]), np.nan, x[done])
        open_ = open_[~done]
    return root

"""Gauss–Legendre and Gauss–Kronrod rules, and adaptive integration of many integrals at once.

The adaptive integrator works on a flat list of intervals, each belonging to one of many
integrals ("owners"), and refines only the intervals that have not converged, all owners in
the same numpy operations. A per-integral Python loop spends most of its time in the
interpreter; here the number of Python-level steps is the depth of the deepest refinement.

References
----------
M. Abramowitz and I. A. Stegun, *Handbook of Mathematical Functions*, §25.4.29 and Table 25.4
(Gauss–Legendre nodes and weights). R. Piessens, E. de Doncker-Kapenga, C. Überhuber and
D. Kahaner, *QUADPACK*, Springer 1983 (Gauss–Kronrod pairs and their error estimate).
P. J. Davis and P. Rabinowitz, *Methods of Numerical Integration*, 2nd ed., §6.2 (adaptive
subdivision).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from functools import lru_cache

import numpy as np
from numpy.typing import ArrayLike, NDArray

from outlinebench.errors import InvalidGeometryError, OptionError

__all__ = [
    "GAUSS_ORDER",
    "KRONROD_GAUSS_POINTS",
    "MAX_LIVE_FLOOR",
    "MAX_LIVE_PER_START",
    "MAX_ROUNDS",
    "MIN_TOLERANCE",
    "check_tolerance",
    "gauss_legendre",
    "gauss_kronrod",
    "integrate_intervals",
]

FloatArray = NDArray[np.float64]
IntArray = NDArray[np.intp]

# Default points of a plain Gauss–Legendre rule (exact for degree ≤ 31).
GAUSS_ORDER = 16

# Deepest refinement: 2⁻⁶⁰ of the first interval is far below float64 parameter resolution
# near 1, so this bound only stops pathological input; the error estimate then stays in the
# returned estimate.
MAX_ROUNDS = 60

# Smallest relative tolerance integrate_intervals works to: each interval's error estimate
# is at least 50 eps |K| (QUADPACK's floor, see integrate_intervals), so a tighter target
# could only be met by halving until intervals stop splitting.
MIN_TOLERANCE = 50.0 * np.finfo(np.float64).eps

# Most unfinished intervals carried into the next round, per starting interval (with a floor
# of MAX_LIVE_FLOOR): beyond it the unfinished intervals are accepted with their error
# estimates. Convergent integrands need a few dozen per integral at most; the bound keeps
# memory finite for integrands that never converge.
MAX_LIVE_PER_START = 64
MAX_LIVE_FLOOR = 2**16


@lru_cache(maxsize=16)
def _gauss_legendre_cached(order: int) -> tuple[FloatArray, FloatArray]:
    x, w = np.polynomial.legendre.leggauss(order)
    nodes = 0.5 * (x + 1.0)
    weights = 0.5 * w
    nodes.setflags(write=False)
    weights.setflags(write=False)
    return nodes, weights


def gauss_legendre(order: int = GAUSS_ORDER) -> tuple[FloatArray, FloatArray]:
    """Nodes and weights of the ``order``-point Gauss–Legendre rule on [0, 1].

    Parameters
    ----------
    order : int
        Number of nodes m ≥ 1.

    Returns
    -------
    (nodes, weights) : read-only ndarrays, shape (m,)
        Σ wᵢ f(xᵢ) = ∫₀¹ f(x) dx exactly for polynomials of degree ≤ 2m − 1.

    Notes
    -----
    The rule on [−1, 1] (roots of the Legendre polynomial P_m, numpy ``leggauss``, which
    matches A&S Table 25.4) mapped by x ↦ (x + 1)/2, weights halved.

    Examples
    --------
    >>> x, w = gauss_legendre(2)
    >>> round(float(w @ x**3), 15)  # exact up to rounding: ∫₀¹ x³ dx = 1/4
    0.25
    """
    if int(order) < 1:
        raise OptionError(f"Gauss–Legendre order must be at least 1, got {order}")
    return _gauss_legendre_cached(int(order))


KRONROD_GAUSS_POINTS = 10  # G10/K21, the pair of QUADPACK's QK21 (Piessens et al. 1983)


@lru_cache(maxsize=8)
def _gauss_kronrod_cached(n: int) -> tuple[FloatArray, FloatArray, FloatArray]:
    from numpy.polynomial import legendre as leg

    # Stieltjes polynomial E_{n+1} = P_{n+1} + Σ e_j P_j (j < n + 1, same parity), orthogonal
    # to x^k (k ≤ n) under the weight P_n; the integrals are exact with 60-point Gauss.
    xq, wq = leg.leggauss(60)
    pn = leg.legval(xq, [0] * n + [1])
    js = [j for j in range(n + 1) if j % 2 == (n + 1) % 2]
    # P_n E_{n+1} x^k has parity 2n + 1 + k, so only odd k give conditions.
    ks = list(range(1, n + 1, 2))
    unit = np.eye(n + 2)
    mat = np.array([[np.sum(wq * pn * leg.legval(xq, unit[j]) * xq**k) for j in js] for k in ks])
    rhs = -np.array([np.sum(wq * pn * leg.legval(xq, unit[n + 1]) * xq**k) for k in ks])
    e = np.linalg.solve(mat, rhs)
    coeffs = unit[n + 1].copy()
    coeffs[js] = e
    x_new = leg.legroots(coeffs).real
    x_gauss, w_gauss = leg.leggauss(n)
    x = np.sort(np.concatenate([x_new, x_gauss]))
    # Kronrod weights: exact for Legendre polynomials of degree ≤ 2n (then ≤ 3n + 1 follows).
    vander = np.array([leg.legval(x, unit2) for unit2 in np.eye(2 * n + 1)])
    rhs_w = np.zeros(2 * n + 1)
    rhs_w[0] = 2.0
    w_k = np.linalg.solve(vander, rhs_w)
    w_g = np.zeros_like(x)
    for xi, wi in zip(x_gauss, w_gauss, strict=True):
        w_g[np.argmin(np.abs(x - xi))] = wi
    nodes, wk, wg = 0.5 * (x + 1.0), 0.5 * w_k, 0.5 * w_g
    for arr in (nodes, wk, wg):
        arr.setflags(write=False)
    return nodes, wk, wg


def gauss_kronrod(n: int = KRONROD_GAUSS_POINTS) -> tuple[FloatArray, FloatArray, FloatArray]:
    """Gauss–Kronrod pair on [0, 1]: 2n + 1 nodes, Kronrod weights, embedded Gauss weights.

    Parameters
    ----------
    n : int
        Points of the embedded Gauss–Legendre rule (n ≥ 1).

    Returns
    -------
    (nodes, kronrod_weights, gauss_weights) : read-only ndarrays, shape (2n + 1,)
        The Gauss weights are 0 at the n + 1 Kronrod-only nodes. The Kronrod rule is exact
        for degree ≤ 3n + 1, the Gauss rule for degree ≤ 2n − 1.

    Notes
    -----
    The n + 1 added nodes are the roots of the Stieltjes polynomial E_{n+1}, orthogonal to all
    polynomials of degree ≤ n under the sign-changing weight P_n (Kronrod 1965; Laurie,
    "Calculation of Gauss–Kronrod quadrature rules", Math. Comp. 66, 1997). Here E_{n+1} is
    found in the Legendre basis by a small linear system, its roots by ``legroots``, and the
    weights by making the rule exact for P_0 … P_2n. For n = 10 the nodes and weights agree
    with QUADPACK's QK21 table to ~1e-16 and ~2e-16 (Piessens et al., *QUADPACK*, 1983).
    """
    if int(n) < 1:
        raise OptionError(f"Gauss–Kronrod needs at least 1 Gauss point, got {n}")
    return _gauss_kronrod_cached(int(n))


def check_tolerance(tolerance: float, what: str = "tolerance") -> float:
    """``tolerance`` as a float, raised to :data:`MIN_TOLERANCE`.

    Raises
    ------
    InvalidGeometryError
        ``tolerance`` is not a finite number above 0.
    """
    try:
        value = float(tolerance)
    except (TypeError, ValueError):
        raise InvalidGeometryError(f"{what} must be a number, got {tolerance!r}") from None
    if not (math.isfinite(value) and value > 0.0):
        raise InvalidGeometryError(f"{what} must be a finite number above 0, got {tolerance!r}")
    return max(value, MIN_TOLERANCE)


def integrate_intervals(
    f: Callable[[IntArray, FloatArray], FloatArray],
    owners: ArrayLike,
    a: ArrayLike,
    b: ArrayLike,
    n_owners: int,
    *,
    tolerance: float,
    order: int = KRONROD_GAUSS_POINTS,
    max_rounds: int = MAX_ROUNDS,
) -> tuple[FloatArray, FloatArray]:
    """Integrate many functions at once by adaptive Gauss–Kronrod quadrature.

    Parameters
    ----------
    f : callable ``f(owners, t) -> values``
        ``owners`` has shape (N,), ``t`` shape (N, m); returns the integrand of integral
        ``owners[i]`` at the points ``t[i]``, shape (N, m). Must be vectorised.
    owners : array_like of int, shape (N,)
        Which integral (0 … n_owners − 1) each starting interval belongs to. An integral may
        start with several intervals (break points at known trouble spots).
    a, b : array_like, shape (N,)
        Interval ends.
    n_owners : int
        Number of integrals.
    tolerance : float
        Target relative error of each integral: an interval is accepted when its error
        estimate is at most ``tolerance`` times the current estimate of its integral's
        absolute value. Values below :data:`MIN_TOLERANCE` are raised to it.
    order : int
        Points n of the embedded Gauss–Legendre rule; each interval costs 2n + 1 values.
    max_rounds : int
        Deepest refinement; intervals still unconverged then are accepted with their
        estimates added to the returned errors. The same happens when more than
        max(:data:`MAX_LIVE_FLOOR`, :data:`MAX_LIVE_PER_START` · N) intervals would be
        carried into the next round.

    Returns
    -------
    (values, errors) : ndarrays, shape (n_owners,)
        The integrals and their estimated absolute errors. An integrand value that is not
        finite (NaN or infinite input) makes its interval finished at once, so the integral
        comes out not finite instead of refining forever.

    Raises
    ------
    InvalidGeometryError
        ``tolerance`` is not a finite number above 0.

    Notes
    -----
    Each interval gets the (2n+1)-point Kronrod value K and the embedded n-point
    Gauss–Legendre value G from the same integrand values. The error estimate is QUADPACK's
    (Piessens et al. 1983, routine QK21): with I_asc = ∫|f − K/(b − a)| by the Kronrod rule,
    err = I_asc · min(1, (200 |K − G| / I_asc)^{3/2}), and at least 50 eps |K|. The power 3/2
    reflects that K converges much faster than G (for an integrand analytic in a Bernstein
    ellipse ρ, |G − I| ~ ρ^{−2n} and |K − I| ~ ρ^{−3n}). Intervals whose estimate exceeds
    their share are halved; all unconverged intervals of all integrals go through the same
    numpy operations in each round, so the number of Python-level steps is the depth of
    the deepest refinement, not the number of integrals. The estimate is a target, not a
    guaranteed bound: structure narrower than the node spacing can hide from it, which is
    why callers put break points at known trouble spots (Davis & Rabinowitz §6.2).
    """
    tolerance = check_tolerance(tolerance)
    nodes, wk, wg = gauss_kronrod(order)
    weights = np.stack([wk, wg], axis=1)
    owners = np.asarray(owners, dtype=np.intp)
    a = np.asarray(a, dtype=np.float64)
    b = np.asarray(b, dtype=np.float64)
    done = np.zeros(n_owners)
    errors = np.zeros(n_owners)
    eps = np.finfo(np.float64).eps
    max_live = max(MAX_LIVE_FLOOR, MAX_LIVE_PER_START * owners.size)
    for round_ in range(max_rounds):
        if owners.size == 0:
            break
        h = b - a
        fv = f(owners, a[:, None] + h[:, None] * nodes[None, :])
        # einsum, not BLAS gemv: for these tall, thin products it is several times faster
        # and does not start threads.
        kg = np.einsum("ij,jk->ik", fv, weights)
        mean = kg[:, 0]  # the Kronrod mean value of f over the interval
        k = mean * h
        g = kg[:, 1] * h
        fv -= mean[:, None]
        np.abs(fv, out=fv)
        resasc = np.einsum("ij,j->i", fv, wk) * np.abs(h)
        diff = np.abs(k - g)
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            ratio = np.where(resasc > 0.0, 200.0 * diff / np.where(resasc > 0.0, resasc, 1.0), 0.0)
            err = np.where(resasc > 0.0, resasc * np.minimum(1.0, ratio**1.5), diff)
        err = np.maximum(err, 50.0 * eps * np.abs(k))
        total = done + np.bincount(owners, weights=k, minlength=n_owners)
        mid = 0.5 * (a + b)
        ok = (err <= tolerance * np.abs(total)[owners]) | (mid <= a) | (mid >= b)
        ok |= ~(np.isfinite(k) & np.isfinite(err) & np.isfinite(total)[owners])
        if round_ == max_rounds - 1 or 2 * int(np.count_nonzero(~ok)) > max_live:
            ok[:] = True
        if ok.any():
            done += np.bincount(owners[ok], weights=k[ok], minlength=n_owners)
            errors += np.bincount(owners[ok], weights=err[ok], minlength=n_owners)
        bad = ~ok
        owners = np.concatenate([owners[bad], owners[bad]])
        a, b = np.concatenate([a[bad], mid[bad]]), np.concatenate([mid[bad], b[bad]])
    return done, errors

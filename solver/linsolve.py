"""Linear solves: a sparse LU for small systems, AMG-preconditioned BiCGStab for large.

The Shortley-Weller rows make the matrix slightly non-symmetric (an M-matrix), so the
Krylov method is BiCGStab, preconditioned by one V-cycle of classical (Ruge-Stuben)
algebraic multigrid from pyamg.  Set-up is separate from solving: ``prepare`` builds
the factorisation or the hierarchy once; ``Prepared.solve`` then takes any number of
right-hand sides (the unit solves of a capacitance matrix, a voltage-only change), and
accepts a starting guess (the previous potential, while dragging).

Convergence is to a relative residual :math:`\\|b - Ax\\| \\le 10^{-8}\\,\\|b\\|`; a
looser tolerance leaves the surface field visibly wrong.
"""

from __future__ import annotations

import functools
import logging
import threading
from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any, TypeVar

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla

log = logging.getLogger(__name__)

DIRECT_LIMIT = 600_000
"""Systems with fewer unknowns are factorised (SuperLU).  Measured here: 400k unknowns
factorise in 2.6-7 s with about 2 kB per unknown, while classical AMG on the same
board layout (a thin dielectric, cut distances down to 1e-3 of a cell) took 26 s; AMG
wins only on the largest grids (see the benchmark)."""
FALLBACK_DIRECT_LIMIT = 1_500_000
"""Up to this size a stalled AMG solve is finished by factorisation (memory permitting)."""
RTOL = 1e-8
SCALED_FACTOR = 1e-2
"""The scaled system is iterated to 1/100 of RTOL: two more BiCGStab steps that bring
multigrid to agree with the direct solve to about 1e-7 of the applied voltage."""


F = TypeVar("F", bound=Callable[..., Any])


def single_threaded_blas(fn: F) -> F:
    """Run ``fn`` with one BLAS thread.

    The solver's vector operations are small and many; a threaded BLAS spends far more
    time waking and syncing threads than computing (a 22k-element dot product took 6 ms
    with two threads on a busy 2-core machine, 4 microseconds with one).
    """

    @functools.wraps(fn)
    def wrapper(*args: Any, **kwargs: Any) -> Any:
        if getattr(_limited, "active", False):
            return fn(*args, **kwargs)  # an outer call has limited the threads already
        from threadpoolctl import threadpool_limits

        _limited.active = True
        try:
            with threadpool_limits(limits=1, user_api="blas"):
                return fn(*args, **kwargs)
        finally:
            _limited.active = False

    return wrapper  # type: ignore[return-value]


_limited = threading.local()


@dataclass
class SolveInfo:
    """What one solve did: method, iterations, final relative residual."""

    method: str
    iterations: int
    residual: float
    converged: bool
    history: list[float] = field(default_factory=list)


@dataclass(frozen=True)
class Prepared:
    """A matrix ready to solve with: its LU factors or its multigrid hierarchy.

    The multigrid path works on the symmetrically scaled system
    :math:`\tilde A = D^{-1/2} A D^{-1/2}`, :math:`D = \\operatorname{diag} A`: rows of
    nodes a tiny cut distance from an outline carry coefficients up to :math:`10^3`
    times the others, and an unscaled residual norm is dominated by them (it stopped
    BiCGStab while the rest of the grid was still 1e-3 off).  Convergence is judged on
    the scaled residual; the returned residual is that of the original system.
    """

    A: sp.csr_matrix
    method: str
    factor: Any
    scale: np.ndarray | None = None

    @single_threaded_blas
    def solve(self, b: np.ndarray, x0: np.ndarray | None = None,
              rtol: float = RTOL) -> tuple[np.ndarray, SolveInfo]:
        """Solve :math:`A x = b`; returns x and a :class:`SolveInfo`."""
        bnorm = _norm(b)
        if bnorm == 0.0:
            return np.zeros_like(b), SolveInfo(self.method, 0, 0.0, True)
        if self.method == "direct":
            x = self.factor.solve(b)
            res = _norm(b - self.A @ x) / bnorm
            return x, SolveInfo("direct", 1, res, res < 1e-6)
        d = self.scale
        bs = d * b
        xs0 = None if x0 is None else x0 / d
        history: list[float] = []
        xs = self.factor.solve(bs, x0=xs0, tol=rtol * SCALED_FACTOR, maxiter=400,
                               accel="bicgstab", residuals=history)
        sres = _norm(bs - self.factor.levels[0].A @ xs) / _norm(bs)
        if sres > rtol * 10:
            # one restart from the current iterate usually finishes a stalled BiCGStab
            more: list[float] = []
            xs = self.factor.solve(bs, x0=xs, tol=rtol, maxiter=400, accel="gmres",
                                   residuals=more)
            history += more
            sres = _norm(bs - self.factor.levels[0].A @ xs) / _norm(bs)
        x = d * xs
        res = _norm(b - self.A @ x) / bnorm
        ok = sres <= rtol * 10
        if not ok and self.A.shape[0] <= FALLBACK_DIRECT_LIMIT:
            log.warning("AMG stalled at scaled residual %.2e; factorising instead", sres)
            x = spla.splu(self.A.tocsc(), permc_spec="COLAMD").solve(b)
            res = _norm(b - self.A @ x) / bnorm
            return x, SolveInfo("direct after amg", len(history), res, res < 1e-6, history)
        if not ok:
            log.warning("AMG solve stopped at scaled residual %.2e", sres)
        return x, SolveInfo("amg", len(history), res, ok, history)


def _norm(v: np.ndarray) -> float:
    return float(np.sqrt(np.dot(v, v)))


@single_threaded_blas
def prepare(A: sp.csr_matrix, method: str | None = None) -> Prepared:
    """Factorise (small) or build an AMG hierarchy (large) for ``A``."""
    n = A.shape[0]
    if method is None:
        method = "direct" if n <= DIRECT_LIMIT else "amg"
    if method == "direct":
        return Prepared(A, "direct", spla.splu(A.tocsc(), permc_spec="COLAMD"))
    import pyamg

    d = 1.0 / np.sqrt(A.diagonal())
    As = sp.csr_matrix(A.multiply(d[:, None]).multiply(d[None, :]))
    ml = pyamg.ruge_stuben_solver(As, strength=("classical", {"theta": 0.25}),
                                  max_coarse=1000, coarse_solver="splu")
    return Prepared(A, "amg", ml, d)

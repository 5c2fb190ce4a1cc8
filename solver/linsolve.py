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
from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any, TypeVar

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla

log = logging.getLogger(__name__)

DIRECT_LIMIT = 250_000
"""Systems with fewer unknowns are factorised (SuperLU: 5-7 s and about 1.2 kB per
unknown at 400k, measured); larger ones use AMG, which on these strongly graded grids
needs over 100 BiCGStab iterations (see the benchmark)."""
FALLBACK_DIRECT_LIMIT = 1_500_000
"""Up to this size a stalled AMG solve is finished by factorisation (memory permitting)."""
RTOL = 1e-8


F = TypeVar("F", bound=Callable[..., Any])


def single_threaded_blas(fn: F) -> F:
    """Run ``fn`` with one BLAS thread.

    The solver's vector operations are small and many; a threaded BLAS spends far more
    time waking and syncing threads than computing (a 22k-element dot product took 6 ms
    with two threads on a busy 2-core machine, 4 microseconds with one).
    """

    @functools.wraps(fn)
    def wrapper(*args: Any, **kwargs: Any) -> Any:
        from threadpoolctl import threadpool_limits

        with threadpool_limits(limits=1, user_api="blas"):
            return fn(*args, **kwargs)

    return wrapper  # type: ignore[return-value]


class SolveError(RuntimeError):
    """The iterative solve did not reach its tolerance."""


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
    """A matrix ready to solve with: its LU factors or its multigrid hierarchy."""

    A: sp.csr_matrix
    method: str
    factor: Any

    def solve(self, b: np.ndarray, x0: np.ndarray | None = None,
              rtol: float = RTOL) -> tuple[np.ndarray, SolveInfo]:
        """Solve :math:`A x = b`; returns x and a :class:`SolveInfo`."""
        bnorm = float(np.linalg.norm(b))
        if bnorm == 0.0:
            return np.zeros_like(b), SolveInfo(self.method, 0, 0.0, True)
        if self.method == "direct":
            x = self.factor.solve(b)
            res = float(np.linalg.norm(b - self.A @ x)) / bnorm
            return x, SolveInfo("direct", 1, res, res < 1e-6)
        history: list[float] = []
        x = self.factor.solve(b, x0=x0, tol=rtol, maxiter=400, accel="bicgstab",
                              residuals=history)
        res = float(np.linalg.norm(b - self.A @ x)) / bnorm
        if res > rtol * 10:
            # one restart from the current iterate usually finishes a stalled BiCGStab
            more: list[float] = []
            x = self.factor.solve(b, x0=x, tol=rtol, maxiter=400, accel="gmres",
                                  residuals=more)
            history += more
            res = float(np.linalg.norm(b - self.A @ x)) / bnorm
        ok = res <= rtol * 10
        if not ok and self.A.shape[0] <= FALLBACK_DIRECT_LIMIT:
            log.warning("AMG stalled at relative residual %.2e; factorising instead", res)
            x = spla.splu(self.A.tocsc(), permc_spec="COLAMD").solve(b)
            res = float(np.linalg.norm(b - self.A @ x)) / bnorm
            return x, SolveInfo("direct after amg", len(history), res, res < 1e-6, history)
        if not ok:
            log.warning("AMG solve stopped at relative residual %.2e", res)
        return x, SolveInfo("amg", len(history), res, ok, history)


def prepare(A: sp.csr_matrix, method: str | None = None) -> Prepared:
    """Factorise (small) or build an AMG hierarchy (large) for ``A``."""
    n = A.shape[0]
    if method is None:
        method = "direct" if n <= DIRECT_LIMIT else "amg"
    if method == "direct":
        return Prepared(A, "direct", spla.splu(A.tocsc(), permc_spec="COLAMD"))
    import pyamg

    ml = pyamg.ruge_stuben_solver(A.tocsr(), strength=("classical", {"theta": 0.25}),
                                  max_coarse=500)
    return Prepared(A, "amg", ml)

"""A sparse mixed-integer program assembled row by row, and one HiGHS call to solve it.

Every model of the rebalancer is a :class:`Model`: typed variable blocks,
sparse rows ``lo ≤ Σ a·x ≤ hi``, solved by HiGHS through
:func:`scipy.optimize.milp` [1]. The constraint builders (the electrical
part, the slot geometry, the bounds on RMS currents) each add their own
variables and rows, so a model is composed of independent blocks.

scipy is imported only inside :meth:`Model.solve`: the command line and the
user interface load this package without loading the optimiser.

HiGHS runs with its log off (``disp=False``); the native library can still
print a stray line outside Python's control, so callers send the process's
standard output elsewhere while it runs (:mod:`tri.native_output`).

References
----------
1. Q. Huangfu, J. A. J. Hall, "Parallelizing the dual revised simplex
   method", *Math. Prog. Comp.* 10 (2018) 119-142 (HiGHS).
"""

from __future__ import annotations

import os
import warnings
from dataclasses import dataclass
from typing import Literal

import numpy as np

#: HiGHS options (passed through by scipy) that turn its primal heuristics off [-].
NO_HEURISTICS = {
    "mip_heuristic_effort": 0.0,
    "mip_heuristic_run_feasibility_jump": False,
    "mip_heuristic_run_rins": False,
    "mip_heuristic_run_rens": False,
    "mip_heuristic_run_root_reduced_cost": False,
    "mip_heuristic_run_zi_round": False,
    "mip_heuristic_run_shifting": False,
}

SolveStatus = Literal["optimal", "infeasible", "limit", "error"]


@dataclass(frozen=True)
class Solution:
    """What one HiGHS call returned.

    Attributes
    ----------
    status : {"optimal", "infeasible", "limit", "error"}
        ``optimal``: the model's optimum (to the gap asked); ``infeasible``:
        proven to have no solution; ``limit``: stopped by the time limit
        (``x`` may still hold a solution); ``error``: anything else.
    x : float ndarray or None
        Values of the variables.
    objective : float or None
        Objective at ``x``.
    dual_bound : float or None
        Proven lower bound on the model's optimum (minimisation).
    message : str
        HiGHS's words.
    """

    status: SolveStatus
    x: np.ndarray | None
    objective: float | None
    dual_bound: float | None
    message: str

    def lower_bound(self) -> float | None:
        """The best proven lower bound on the model's optimum, or None."""
        if self.status == "optimal" and self.dual_bound is None:
            return self.objective
        if self.status in ("optimal", "limit"):
            return self.dual_bound
        return None


class Model:
    """Typed variables and sparse rows, assembled for one HiGHS call."""

    def __init__(self) -> None:
        self.lb: list[np.ndarray] = []
        self.ub: list[np.ndarray] = []
        self.integer: list[np.ndarray] = []
        self.n = 0
        self.rows: list[np.ndarray] = []
        self.cols: list[np.ndarray] = []
        self.vals: list[np.ndarray] = []
        self.row_lo: list[np.ndarray] = []
        self.row_hi: list[np.ndarray] = []
        self.n_rows = 0

    def var(self, count: int, lb=0.0, ub=np.inf, integer: bool = False) -> int:
        """Add ``count`` variables; returns the first column."""
        start = self.n
        self.lb.append(np.broadcast_to(np.asarray(lb, dtype=float), (count,)).copy())
        self.ub.append(np.broadcast_to(np.asarray(ub, dtype=float), (count,)).copy())
        self.integer.append(np.full(count, 1 if integer else 0, dtype=np.uint8))
        self.n += count
        return start

    def binary(self, count: int) -> int:
        """Add ``count`` 0/1 variables; returns the first column."""
        return self.var(count, 0.0, 1.0, integer=True)

    def row(self, cols, vals, lo: float, hi: float) -> None:
        """Add ``lo ≤ Σ vals·x[cols] ≤ hi``."""
        cols = np.asarray(cols, dtype=np.int64).ravel()
        self.rows.append(np.full(cols.size, self.n_rows, dtype=np.int64))
        self.cols.append(cols)
        self.vals.append(np.broadcast_to(np.asarray(vals, dtype=float), cols.shape).ravel())
        self.row_lo.append(np.array([lo], dtype=float))
        self.row_hi.append(np.array([hi], dtype=float))
        self.n_rows += 1

    def block(self, cols, vals, lo, hi) -> None:
        """Rows of equal length at once: ``cols`` and ``vals`` of shape (rows, k)."""
        cols = np.atleast_2d(np.asarray(cols, dtype=np.int64))
        vals = np.broadcast_to(np.asarray(vals, dtype=float), cols.shape)
        k = cols.shape[0]
        if k == 0:
            return
        self.rows.append(np.repeat(np.arange(self.n_rows, self.n_rows + k), cols.shape[1]))
        self.cols.append(cols.ravel())
        self.vals.append(np.ascontiguousarray(vals).ravel())
        self.row_lo.append(np.broadcast_to(np.asarray(lo, dtype=float), (k,)).copy())
        self.row_hi.append(np.broadcast_to(np.asarray(hi, dtype=float), (k,)).copy())
        self.n_rows += k

    def fix(self, cols, values) -> None:
        """Fix variables ``cols`` to ``values`` (both bounds)."""
        lb, ub = np.concatenate(self.lb), np.concatenate(self.ub)
        lb[np.asarray(cols)] = values
        ub[np.asarray(cols)] = values
        self.lb, self.ub = [lb], [ub]

    def solve(
        self,
        cost: np.ndarray,
        time_limit: float,
        *,
        gap: float = 1e-6,
        presolve: bool = True,
        heuristics: bool = True,
    ) -> Solution:
        """Minimise ``cost·x`` with HiGHS (module notes).

        Parameters
        ----------
        cost : float ndarray, shape (n,)
        time_limit : float
            [s].
        gap : float
            Relative MIP gap at which HiGHS stops [-].
        presolve : bool
        heuristics : bool
            False turns HiGHS's primal heuristics off (a call meant as a proof).
        """
        from scipy.optimize import Bounds, LinearConstraint, milp
        from scipy.sparse import coo_matrix

        if self.rows:
            a = coo_matrix(
                (
                    np.concatenate(self.vals),
                    (np.concatenate(self.rows), np.concatenate(self.cols)),
                ),
                shape=(self.n_rows, self.n),
            ).tocsr()
            constraints = [
                LinearConstraint(a, np.concatenate(self.row_lo), np.concatenate(self.row_hi))
            ]
        else:
            constraints = []
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            res = milp(
                cost,
                integrality=np.concatenate(self.integer),
                bounds=Bounds(np.concatenate(self.lb), np.concatenate(self.ub)),
                constraints=constraints,
                options={
                    # TRI_HIGHS_LOG=1 shows HiGHS's log (for developers; it goes to stdout)
                    "disp": bool(os.environ.get("TRI_HIGHS_LOG")),
                    "time_limit": max(0.01, float(time_limit)),
                    "mip_rel_gap": gap,
                    "presolve": presolve,
                    **({} if heuristics else NO_HEURISTICS),
                },
            )
        return _solution(res)


def _solution(res) -> Solution:
    message = str(getattr(res, "message", ""))
    x = None if res.x is None else np.asarray(res.x)
    fun = None if res.fun is None or x is None else float(res.fun)
    db = getattr(res, "mip_dual_bound", None)
    dual = float(db) if db is not None and np.isfinite(db) else None
    if res.status == 0:
        status: SolveStatus = "optimal"
    elif res.status == 2 and "nfeasible" in message:
        status = "infeasible"
    elif res.status == 1:
        status = "limit"
    else:
        status = "error"
    return Solution(status, x, fun, dual, message)

"""The arrays of a solved tree: each node's spectra and the solution (:mod:`tri.engine.tree`)."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


@dataclass(frozen=True, eq=False)
class Spectra:
    """Line, neutral and sizing (continuous-weighted) spectra of N nodes.

    Attributes
    ----------
    phase : complex ndarray, shape (N, 3, H)
        Line currents, the fundamental first [A].
    neutral : complex ndarray, shape (N, H)
        Neutral current [A].
    design : complex ndarray, shape (N, 3, H)
        Line currents with continuous loads at the continuous factor [A].
    """

    phase: np.ndarray
    neutral: np.ndarray
    design: np.ndarray


@dataclass(frozen=True, eq=False)
class TreeSolution:
    """The solved tree as arrays over its N nodes.

    Attributes
    ----------
    orders : int ndarray, shape (H,)
        Orders, the fundamental first.
    own : Spectra
        Each node's own circuits only (kept so that a changed node can be
        rolled up again without recomputing the others).
    total : Spectra
        Own circuits plus everything fed from the node, in its own frame.
    fed : Spectra
        What each node draws from its parent's feeder circuit, in the
        parent's frame (zero for the root).
    v_phase : complex ndarray, shape (N, 3)
        Panel phase-to-neutral voltages, each in its own frame [V].
    circuit_current_a, circuit_rms_a : float ndarray, shape (N, n_max)
        Per circuit row [A]; a feeder row carries the largest of its three
        line currents.
    phase_va : float ndarray, shape (N, 3)
        Schedule VA per phase, children included [VA]: a child without a
        transformer adds its own phase VA phase by phase; through a
        transformer its total VA is shared among the primary phases in
        proportion to their fundamental currents (a bookkeeping convention).
    total_va, nonlinear_va : float ndarray, shape (N,)
        Placed connected VA and its non-linear part, children included [VA].
    three_pole_triplens : bool ndarray, shape (N,)
        A 3-pole circuit's triplens were removed somewhere in the subtree.
    scale : float ndarray, shape (N,)
        Sum of circuit RMS currents of the subtree [A] (round-off scale).
    unplaced_count : int ndarray, shape (N,)
        The node's own unplaced circuits with a load.
    delta_circulating_a : float ndarray, shape (N,)
        RMS current circulating in a delta primary feeding the node [A]
        (0 without one).
    breaker_pole_spectrum : complex ndarray, shape (N, nb, 3, H), or None
        Line current of each breaker of each node on each phase [A]
        (:func:`tri.engine.legs.breaker_pole_spectra`, the node's own rows;
        a feeder row's breaker carries what its child draws); None unless
        some node numbers its breakers.
    shared_neutral_spectrum : complex ndarray, shape (N, G, H), or None
        Current in each shared neutral of each node [A]; None unless some
        node has one.
    iterations : int
        Sweeps of the iterated solution (0 when not iterated).
    converged : bool
        False if the iteration stopped at its limit.
    """

    orders: np.ndarray
    own: Spectra
    total: Spectra
    fed: Spectra
    v_phase: np.ndarray
    circuit_current_a: np.ndarray
    circuit_rms_a: np.ndarray
    phase_va: np.ndarray
    total_va: np.ndarray
    nonlinear_va: np.ndarray
    three_pole_triplens: np.ndarray
    scale: np.ndarray
    unplaced_count: np.ndarray
    delta_circulating_a: np.ndarray
    iterations: int
    converged: bool
    breaker_pole_spectrum: np.ndarray | None = None
    shared_neutral_spectrum: np.ndarray | None = None

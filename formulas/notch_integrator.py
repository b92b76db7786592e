r"""One notch of a DC motor start, integrated fast: a Rosenbrock method on plain floats.

The armature circuit and the shaft on one notch obey [1]_

.. math::

    L\,\frac{di}{dt} = V' - R\,i - k\Phi(i)\,n, \qquad
    \frac{dn}{dt} = \frac{60}{2\pi}\,\frac{T(i) - T_L(n)}{J}, \qquad
    T(i) = \frac{60}{2\pi}\,k\Phi(i)\,i

(:math:`V'` the supply less the brush drop, :math:`n` in rpm). The system has
two states and is mildly stiff (the electrical time constant is tens of
milliseconds against seconds for the shaft), so it is integrated with RODAS3,
the four-stage, third-order, stiffly accurate and L-stable Rosenbrock method of
Sandu et al. [2]_ (its embedded second-order solution gives the error
estimate), in the form of Hairer and Wanner [3]_ (sec. IV.7, Eq. 7.4'), with
the exact 2 x 2 Jacobian. The linear system of each stage, with the matrix
:math:`I/(h\gamma) - J`, is solved by its closed-form inverse. The step loop,
the right-hand side and the event location work on floats, tuples and the
curve's and load's float arrays only, and are compiled to machine code where
numba is installed (:mod:`notchwise.formulas.compiled`); the braking stop
(:mod:`notchwise.formulas.braking`) integrates its loop with the same step,
right-hand side and helpers (:func:`circuit_system` with a braking mode).

The flux characteristic is a piecewise cubic, the shape-preserving
interpolant of the magnetization curve (:class:`FluxCurve`, built once from the
breakpoints and coefficients of ``scipy.interpolate.PchipInterpolator``), and
is evaluated with its derivative by bisection and Horner's rule
(:func:`piecewise_cubic`).

Between accepted steps the solution is the cubic Hermite interpolant of the
end states and slopes [3]_ (sec. II.6, dense output); events (the current
falling to the cut-out value, a peak of current, the shaft coming to rest, the
speed settling) are located on it, and the integrals :math:`\int i\,dt`,
:math:`\int i^2\,dt` and the load work :math:`\int T_L\,\omega\,dt` are
accumulated from it step by step (exactly for :math:`i` and :math:`i^2`, the
load work by three-point Gauss-Legendre quadrature [4]_ where the load depends
on speed).

References
----------
.. [1] A. E. Fitzgerald, C. Kingsley Jr., S. D. Umans, *Electric Machinery*,
   6th ed., McGraw-Hill, 2003, sec. 7.9, Eqs. 7.37-7.40.
.. [2] A. Sandu, J. G. Verwer, J. G. Blom, E. J. Spee, G. R. Carmichael,
   F. A. Potra, "Benchmarking stiff ODE solvers for atmospheric chemistry
   problems II: Rosenbrock solvers," *Atmospheric Environment*, vol. 31,
   no. 20, pp. 3459-3472, 1997 (method RODAS3: gamma = 1/2; coefficients
   a31 = a41 = 2, a43 = 1, c21 = 4, c31 = c41 = 1, c32 = c42 = -1,
   c43 = -8/3, m = (2, 0, 1, 1), error weights e = (0, 0, 0, 1)).
.. [3] E. Hairer and G. Wanner, *Solving Ordinary Differential Equations II:
   Stiff and Differential-Algebraic Problems*, 2nd ed., Springer, 1996,
   sec. IV.7 (Rosenbrock methods, Eq. 7.4' and the step-size control of
   sec. IV.8); E. Hairer, S. P. Norsett and G. Wanner, *Solving Ordinary
   Differential Equations I*, 2nd ed., Springer, 1993, sec. II.6 (Hermite
   dense output).
.. [4] M. Abramowitz and I. A. Stegun, *Handbook of Mathematical Functions*,
   Dover, 1965, Eq. 25.4.29 and Table 25.4 (Gauss-Legendre nodes and weights).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from scipy.interpolate import PchipInterpolator

from .compiled import compiled
from .machines import NM_PER_V_A_PER_RPM, RAD_S_PER_RPM
from .start_load import LoadTorque, load_and_slope
from .errors import InputError, as_float_array, quantity, require_count, require_non_negative, require_positive

__all__ = [
    "FluxCurve",
    "flux_curve",
    "constant_flux",
    "motor_flux",
    "load_table",
    "NotchRun",
    "integrate_notch",
    "integrate_notch_unchecked",
    "cubic_pieces",
    "cubic_evaluator",
    "piecewise_cubic",
    "DRIVE",
    "DYNAMIC_BRAKE",
    "PLUG",
    "circuit_system",
    "derivatives",
    "rosenbrock_step",
    "step_factor",
    "hermite_cubic",
    "cubic_at",
    "cubic_root",
    "turning_point",
    "cubic_integrals",
    "checked_rtol",
    "STATUSES",
]

#: Why an integration stopped: the normal ends, then the ends a caller must report.
STATUSES = ("cut", "settled", "rest", "time", "step cap", "curve end")
_CUT, _SETTLED, _REST, _TIME, _STEP_CAP, _CURVE_END = range(6)
#: The compiled loop's code for a step size that fell below its floor (reported as "step cap"). [-]
_TINY_STEP = 6
_C1 = NM_PER_V_A_PER_RPM
#: Three-point Gauss-Legendre nodes on [0, 1] and weights (Eq. 25.4.29 of [4]).
_GAUSS_NODES = (0.5 - math.sqrt(15.0) / 10.0, 0.5, 0.5 + math.sqrt(15.0) / 10.0)
_GAUSS_WEIGHTS = (5.0 / 18.0, 8.0 / 18.0, 5.0 / 18.0)
#: The circuit a loop integrates (:func:`circuit_system`): a start drives the shaft; dynamic braking (the
#: armature on its resistor, the current not reversing through the brushes) and plugging brake it. [-]
DRIVE, DYNAMIC_BRAKE, PLUG = 0, 1, 2
#: Step-size controller: safety factor and the bounds of one change (sec. IV.8 of [3]).
_SAFETY, _GROW, _SHRINK = 0.9, 5.0, 0.2
#: Least swing of the current the error is weighed against, as a fraction of the starting current (chosen by
#: measurement against LSODA at rtol 1e-10 in tests/test_notch_integrator.py). [-]
_SWING_FLOOR = 0.01


@dataclass(frozen=True)
class FluxCurve:
    r"""Back-EMF per rpm against armature current as a piecewise cubic.

    :math:`k\Phi(i) = P(x_0 + g\,i)`, with :math:`P` a cubic on each interval
    of ``breaks`` and :math:`x_0 + g i` the field excitation. Below zero
    excitation the flux is held at its value there; above the last break the
    last cubic is continued for the solver's trial stages only, and an
    accepted state beyond it ends the integration (status "curve end").

    Attributes
    ----------
    breaks : tuple of float
        Excitations bounding the intervals, strictly rising. [A]
    coefficients : tuple of tuple
        Per interval, the four power-basis coefficients of :math:`P` in
        the excitation measured from the interval's start, highest power
        first, already divided by the curve's speed. [V/rpm/A^k]
    offset_a : float
        Excitation at zero armature current (shunt ampere-turns of a compound
        motor; zero for a series motor). [A]
    gain : float
        Excitation per ampere of armature current (series turns; 1 for a
        series motor). [-]
    """

    breaks: tuple
    coefficients: tuple
    offset_a: float = 0.0
    gain: float = 1.0
    _current_pieces: tuple = field(init=False, repr=False, compare=False)

    def __post_init__(self):
        object.__setattr__(self, "_current_pieces",
                           _in_armature_current(self.breaks, self.coefficients, self.offset_a, self.gain))

    @property
    def i_max_a(self) -> float:
        """Highest armature current the curve covers; inf for a constant flux. [A]"""
        if self.gain == 0.0:
            return math.inf
        return (self.breaks[-1] - self.offset_a) / self.gain

    @property
    def current_pieces(self) -> tuple:
        """Breaks [A] and rows ``(c3, c2, c1, c0)`` [V/rpm/A^k] of :math:`k\\Phi` in the armature current, as float arrays.

        The form :func:`piecewise_cubic` and the compiled loops take (:func:`circuit_system`).
        """
        return self._current_pieces

    def k_phi(self, i_a: float) -> float:
        """Back-EMF per rpm at armature current ``i_a``. [V/rpm]"""
        return piecewise_cubic(*self._current_pieces, float(i_a))[0]


def flux_curve(excitation, emf_v, speed_rpm: float, offset_a: float = 0.0, gain: float = 1.0) -> FluxCurve:
    r"""A :class:`FluxCurve` from a magnetization table, by its PCHIP interpolant.

    Parameters
    ----------
    excitation : array_like
        Field excitation of the table, strictly rising from 0. [A]
    emf_v : array_like
        Open-circuit EMF at each excitation, not falling. [V]
    speed_rpm : float
        Speed at which the table was measured. [rpm]
    offset_a : float, optional
        Excitation at zero armature current (shunt ampere-turns per pole). [A]
    gain : float, optional
        Excitation per ampere of armature current (series turns per pole). [-]

    Returns
    -------
    FluxCurve

    Notes
    -----
    .. math:: k\Phi(i) = E_{mag}(x_0 + g\,i) / n_{mag}

    The interpolant is that of Fritsch and Carlson (``PchipInterpolator``),
    the one :class:`notchwise.formulas.dc_motor.MagnetizationCurve` uses.
    """
    x = as_float_array("excitation", excitation, "A", min_length=2)
    e = as_float_array("emf", emf_v, "V", min_length=2)
    if x.size != e.size:
        raise InputError(f"excitation has {x.size} values but emf has {e.size}")
    if np.any(np.diff(x) <= 0.0):
        raise InputError("excitation must rise strictly")
    speed = require_positive("speed", speed_rpm, "rpm")
    offset = require_non_negative("offset", offset_a, "A")
    turns = require_positive("gain", gain)
    return _pieces(PchipInterpolator(x, e), speed, offset, turns)


def _pieces(pchip, speed_rpm, offset_a, gain):
    """The :class:`FluxCurve` of a piecewise cubic in scipy's form (``.x`` breaks, ``.c`` coefficients)."""
    return _scaled(cubic_pieces(pchip), speed_rpm, offset_a, gain)


def _scaled(pieces, speed_rpm, offset_a, gain):
    """The :class:`FluxCurve` of EMF pieces ``(breaks, rows)`` measured at ``speed_rpm``."""
    breaks, rows = pieces
    return FluxCurve(breaks, tuple(tuple(c / speed_rpm for c in row) for row in rows), float(offset_a), float(gain))


def cubic_pieces(pchip):
    """Breaks and per-interval power-basis rows (highest power first) of a scipy piecewise cubic, as tuples.

    Parameters
    ----------
    pchip : scipy.interpolate.PPoly or PchipInterpolator
        A piecewise cubic (``.x`` breaks, ``.c`` coefficients of shape (4, m)). [-]

    Returns
    -------
    tuple
        ``(breaks, rows)``: the breaks [x units] and, per interval, ``(c3, c2, c1, c0)`` in the variable
        measured from the interval's start. [-]

    Notes
    -----
    .. math:: P(x) = c_3 u^3 + c_2 u^2 + c_1 u + c_0, \\quad u = x - x_k
    """
    return tuple(pchip.x.tolist()), tuple(tuple(row) for row in pchip.c.T.tolist())


def cubic_evaluator(breaks, rows):
    """A function of one float ``x`` giving the piecewise cubic and its slope there, by :func:`piecewise_cubic`.

    The magnetization curve's scalar values (:class:`~notchwise.formulas.dc_motor.MagnetizationCurve`) use it;
    the integrators call :func:`piecewise_cubic` on the arrays directly.

    Parameters
    ----------
    breaks : sequence of float
        Breaks, strictly rising. [x units]
    rows : sequence of tuple
        Per interval ``(c3, c2, c1, c0)`` as from :func:`cubic_pieces`. [-]

    Returns
    -------
    callable
        ``x -> (P(x), P'(x))``. [-]

    Notes
    -----
    .. math:: P'(x) = (3 c_3 u + 2 c_2) u + c_1
    """
    breaks_array = np.array(breaks, dtype=float)
    rows_array = np.array(rows, dtype=float).reshape(-1, 4)
    return lambda x: piecewise_cubic(breaks_array, rows_array, x)


@compiled
def piecewise_cubic(breaks, rows, x):
    """A piecewise cubic and its slope at one float ``x``: the one scalar evaluation of every cubic curve.

    Held at its first value (slope 0) at and below the first break; bisection for the interval (the last
    continued above the last break) and Horner's rule. The magnetization curve's scalar values, the
    integrators' flux and the braking stop all use it.

    Parameters
    ----------
    breaks : numpy.ndarray
        Breaks, strictly rising, float64. [x units]
    rows : numpy.ndarray
        Shape (m, 4): per interval ``(c3, c2, c1, c0)`` in ``u = x - breaks[k]``, highest power first. [-]
    x : float
        Where to evaluate. [x units]

    Returns
    -------
    tuple of float
        ``(P(x), P'(x))``. [-]

    Notes
    -----
    .. math:: P(x) = ((c_3 u + c_2) u + c_1) u + c_0, \\quad P'(x) = (3 c_3 u + 2 c_2) u + c_1
    """
    if x <= breaks[0]:  # held at its first value below the first break
        return rows[0, 3], 0.0
    k = np.searchsorted(breaks, x, side="right") - 1
    if k > rows.shape[0] - 1:
        k = rows.shape[0] - 1
    c3, c2, c1, c0 = rows[k, 0], rows[k, 1], rows[k, 2], rows[k, 3]
    u = x - breaks[k]
    return ((c3 * u + c2) * u + c1) * u + c0, (3.0 * c3 * u + 2.0 * c2) * u + c1


def constant_flux(k_phi_v_per_rpm: float) -> FluxCurve:
    r"""A :class:`FluxCurve` of constant value: a shunt or separately excited motor.

    Parameters
    ----------
    k_phi_v_per_rpm : float
        Back-EMF per rpm at the working field, above zero. [V/rpm]

    Returns
    -------
    FluxCurve

    Notes
    -----
    .. math:: k\Phi(i) = k\Phi_0
    """
    k_phi = require_positive("k_phi", k_phi_v_per_rpm, "V/rpm")
    return FluxCurve((0.0, math.inf), ((0.0, 0.0, 0.0, k_phi),), 0.0, 0.0)


def motor_flux(motor) -> FluxCurve:
    r"""The :class:`FluxCurve` of a motor of :mod:`notchwise.formulas.dc_motor`.

    Parameters
    ----------
    motor : ShuntMotor, SeriesMotor or CompoundMotor
        A motor with a ``k_phi_v_per_rpm`` has constant flux; otherwise its
        magnetization ``curve`` (with its speed) is used, at excitation
        ``shunt_at + series_turns * i`` where the motor has those (compound)
        and ``i`` otherwise (series). [-]

    Returns
    -------
    FluxCurve

    Notes
    -----
    .. math:: k\Phi(i) = E_{mag}(F_{sh} + N_{se} i)/n_{mag}
    """
    k_phi = getattr(motor, "k_phi_v_per_rpm", None)
    if k_phi is not None:
        return constant_flux(k_phi)
    curve = getattr(motor, "curve", None)
    if curve is None or curve.speed_rpm is None:
        raise InputError("mag_curve and mag_speed are needed to simulate a series or compound motor")
    # The curve validated its table when it was built and holds the pieces of its interpolant.
    return _scaled(curve.pieces, curve.speed_rpm, getattr(motor, "shunt_at", 0.0), getattr(motor, "series_turns", 1.0))


def _in_armature_current(breaks, coefficients, offset_a, gain):
    """Breaks and rows of :math:`k\\Phi` in the armature current, as float arrays, from those in the excitation.

    The pieces are carried over once from the excitation :math:`x = x_0 + g i` to the armature current
    (breaks :math:`(x_k - x_0)/g`, coefficients :math:`c_m g^m`), so that each evaluation is one call; below
    zero excitation the flux is held. A constant flux (``gain`` 0) is one piece of zero slope from 0 A on.
    """
    if gain == 0.0:
        return np.array([0.0, math.inf]), np.array([[0.0, 0.0, 0.0, coefficients[0][3]]])
    return (np.array([(x - offset_a) / gain for x in breaks]),
            np.array([(c3 * gain**3, c2 * gain**2, c1 * gain, c0) for c3, c2, c1, c0 in coefficients]))


def load_table(speed_rpm, torque_nm) -> LoadTorque:
    r"""A validated :class:`~notchwise.formulas.start_load.LoadTorque` from two columns; one point for a constant load.

    Parameters
    ----------
    speed_rpm : array_like
        Speeds, strictly rising. [rpm]
    torque_nm : array_like
        Load torque at each speed; below zero where the load drives the
        shaft (a potential load: the caller decides what holds it at rest). [N·m]

    Returns
    -------
    LoadTorque

    Notes
    -----
    .. math:: T_L(n) = T_k + (T_{k+1} - T_k)\frac{n - n_k}{n_{k+1} - n_k}, \quad n_k \le n \le n_{k+1}
    """
    n = as_float_array("load speed", speed_rpm, "rpm")
    t = as_float_array("load torque", torque_nm, "N·m")
    if n.size != t.size:
        raise InputError(f"load speed has {n.size} values but load torque has {t.size}")
    if np.any(np.diff(n) <= 0.0):
        raise InputError("load speeds must rise strictly")
    return LoadTorque(np.ascontiguousarray(n), np.ascontiguousarray(t))


@dataclass(frozen=True)
class NotchRun:
    r"""The outcome of :func:`integrate_notch` for one running phase of a notch.

    Attributes
    ----------
    status : str
        Why it stopped, one of :data:`STATUSES`: "cut" (the current fell to
        the cut-out value after rising above it), "settled" (the speed reached
        the target with the current past its peak), "rest" (the shaft came to
        rest), "time" (``t_max_s`` reached), "step cap" (``max_steps`` steps
        taken before any of those), "curve end" (the current left the
        magnetization curve).
    message : str
        The reason in words; empty for "cut", "settled", "rest" and "time".
    duration_s : float
        Time from the start of the phase to its end. [s]
    i_end_a, n_end_rpm : float
        State at the end. [A], [rpm]
    i_peak_a, t_peak_s : float
        Highest current on the phase (the start included) and when. [A], [s]
    charge_c : float
        :math:`\int i\,dt`. [A·s]
    i2t_a2s : float
        :math:`\int i^2\,dt`. [A²·s]
    work_load_j : float
        Work done on the load, :math:`\int T_L\,\omega\,dt`. [J]
    steps, rejected : int
        Accepted and rejected steps. [-]
    knots : numpy.ndarray
        Rows (t [s], i [A], n [rpm], di/dt [A/s], dn/dt [rpm/s]) at the step
        ends, for :meth:`state_at`; empty without ``keep_history``.
    """

    status: str
    message: str
    duration_s: float
    i_end_a: float
    n_end_rpm: float
    i_peak_a: float
    t_peak_s: float
    charge_c: float
    i2t_a2s: float
    work_load_j: float
    steps: int
    rejected: int
    knots: np.ndarray

    @property
    def ok(self) -> bool:
        """True for the ends a start expects ("cut", "settled", "rest", "time")."""
        return self.status in STATUSES[:4]

    def state_at(self, t_s):
        """Current [A] and speed [rpm] at times ``t_s`` from the phase's start, by cubic Hermite interpolation."""
        t = np.clip(np.asarray(t_s, dtype=float), 0.0, self.duration_s)
        knots = self.knots
        if knots.shape[0] < 2:
            raise InputError("this run kept no history: integrate with keep_history=True")
        k = np.clip(np.searchsorted(knots[:, 0], t, side="right") - 1, 0, knots.shape[0] - 2)
        t0, h = knots[k, 0], knots[k + 1, 0] - knots[k, 0]
        # A step cut at its very start by an event (rest at its first instant) leaves two knots at one time.
        s = np.divide(t - t0, h, out=np.zeros(np.shape(t)), where=h > 0.0)
        h00, h10, h01, h11 = 2 * s**3 - 3 * s**2 + 1, s**3 - 2 * s**2 + s, -2 * s**3 + 3 * s**2, s**3 - s**2
        lo, hi = knots[k], knots[k + 1]
        current = h00 * lo[..., 1] + h10 * h * lo[..., 3] + h01 * hi[..., 1] + h11 * h * hi[..., 3]
        speed = h00 * lo[..., 2] + h10 * h * lo[..., 4] + h01 * hi[..., 2] + h11 * h * hi[..., 4]
        return current, speed


def circuit_system(breaks, rows, speeds, torques, v_v, r_ohm, l_h, inertia_kgm2, mode, i_top_a):
    r"""The loop and shaft one compiled integration works on, as one tuple for :func:`derivatives`.

    Parameters
    ----------
    breaks, rows : numpy.ndarray
        :math:`k\Phi` in the armature current (:attr:`FluxCurve.current_pieces`). [A], [V/rpm/A^k]
    speeds, torques : numpy.ndarray
        The load table (:class:`~notchwise.formulas.start_load.LoadTorque`). [rpm], [N·m]
    v_v : float
        Source in the loop: the supply less the brush drop on a start, the plugging supply on a stop (0 for
        dynamic braking). [V]
    r_ohm : float
        Whole loop resistance, above zero. [ohm]
    l_h : float
        Loop inductance, above zero. [H]
    inertia_kgm2 : float
        Inertia referred to the motor shaft, above zero. [kg·m²]
    mode : int
        :data:`DRIVE`, :data:`DYNAMIC_BRAKE` or :data:`PLUG`. [-]
    i_top_a : float
        Braking: the flux is taken at the current's magnitude, held at this top of the curve. [A]

    Returns
    -------
    tuple
        ``(breaks, rows, speeds, torques, v, r, 1/L, c/J, mode, i_top)``, :math:`c = 60/(2\pi)`. [-]

    Notes
    -----
    .. math:: \frac{dn}{dt} = \frac{60}{2\pi}\,\frac{T - T_L}{J}
    """
    return breaks, rows, speeds, torques, v_v, r_ohm, 1.0 / l_h, _C1 / inertia_kgm2, mode, i_top_a


@compiled
def derivatives(system, i, n):
    r"""Slopes of current and speed and the exact Jacobian of the loop and shaft of ``system``.

    Parameters
    ----------
    system : tuple
        From :func:`circuit_system`. [-]
    i, n : float
        Current and speed. [A], [rpm]

    Returns
    -------
    tuple of float
        ``(di/dt, dn/dt, j11, j12, j21, j22)``. [A/s], [rpm/s], [1/s], [A/(rpm·s)], [rpm/(A·s)], [1/s]

    Notes
    -----
    A start (:data:`DRIVE`, [1]_):

    .. math:: L\frac{di}{dt} = V' - R i - k\Phi(i)\,n, \quad J\frac{d\omega}{dt} = T(i) - T_L(n)

    A braking stop drives the current with the motor's EMF (flux at :math:`|i|`), and the torque opposes
    the motion; dynamic braking lets no current reverse through the brushes:

    .. math:: L\frac{di}{dt} = V_{loop} + k\Phi(|i|)\,n - R i, \quad J\frac{d\omega}{dt} = -T(i) - T_L(n)
    """
    breaks, rows, speeds, torques, v, r, inv_l, c_j, mode, i_top = system
    tl, dtl = load_and_slope(speeds, torques, n)
    if mode == DRIVE:
        phi, dphi = piecewise_cubic(breaks, rows, i)
        return ((v - r * i - phi * n) * inv_l, c_j * (_C1 * phi * i - tl),  # Eqs. 7.37-7.40 of [1]
                -(r + dphi * n) * inv_l, -phi * inv_l, c_j * _C1 * (phi + dphi * i), -c_j * dtl)
    phi, dphi = piecewise_cubic(breaks, rows, min(abs(i), i_top))
    di = (v + phi * n - r * i) * inv_l
    j11, j12 = (dphi * n - r) * inv_l, phi * inv_l
    if mode == DYNAMIC_BRAKE and i <= 0.0 and di < 0.0:
        di = j11 = j12 = 0.0  # the current does not reverse through the brushes
    return di, c_j * (-_C1 * phi * i - tl), j11, j12, -c_j * _C1 * (phi + dphi * i), -c_j * dtl


@compiled
def rosenbrock_step(system, i, n, fi, fn, j11, j12, j21, j22, h):
    r"""One RODAS3 step [2]_ of the 2-state ``system`` on floats: the new state and the error estimate.

    Parameters
    ----------
    system : tuple
        From :func:`circuit_system`; its :func:`derivatives` give the stage slopes. [-]
    i, n : float
        The state at the step's start (current, speed). [A], [rpm]
    fi, fn : float
        Its slopes there. [A/s], [rpm/s]
    j11, j12, j21, j22 : float
        The exact Jacobian there. [1/s], [A/(rpm·s)], [rpm/(A·s)], [1/s]
    h : float
        The step. [s]

    Returns
    -------
    tuple of float
        ``(i1, n1, ei, en)``: the state after the step and the estimate of its local error (the last stage,
        :math:`k_4`). [A], [rpm], [A], [rpm]

    Notes
    -----
    .. math:: (I/(h\gamma) - J)\,k_i = f\Big(y_0 + \sum_j a_{ij} k_j\Big) + \sum_j \frac{c_{ij}}{h}\,k_j,
              \qquad y_1 = y_0 + 2 k_1 + k_3 + k_4, \quad \gamma = 1/2

    References
    ----------
    See the module docstring (Sandu et al. [2]_; Hairer and Wanner [3]_, Eq. 7.4').
    """
    # Stage matrix I/(h gamma) - J and its closed-form inverse (Eq. 7.4' of [3]).
    g = 2.0 / h  # 1/(h gamma), gamma = 1/2
    a11, a12, a21, a22 = g - j11, -j12, -j21, g - j22
    det = a11 * a22 - a12 * a21
    b11, b12, b21, b22 = a22 / det, -a12 / det, -a21 / det, a11 / det
    inv_h = 1.0 / h
    # RODAS3 stages [2]: k1 = G^-1 f(y0); k2 = G^-1 (f(y0) + 4 k1/h); ...
    k1i = b11 * fi + b12 * fn
    k1n = b21 * fi + b22 * fn
    ri, rn = fi + 4.0 * inv_h * k1i, fn + 4.0 * inv_h * k1n
    k2i = b11 * ri + b12 * rn
    k2n = b21 * ri + b22 * rn
    ui, un = i + 2.0 * k1i, n + 2.0 * k1n
    stage = derivatives(system, ui, un)
    ri, rn = stage[0] + inv_h * (k1i - k2i), stage[1] + inv_h * (k1n - k2n)
    k3i = b11 * ri + b12 * rn
    k3n = b21 * ri + b22 * rn
    ui, un = ui + k3i, un + k3n
    stage = derivatives(system, ui, un)
    ri = stage[0] + inv_h * (k1i - k2i - (8.0 / 3.0) * k3i)
    rn = stage[1] + inv_h * (k1n - k2n - (8.0 / 3.0) * k3n)
    k4i = b11 * ri + b12 * rn
    k4n = b21 * ri + b22 * rn
    return ui + k4i, un + k4n, k4i, k4n  # y1 = y0 + 2 k1 + k3 + k4; the error estimate is k4 [2]


@compiled
def step_factor(err):
    r"""Factor on the step size after a step of weighted error ``err`` (sec. IV.8 of [3]_, order 3).

    Parameters
    ----------
    err : float
        Weighted RMS of the error estimate; above 1 (or not finite) the step is rejected. [-]

    Returns
    -------
    float
        The factor, from 0.2 to 5. [-]

    Notes
    -----
    .. math:: h_{new} = h \min\big(5, \max(0.2, 0.9\,\mathrm{err}^{-1/3})\big)
    """
    if not err <= 1.0:
        return max(_SHRINK, _SAFETY * err ** (-1.0 / 3.0)) if math.isfinite(err) else _SHRINK
    if err == 0.0:
        return _GROW
    return min(_GROW, max(_SHRINK, _SAFETY * err ** (-1.0 / 3.0)))


@compiled
def hermite_cubic(y0, y1, d0, d1):
    r"""Power-basis coefficients, in :math:`s = (t - t_0)/h`, of the cubic Hermite interpolant of one step [3]_.

    Parameters
    ----------
    y0, y1 : float
        The values at the step's ends. [y units]
    d0, d1 : float
        The slopes there times the step, :math:`h f`. [y units]

    Returns
    -------
    tuple of float
        ``(a0, a1, a2, a3)``, lowest power first. [y units]

    Notes
    -----
    .. math:: p(s) = y_0 + d_0 s + (3(y_1 - y_0) - 2 d_0 - d_1) s^2 + (2(y_0 - y_1) + d_0 + d_1) s^3
    """
    return y0, d0, 3.0 * (y1 - y0) - 2.0 * d0 - d1, 2.0 * (y0 - y1) + d0 + d1


@compiled
def cubic_at(a, s):
    """The cubic ``a`` (lowest power first, as from :func:`hermite_cubic`) at ``s``. [y units]

    Parameters
    ----------
    a : tuple of float
        ``(a0, a1, a2, a3)``. [y units]
    s : float
        Where, in units of the step. [-]

    Returns
    -------
    float
        Its value. [y units]

    Notes
    -----
    .. math:: p(s) = ((a_3 s + a_2) s + a_1) s + a_0
    """
    return ((a[3] * s + a[2]) * s + a[1]) * s + a[0]


@compiled
def _cubic_slope(a, s):
    return (3.0 * a[3] * s + 2.0 * a[2]) * s + a[1]


@compiled
def cubic_root(a, target, lo, hi, f_lo, f_hi):
    """Where the cubic ``a`` equals ``target`` in [lo, hi], ``a - target`` being ``f_lo`` and ``f_hi`` of opposite signs there.

    The Illinois false position: M. Dowell and P. Jarratt, "A modified regula falsi method for computing
    the root of an equation," *BIT*, vol. 11, pp. 168-174, 1971 (from memory).

    Parameters
    ----------
    a : tuple of float
        The cubic, lowest power first. [y units]
    target : float
        The level sought. [y units]
    lo, hi : float
        The bracket, in units of the step. [-]
    f_lo, f_hi : float
        ``a - target`` at ``lo`` and ``hi``. [y units]

    Returns
    -------
    float
        The crossing, in units of the step. [-]

    Notes
    -----
    .. math:: s = \\frac{lo\\,f_{hi} - hi\\,f_{lo}}{f_{hi} - f_{lo}}
    """
    side = 0
    s = lo
    for _ in range(60):
        s = (lo * f_hi - hi * f_lo) / (f_hi - f_lo)
        value = cubic_at(a, s) - target
        if value == 0.0 or hi - lo < 1e-14:
            return s
        if (value > 0.0) == (f_hi > 0.0):
            hi, f_hi = s, value
            if side == -1:
                f_lo *= 0.5
            side = -1
        else:
            lo, f_lo = s, value
            if side == 1:
                f_hi *= 0.5
            side = 1
    return s


@compiled
def turning_point(a):
    """First s in (0, 1) where the cubic ``a`` turns from rising to falling; -1 if it does not.

    Parameters
    ----------
    a : tuple of float
        The cubic, lowest power first. [y units]

    Returns
    -------
    float
        The maximum's place in units of the step, or -1. [-]

    Notes
    -----
    .. math:: p'(s) = 3 a_3 s^2 + 2 a_2 s + a_1 = 0, \\quad p''(s) < 0
    """
    qa, qb, qc = 3.0 * a[3], 2.0 * a[2], a[1]
    if qa == 0.0:
        return -qc / qb if qb < 0.0 and 0.0 < -qc / qb < 1.0 else -1.0
    disc = qb * qb - 4.0 * qa * qc
    if disc < 0.0:
        return -1.0
    q = -0.5 * (qb + math.copysign(math.sqrt(disc), qb))
    first, second = q / qa, qc / q if q != 0.0 else math.inf
    if second < first:
        first, second = second, first
    for x in (first, second):
        if 0.0 < x < 1.0 and 2.0 * qa * x + qb < 0.0:
            return x
    return -1.0


@compiled
def cubic_integrals(a, s):
    """:math:`\\int_0^s p` and :math:`\\int_0^s p^2` of the cubic ``a``, exactly, in units of the step.

    Parameters
    ----------
    a : tuple of float
        The cubic, lowest power first. [y units]
    s : float
        Upper end, in units of the step. [-]

    Returns
    -------
    tuple of float
        The integral and the integral of the square (times the step give them in time). [y units], [y units²]

    Notes
    -----
    .. math:: \\int_0^s p = \\sum_j a_j \\frac{s^{j+1}}{j+1}, \\qquad
              \\int_0^s p^2 = \\sum_{j,k} a_j a_k \\frac{s^{j+k+1}}{j+k+1}
    """
    a0, a1, a2, a3 = a
    linear = s * (a0 + s * (a1 / 2.0 + s * (a2 / 3.0 + s * a3 / 4.0)))
    square = s * (a0 * a0 + s * (a0 * a1 + s * ((a1 * a1 + 2.0 * a0 * a2) / 3.0 + s * (0.5 * (a0 * a3 + a1 * a2) + s * (
        (a2 * a2 + 2.0 * a1 * a3) / 5.0 + s * (a2 * a3 / 3.0 + s * a3 * a3 / 7.0))))))
    return linear, square


def checked_rtol(rtol) -> float:
    r"""A relative tolerance for the Rosenbrock integrator, checked.

    Parameters
    ----------
    rtol : float
        Relative tolerance of the local error, from 1e-12 to 1e-2. [-]

    Returns
    -------
    float
        The tolerance. [-]

    Notes
    -----
    .. math:: 10^{-12} \le \mathrm{rtol} \le 10^{-2}
    """
    value = require_positive("rtol", rtol)
    if not 1e-12 <= value <= 1e-2:
        raise InputError(f"rtol ({value:g}) must lie from 1e-12 to 1e-2")
    return value


def integrate_notch(
    flux: FluxCurve,
    v_eff_v: float,
    r_ohm: float,
    l_h: float,
    inertia_kgm2: float,
    load: LoadTorque,
    i0_a: float,
    n0_rpm: float,
    *,
    t_max_s: float,
    i_cut_a: float | None = None,
    n_settle_rpm: float | None = None,
    rtol: float = 5e-5,
    max_steps: int = 20_000,
    keep_history: bool = True,
) -> NotchRun:
    r"""Integrate one running phase of a notch until a cut, rest, settling or a time limit.

    Parameters
    ----------
    flux : FluxCurve
        Back-EMF per rpm against armature current. [V/rpm]
    v_eff_v : float
        Supply voltage less the brush drop, above zero. [V]
    r_ohm : float
        Whole circuit resistance on this notch, above zero. [ohm]
    l_h : float
        Inductance of the armature circuit, above zero. [H]
    inertia_kgm2 : float
        Inertia referred to the motor shaft, above zero. [kg·m²]
    load : LoadTorque
        Load torque against speed. [N·m]
    i0_a, n0_rpm : float
        Current and speed at the start; the speed above zero or the current
        able to break away (standstill is the caller's: there the current is a
        first-order lag in closed form). [A], [rpm]
    i_cut_a : float, optional
        Switching current: stop where the current falls to it from above. [A]
    n_settle_rpm : float, optional
        Stop at the first instant the speed is at or above this with the
        current falling (the run after the last cut). [rpm]
    t_max_s : float
        Longest duration, finite (a definite-time dwell or a time cap). [s]
    rtol : float, optional
        Relative tolerance of the local error, 1e-12 to 1e-2. [-]
    max_steps : int, optional
        Most accepted steps, 1 to 10,000,000; reaching it ends the run with
        status "step cap". [-]
    keep_history : bool, optional
        Keep the step ends for :meth:`NotchRun.state_at`. [-]

    Returns
    -------
    NotchRun

    Notes
    -----
    .. math::

        (I/(h\gamma) - J)\,k_i = f\Big(y_0 + \sum_j a_{ij} k_j\Big) + \sum_j \frac{c_{ij}}{h}\,k_j,
        \qquad y_1 = y_0 + \sum_j m_j k_j

    References
    ----------
    See the module docstring.
    """
    v = require_positive("v_eff", v_eff_v, "V")
    r = require_positive("r", r_ohm, "ohm")
    l_h = require_positive("l", l_h, "H")
    j = require_positive("inertia", inertia_kgm2, "kg·m²")
    i = require_non_negative("i0", i0_a, "A")
    n = require_non_negative("n0", n0_rpm, "rpm")
    t_max = require_positive("t_max", t_max_s, "s")
    rtol = checked_rtol(rtol)
    max_steps = require_count("max_steps", max_steps, 1, 10_000_000)
    i_cut = None if i_cut_a is None else require_positive("i_cut", i_cut_a, "A")
    n_settle = None if n_settle_rpm is None else require_positive("n_settle", n_settle_rpm, "rpm")
    if not isinstance(flux, FluxCurve):
        raise InputError("flux must be a FluxCurve (flux_curve, constant_flux or motor_flux)")
    if not isinstance(load, LoadTorque):
        raise InputError("load must be a LoadTorque (load_table or load_torque)")

    return integrate_notch_unchecked(flux, v, r, l_h, j, load, i, n, t_max, i_cut, n_settle, rtol, max_steps,
                                     bool(keep_history))


def integrate_notch_unchecked(flux, v_eff_v, r_ohm, l_h, inertia_kgm2, load, i0_a, n0_rpm, t_max_s, i_cut_a,
                              n_settle_rpm, rtol, max_steps, keep_history) -> NotchRun:
    r""":func:`integrate_notch` without its argument checks, for a caller that has made them (the start).

    Parameters
    ----------
    flux : FluxCurve
        Back-EMF per rpm against armature current. [V/rpm]
    v_eff_v, r_ohm, l_h, inertia_kgm2 : float
        Supply less brush drop, resistance, inductance and inertia, all above zero. [V], [ohm], [H], [kg·m²]
    load : LoadTorque
        Load torque against speed. [N·m]
    i0_a, n0_rpm : float
        Current and speed at the start, at or above zero. [A], [rpm]
    t_max_s : float
        Longest duration, finite and above zero. [s]
    i_cut_a, n_settle_rpm : float or None
        Switching current and settling speed, or None. [A], [rpm]
    rtol : float
        Relative tolerance, as :func:`checked_rtol` allows. [-]
    max_steps : int
        Most accepted steps, at least 1. [-]
    keep_history : bool
        Keep the step ends for :meth:`NotchRun.state_at`. [-]

    Returns
    -------
    NotchRun

    Notes
    -----
    .. math:: y_1 = y_0 + 2 k_1 + k_3 + k_4
    """
    breaks, rows = flux.current_pieces
    i_max = flux.i_max_a
    system = circuit_system(breaks, rows, load.speed_rpm, load.torque_nm, v_eff_v, r_ohm, l_h, inertia_kgm2, DRIVE,
                            math.inf)
    kphi_top = piecewise_cubic(breaks, rows, min(v_eff_v / r_ohm, i_max))[0]
    i_floor = 1e-3 * v_eff_v / r_ohm  # absolute parts of the error scale: a thousandth of the standstill current
    n_floor = 1e-3 * v_eff_v / kphi_top if kphi_top > 0.0 else 1.0  # and of a speed below any running speed
    (code, t, i, n, peak, t_peak, charge, i2t, work, steps, rejected, h, knots) = _run_notch(
        system, i0_a, n0_rpm, t_max_s, math.nan if i_cut_a is None else i_cut_a,
        math.nan if n_settle_rpm is None else n_settle_rpm, rtol, max_steps, keep_history, i_max, i_floor, n_floor,
        l_h / r_ohm, load.constant)
    message = ""
    if code == _STEP_CAP:
        message = (f"the integrator stopped after {max_steps} steps at {quantity(t, 's')} before the notch ended: "
                   "raise max_steps or loosen rtol")
    elif code == _TINY_STEP:
        code, message = _STEP_CAP, f"the step size fell below {quantity(h, 's')} at {quantity(t, 's')}"
    elif code == _CURVE_END:
        message = (f"the current ({quantity(i, 'A')}) left the magnetization curve, which ends at "
                   f"{quantity(i_max, 'A')}, at {quantity(t, 's')}: extend the curve")
    return NotchRun(STATUSES[code], message, t, i, n, peak, t_peak, charge, i2t, work, steps, rejected, knots)


@compiled(allocates=True)
def _kept(knots, count, t, i, n, fi, fn):
    """``knots`` with the row (t, i, n, fi, fn) at ``count``, doubled in length when full."""
    if count == knots.shape[0]:
        grown = np.empty((2 * count, 5))
        for row in range(count):  # element by element: a slice assignment costs seconds of compilation
            for column in range(5):
                grown[row, column] = knots[row, column]
        knots = grown
    knots[count, 0], knots[count, 1], knots[count, 2], knots[count, 3], knots[count, 4] = t, i, n, fi, fn
    return knots


@compiled(allocates=True)
def _run_notch(system, i, n, t_max, i_cut, n_settle, rtol, max_steps, keep_history, i_max, i_floor, n_floor, tau,
               constant_load):
    """The step loop of :func:`integrate_notch` (compiled): ``nan`` for no ``i_cut`` or ``n_settle``.

    Returns the status code (an index of :data:`STATUSES`, or ``_TINY_STEP``), the end time, current and
    speed, the peak and its time, the three integrals, the accepted and rejected steps, the last step size
    and the knots kept.
    """
    has_cut, has_settle = i_cut == i_cut, n_settle == n_settle
    speeds, torques = system[2], system[3]
    fi, fn, j11, j12, j21, j22 = derivatives(system, i, n)
    h = min(t_max, 0.5 * tau * rtol ** (1.0 / 3.0))
    t = 0.0
    peak, t_peak = i, 0.0
    charge = i2t = work = 0.0
    rose = has_cut and i > i_cut
    # The current's error is weighed against its swing on the phase, not its size: the instant it falls back
    # to the cut-out value moves by the error over the slope, and the slope scales with the swing.
    i_start = i
    swing = _SWING_FLOOR * i
    knots = np.empty((64 if keep_history else 0, 5))
    count = 0
    if keep_history:
        knots = _kept(knots, 0, 0.0, i, n, fi, fn)
        count = 1
    steps = rejected = 0
    work_per_rpm_s = torques[0] * RAD_S_PER_RPM
    status = -1
    while True:
        if steps >= max_steps:
            status = _STEP_CAP
            break
        last = t + h >= t_max
        if last:
            h = t_max - t
        i1, n1, k4i, k4n = rosenbrock_step(system, i, n, fi, fn, j11, j12, j21, j22, h)
        ei = k4i / (rtol * (swing + i_floor))
        en = k4n / (rtol * ((n if n > n1 else n1) + n_floor))
        err = math.sqrt(0.5 * (ei * ei + en * en))
        if not err <= 1.0:  # too large, or not a number
            rejected += 1
            h *= step_factor(err)
            if h < 1e-14 * max(t, tau):
                status = _TINY_STEP
                break
            continue
        steps += 1
        f1i, f1n, g11, g12, g21, g22 = derivatives(system, i1, n1)
        pi = hermite_cubic(i, i1, h * fi, h * f1i)  # the step's cubics in s = (t - t0)/h
        pn = hermite_cubic(n, n1, h * fn, h * f1n)
        # Events on the Hermite cubic of this step: the first one ends the phase.
        s_end = 1.0
        status = _TIME if last else -1
        if has_cut:
            if rose and i1 <= i_cut:
                s_end, status = cubic_root(pi, i_cut, 0.0, 1.0, i - i_cut, i1 - i_cut), _CUT
            elif not rose:
                # Did the current rise past the cut-out value within this step (at its end or at a peak inside)?
                s_up = turning_point(pi) if fi > 0.0 >= f1i else -1.0
                i_up = i1 if s_up < 0.0 else cubic_at(pi, s_up)
                if i_up > i_cut:
                    rose = True
                    if i1 <= i_cut:  # and fell back to it before the step's end
                        s_end, status = cubic_root(pi, i_cut, s_up, 1.0, i_up - i_cut, i1 - i_cut), _CUT
        if n1 <= 0.0 and (n > 0.0 or fn < 0.0):
            s_rest = cubic_root(pn, 0.0, 0.0, 1.0, n, n1) if n > 0.0 else 0.0
            if s_rest <= s_end:
                s_end, status = s_rest, _REST
        if has_settle and n1 >= n_settle:
            s_ok = _settle_point(pi, pn, n_settle, rtol * (swing + i_floor))
            if 0.0 <= s_ok <= s_end:
                s_end, status = s_ok, _SETTLED
        # A peak inside the step, on its cubic; not where the step spans many electrical time constants: there
        # the current closes exponentially on its quasi-steady value and the cubic overshoots the ends.
        s_peak = turning_point(pi) if fi > 0.0 >= f1i and -h * j11 < 1.0 else -1.0
        if 0.0 < s_peak <= s_end:
            value = cubic_at(pi, s_peak)
            if value > peak:
                peak, t_peak = value, t + s_peak * h
        charge_step, i2t_step = cubic_integrals(pi, s_end)
        charge += h * charge_step
        i2t += h * i2t_step
        if constant_load:
            work += work_per_rpm_s * h * cubic_integrals(pn, s_end)[0]
        else:
            quadrature = 0.0
            for k in range(3):
                speed = cubic_at(pn, s_end * _GAUSS_NODES[k])
                quadrature += _GAUSS_WEIGHTS[k] * load_and_slope(speeds, torques, speed)[0] * speed
            work += RAD_S_PER_RPM * h * s_end * quadrature
        if s_end < 1.0:
            h_end = s_end * h
            i1, n1 = cubic_at(pi, s_end), cubic_at(pn, s_end)
            if status == _REST:
                n1 = 0.0
            if status == _CUT:
                i1 = i_cut
            f1i, f1n = _cubic_slope(pi, s_end) / h, _cubic_slope(pn, s_end) / h
        else:
            h_end = h
        t += h_end
        i, n = i1, n1
        if abs(i - i_start) > swing:
            swing = abs(i - i_start)
        fi, fn, j11, j12, j21, j22 = f1i, f1n, g11, g12, g21, g22
        if i > peak:
            peak, t_peak = i, t
        if keep_history:
            knots = _kept(knots, count, t, i, n, fi, fn)
            count += 1
        if status >= 0:
            break
        if i > i_max * (1.0 + 1e-12):
            status = _CURVE_END
            break
        h *= step_factor(err)
    return status, t, i, n, peak, t_peak, charge, i2t, work, steps, rejected, h, knots[:count].copy()


@compiled
def _settle_point(pi, pn, n_target, flat):
    """First s in [0, 1] with the speed at or above the target and the current not rising; -1 if none.

    A rise of the current over the step below ``flat`` (its error tolerance [A]) is noise, not a rise: with a
    tiny inductance the slope of a current at its steady value has either sign.
    """
    n_end = cubic_at(pn, 1.0)
    if n_end < n_target or _cubic_slope(pi, 1.0) > flat:
        return -1.0
    n_start = pn[0]
    s_speed = 0.0 if n_start >= n_target else cubic_root(pn, n_target, 0.0, 1.0, n_start - n_target, n_end - n_target)
    if _cubic_slope(pi, s_speed) <= flat:
        return s_speed
    s_peak = turning_point(pi)
    return 1.0 if s_peak < 0.0 else max(s_speed, s_peak)

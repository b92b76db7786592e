r"""Steady-state models of DC motors: shunt (separately excited), series and compound.

All three obey the two laws of the DC machine [1]_:

.. math::

    E = k\Phi\,n, \qquad T = \frac{60}{2\pi}\,k\Phi\,I, \qquad V = E + I R + V_b

with :math:`k\Phi` in V/rpm (back-EMF per rpm at the flux set by the field),
:math:`n` in rpm, :math:`I` the armature current in A, :math:`R` the resistance
of the armature circuit, and :math:`V_b` the total brush drop. The torque is the
developed (air-gap) torque; the shaft torque is less by friction, windage and
iron loss.

The flux of a series or compound motor follows its field excitation along the
magnetization curve: the open-circuit EMF measured at a stated speed against the
field current (series) or the field ampere-turns per pole (compound). Because
:math:`E \propto \Phi n`, :math:`k\Phi(I) = E_{mag}(I) / n_{mag}`. Between the
measured points the curve is interpolated with the shape-preserving piecewise
cubic Hermite interpolant of Fritsch and Carlson [2]_, which never overshoots
a monotone table.

References
----------
.. [1] A. E. Fitzgerald, C. Kingsley Jr., S. D. Umans, *Electric Machinery*,
   6th ed., McGraw-Hill, 2003, ch. 7 (DC machines), Eqs. 7.1-7.8.
.. [2] F. N. Fritsch and R. E. Carlson, "Monotone piecewise cubic
   interpolation," *SIAM J. Numer. Anal.*, vol. 17, no. 2, pp. 238-246, 1980.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import cached_property
from typing import ClassVar

import numpy as np
from scipy.interpolate import PchipInterpolator
from scipy.optimize import brentq

from .errors import (
    DesignError,
    InputError,
    InputTypeError,
    as_float_array,
    quantity,
    require_below,
    require_non_negative,
    require_positive,
)
from .machines import NM_PER_V_A_PER_RPM
from .notch_integrator import cubic_evaluator, cubic_pieces, motor_flux
from .start_dc import advance_dc_notch

__all__ = [
    "NM_PER_V_A_PER_RPM",
    "MagnetizationCurve",
    "magnetization_curve",
    "ShuntMotor",
    "SeriesMotor",
    "CompoundMotor",
    "k_phi_from_rating",
    "back_emf_v",
    "torque_nm",
    "effective_supply_v",
    "circuit_resistance_ohm",
    "steady_speed_rpm",
    "developed_torque_nm",
    "series_torque_nm",
    "residual_speed_rpm",
    "MinimumLoad",
    "minimum_load",
]



@dataclass(frozen=True)
class MagnetizationCurve:
    """Open-circuit EMF of a machine against its field excitation at one speed.

    Build it with :func:`magnetization_curve`, which validates the table.

    Attributes
    ----------
    excitation : numpy.ndarray
        Field excitation, strictly rising: field current [A] for a series
        motor, field ampere-turns per pole [A] for a compound motor.
    emf_v : numpy.ndarray
        Open-circuit EMF at each excitation, not falling. [V]
    speed_rpm : float or None
        Speed at which the EMF was measured; None where only flux ratios
        are needed (grading). [rpm]
    excitation_name : str
        What the excitation is, for messages ("current" or "ampere-turns").
    """

    excitation: np.ndarray
    emf_v: np.ndarray
    speed_rpm: float | None
    excitation_name: str = "current"
    _interpolant: PchipInterpolator = field(init=False, repr=False, compare=False)
    _pieces: tuple = field(init=False, repr=False, compare=False)
    _cubic: object = field(init=False, repr=False, compare=False)

    def __post_init__(self):
        object.__setattr__(self, "_interpolant", PchipInterpolator(self.excitation, self.emf_v))
        object.__setattr__(self, "_pieces", cubic_pieces(self._interpolant))
        object.__setattr__(self, "_cubic", cubic_evaluator(*self._pieces))

    @property
    def pieces(self) -> tuple:
        """Breaks [A] and per-interval cubic rows [V/A^k] of the curve's interpolant (:func:`~notchwise.formulas.notch_integrator.cubic_pieces`)."""
        return self._pieces

    @property
    def max_excitation(self) -> float:
        """Highest excitation in the table; the curve is not extrapolated. [A]"""
        return float(self.excitation[-1])

    def emf_at(self, excitation):
        """Open-circuit EMF at ``excitation`` and the curve's own speed. [V]

        Raises
        ------
        InputError
            Where an excitation lies beyond the last point of the table: a
            saturating curve must not be guessed.
        """
        if isinstance(excitation, float) and excitation <= self.max_excitation:  # one value: the fast scalar cubic
            return self._cubic(excitation)[0]  # held at its value at 0 below 0
        x = np.asarray(excitation, dtype=float)
        if np.any(x > self.max_excitation * (1.0 + 1e-12)):
            raise InputError(
                f"the magnetization curve ends at {self.excitation_name} "
                f"{quantity(self.max_excitation, 'A')}; {quantity(float(np.max(x)), 'A')} "
                "lies beyond it: extend the curve"
            )
        emf = self._interpolant(np.clip(x, 0.0, None))
        return emf if emf.ndim else float(emf)

    def k_phi_at(self, excitation):
        """Back-EMF per rpm, :math:`k\\Phi = E_{mag}/n_{mag}`, at ``excitation``. [V/rpm]"""
        _require_speed(self, "")
        return self.emf_at(excitation) / self.speed_rpm


#: Highest EMF a magnetization curve may reach: a bound on what a machine's data can be, so that
#: degenerate tables (scaled by 1e-300 or 1e300) are refused, not interpolated (common practice, no source). [V]
CURVE_EMF_RANGE_V = (1e-3, 1e6)
#: The same bound for the highest excitation of the curve. [A]
CURVE_EXCITATION_RANGE_A = (1e-3, 1e8)


def magnetization_curve(
    excitation, emf_v, speed_rpm: float | None = None, excitation_name: str = "current"
) -> MagnetizationCurve:
    """Validate a magnetization table and return it as a curve.

    Parameters
    ----------
    excitation : array_like
        Field current (series) or ampere-turns per pole (compound), at least
        2 points, at or above zero and strictly rising. [A]
    emf_v : array_like
        Open-circuit EMF at each point, at or above zero and not falling;
        a residual EMF at zero excitation is allowed. [V]
    speed_rpm : float, optional
        Speed at which the curve was measured; leave out where only flux
        ratios are needed (grading). [rpm]
    excitation_name : str, optional
        Word used for the excitation in messages. [-]

    Returns
    -------
    MagnetizationCurve
        When the table does not start at zero excitation, the origin
        (0, 0 V) is put before it: no residual flux is assumed. [-]

    Examples
    --------
    A straight curve, 200 V at 100 A when driven at 1000 rpm (invented figures):

    >>> curve = magnetization_curve([0.0, 100.0], [0.0, 200.0], speed_rpm=1000.0)
    >>> round(float(curve.k_phi_at(50.0)), 6)  # 100 V at 1000 rpm
    0.1
    """
    x = as_float_array("mag_curve " + excitation_name, excitation, "A", min_length=2)
    e = as_float_array("mag_curve EMF", emf_v, "V", min_length=2)
    if x.size != e.size:
        raise InputError(f"mag_curve has {x.size} {excitation_name} values but {e.size} EMF values")
    if x[0] < 0.0:
        raise InputError(f"mag_curve {excitation_name} ({quantity(x[0], 'A')}) must not be negative")
    if e[0] < 0.0:
        raise InputError(f"mag_curve EMF ({quantity(e[0], 'V')}) must not be negative")
    rises = np.diff(x)
    if np.any(rises <= 0.0):
        k = int(np.argmax(rises <= 0.0))
        raise InputError(
            f"mag_curve {excitation_name} must rise strictly: point {k + 2} "
            f"({quantity(x[k + 1], 'A')}) does not exceed point {k + 1} ({quantity(x[k], 'A')})"
        )
    falls = np.diff(e)
    if np.any(falls < 0.0):
        k = int(np.argmax(falls < 0.0))
        raise InputError(
            f"mag_curve EMF must not fall: point {k + 2} ({quantity(e[k + 1], 'V')}) "
            f"is below point {k + 1} ({quantity(e[k], 'V')})"
        )
    if e[-1] <= 0.0:
        raise InputError("mag_curve EMF is zero throughout: the machine has no flux")
    if not CURVE_EMF_RANGE_V[0] <= e[-1] <= CURVE_EMF_RANGE_V[1]:
        low, high = CURVE_EMF_RANGE_V
        raise InputError(
            f"mag_curve EMF reaches {quantity(e[-1], 'V')}; a machine's curve reaches between "
            f"{quantity(low, 'V')} and {quantity(high, 'V')}"
        )
    if not CURVE_EXCITATION_RANGE_A[0] <= x[-1] <= CURVE_EXCITATION_RANGE_A[1]:
        low, high = CURVE_EXCITATION_RANGE_A
        raise InputError(
            f"mag_curve {excitation_name} reaches {quantity(x[-1], 'A')}; a machine's curve reaches between "
            f"{quantity(low, 'A')} and {quantity(high, 'A')}"
        )
    if x[0] > 0.0:
        x, e = np.concatenate(([0.0], x)), np.concatenate(([0.0], e))
    speed = None if speed_rpm is None else require_positive("speed_rpm", speed_rpm, "rpm")
    return MagnetizationCurve(x, e, speed, excitation_name)


class _DCMachine:
    r"""What the three DC kinds share of the machine interface (:class:`notchwise.formulas.machines.Machine`).

    Each kind provides ``_k_phi_values(i_a)`` and ``relative_flux(i_a)``; the rest follows from
    :math:`E = k\Phi n`, :math:`T = \frac{60}{2\pi}k\Phi I` and :math:`V' = E + IR` [1]_.
    """

    #: True where the flux does not depend on current (the closed form of a start applies).
    flux_constant: ClassVar[bool] = False
    #: True where the speed has no bound as the load vanishes.
    runs_away_unloaded: ClassVar[bool] = False
    #: The current is a state of the circuit: the start goes notch by notch through ``advance_notch``.
    quasi_steady: ClassVar[bool] = False

    def k_phi(self, i_a):
        """Back-EMF per rpm at armature current ``i_a``. [V/rpm]"""
        self.require_dynamics()
        if isinstance(i_a, float) and i_a <= self.i_max_a:  # one value: the scalar cubic the integrator uses
            return self.notch_flux.k_phi(i_a)
        return self._k_phi_values(i_a)

    def torque_nm(self, i_a):
        """Developed torque at armature current ``i_a`` (no argument checks: see :func:`developed_torque_nm`). [N·m]"""
        return torque_nm(self.k_phi(i_a), i_a)  # Eqs. 7.1, 7.7 of [1]

    @cached_property
    def notch_flux(self):
        """The flux as the fast integrator takes it (:func:`~notchwise.formulas.notch_integrator.motor_flux`), built once. [-]"""
        return motor_flux(self)

    def speed_rpm(self, v_eff_v, r_circuit_ohm, i_a):
        """Speed at which a circuit of ``r_circuit_ohm`` carries ``i_a``; ``inf`` without flux. [rpm]"""
        k_phi = self.k_phi(i_a)
        if isinstance(k_phi, float) and isinstance(v_eff_v, float) and isinstance(r_circuit_ohm, float):
            return (v_eff_v - r_circuit_ohm * i_a) / k_phi if k_phi > 0.0 else np.inf  # Eq. 7.8 of [1], one value
        k_phi = np.asarray(k_phi, dtype=float)
        emf = np.asarray(v_eff_v - np.multiply(r_circuit_ohm, i_a), dtype=float)
        with np.errstate(divide="ignore", over="ignore", invalid="ignore"):  # a vanishing flux is a runaway: inf
            n = np.where(k_phi > 0.0, emf / np.where(k_phi > 0.0, k_phi, 1.0), np.inf)  # Eq. 7.8 of [1]
        return n[()]

    def mechanical_time_constant_s(self, r_circuit_ohm: float, inertia_kgm2: float, i_a: float) -> float:
        r"""Mechanical time constant :math:`R J / ((60/2\pi)^2 (k\Phi)^2)` at ``i_a``. [s]"""
        k_phi = float(self.k_phi(i_a))
        return r_circuit_ohm * inertia_kgm2 / (NM_PER_V_A_PER_RPM**2 * k_phi**2)

    def advance_notch(self, notch, circuit, i_cut_a, t_left_s, t_cap_s, final_speed_rpm) -> None:
        """The DC 2-state circuit over one notch (:func:`notchwise.formulas.start_dc.advance_dc_notch`)."""
        advance_dc_notch(self, notch, circuit, i_cut_a, t_left_s, t_cap_s, final_speed_rpm)


#: Largest machine figures accepted: far beyond any DC machine, so that scaled nonsense is refused before
#: its squares overflow (common practice, no source). [ohm], [V/rpm]
R_MOTOR_LIMIT_OHM = 1e4
K_PHI_LIMIT_V_PER_RPM = 1e3


def _machine_resistance(r_ohm) -> float:
    """The motor's own circuit resistance, checked. [ohm]"""
    return require_below("r_motor", require_positive("r_motor", r_ohm, "ohm"), "the limit", R_MOTOR_LIMIT_OHM, "ohm")


def _checked_curve(curve, kind: str, optional: bool = False):
    """``curve`` if it is a MagnetizationCurve (or None where ``optional``)."""
    if curve is None and optional:
        return None
    if not isinstance(curve, MagnetizationCurve):
        raise InputTypeError(
            f"curve ({type(curve).__name__}) of a {kind} motor must be a magnetization curve: build it with magnetization_curve"
        )
    return curve


def _require_speed(curve, kind: str) -> None:
    """Refuse a curve without its speed where speed or torque is needed."""
    if curve is None:
        raise InputError(f"the {kind} motor has no magnetization curve (curve): it is needed for speed or torque")
    if curve.speed_rpm is None:
        owner = f"the {kind} motor's magnetization curve" if kind else "the magnetization curve"
        raise InputError(
            f"{owner} has no speed_rpm (the speed at which it was measured; "
            "mag_speed in a cell): it is needed for speed or torque"
        )


@dataclass(frozen=True)
class ShuntMotor(_DCMachine):
    """Shunt or separately excited motor with its field held constant.

    Attributes
    ----------
    r_ohm : float
        Resistance of the armature circuit (armature, interpoles, brushes'
        contact resistance), above zero. [ohm]
    k_phi_v_per_rpm : float or None
        Back-EMF per rpm at the working field, above zero; None where only
        grading is asked (it needs the resistance alone). [V/rpm]
    """

    r_ohm: float
    k_phi_v_per_rpm: float | None = None

    kind: ClassVar[str] = "shunt"
    flux_constant: ClassVar[bool] = True
    i_max_a: ClassVar[float] = np.inf  #: no saturation table limits the current

    def __post_init__(self):
        object.__setattr__(self, "r_ohm", _machine_resistance(self.r_ohm))
        if self.k_phi_v_per_rpm is not None:
            k_phi = require_positive("k_phi", self.k_phi_v_per_rpm, "V/rpm")
            object.__setattr__(self, "k_phi_v_per_rpm", require_below("k_phi", k_phi, "the limit", K_PHI_LIMIT_V_PER_RPM, "V/rpm"))

    def require_dynamics(self) -> None:
        """Refuse speed or torque without k_phi."""
        if self.k_phi_v_per_rpm is None:
            raise InputError("the shunt motor has no k_phi (back-EMF per rpm at the working field): it is needed for speed or torque")

    def _k_phi_values(self, i_a):
        """Back-EMF per rpm at armature currents ``i_a``: constant. [V/rpm]"""
        return np.full_like(np.asarray(i_a, dtype=float), self.k_phi_v_per_rpm)[()]

    def relative_flux(self, i_a):
        """A quantity proportional to flux at ``i_a``; only its ratios are used. [-]"""
        return np.ones_like(np.asarray(i_a, dtype=float))[()]


@dataclass(frozen=True)
class SeriesMotor(_DCMachine):
    """Series motor: the armature current is the field current.

    Attributes
    ----------
    r_ohm : float
        Resistance of armature plus series field (and interpoles), above zero. [ohm]
    curve : MagnetizationCurve or None
        EMF against armature current at ``curve.speed_rpm``. With None the
        flux is taken proportional to current, which is enough for grading
        (only flux ratios enter) but not for speed or torque.
    """

    r_ohm: float
    curve: MagnetizationCurve | None = None

    kind: ClassVar[str] = "series"
    runs_away_unloaded: ClassVar[bool] = True

    def __post_init__(self):
        object.__setattr__(self, "r_ohm", _machine_resistance(self.r_ohm))
        _checked_curve(self.curve, self.kind, optional=True)

    @property
    def i_max_a(self) -> float:
        """Highest current the magnetization curve covers. [A]"""
        return np.inf if self.curve is None else self.curve.max_excitation

    def require_dynamics(self) -> None:
        """Refuse speed or torque without a curve and its speed."""
        _require_speed(self.curve, self.kind)

    def _k_phi_values(self, i_a):
        """Back-EMF per rpm at armature currents ``i_a``. [V/rpm]"""
        return self.curve.k_phi_at(i_a)

    def relative_flux(self, i_a):
        """A quantity proportional to flux at ``i_a``; only its ratios are used. [-]"""
        if self.curve is None:
            return np.asarray(i_a, dtype=float)[()]
        return self.curve.emf_at(i_a)


@dataclass(frozen=True)
class CompoundMotor(_DCMachine):
    """Cumulative compound motor: shunt and series fields aid each other.

    The shunt field is fed from the supply at constant current, so its
    ampere-turns are constant; the series ampere-turns follow the armature
    current: :math:`F = F_{sh} + N_{se} I`.

    Attributes
    ----------
    r_ohm : float
        Resistance of armature plus series field, above zero. [ohm]
    curve : MagnetizationCurve
        EMF against field ampere-turns per pole at ``curve.speed_rpm``.
    shunt_at : float
        Shunt-field ampere-turns per pole, at or above zero and below the end of the curve. [A]
    series_turns : float
        Series-field turns per pole, above zero. [-]
    """

    r_ohm: float
    curve: MagnetizationCurve
    shunt_at: float
    series_turns: float

    kind: ClassVar[str] = "compound"

    def __post_init__(self):
        object.__setattr__(self, "r_ohm", _machine_resistance(self.r_ohm))
        _checked_curve(self.curve, self.kind)
        object.__setattr__(self, "shunt_at", require_non_negative("shunt_at", self.shunt_at, "A"))
        object.__setattr__(self, "series_turns", require_positive("series_turns", self.series_turns, "turns"))
        if self.shunt_at >= self.curve.max_excitation:
            raise InputError(
                f"shunt_at ({quantity(self.shunt_at, 'A')}) must be below the end of the magnetization curve "
                f"({quantity(self.curve.max_excitation, 'A')}): extend the curve"
            )

    @property
    def i_max_a(self) -> float:
        """Highest armature current the magnetization curve covers. [A]"""
        return (self.curve.max_excitation - self.shunt_at) / self.series_turns

    def require_dynamics(self) -> None:
        """Refuse speed or torque without the curve's speed."""
        _require_speed(self.curve, self.kind)

    def field_at(self, i_a):
        """Total field ampere-turns per pole, :math:`F_{sh} + N_{se} I`. [A]"""
        return self.shunt_at + self.series_turns * np.asarray(i_a, dtype=float)

    def _k_phi_values(self, i_a):
        """Back-EMF per rpm at armature currents ``i_a``. [V/rpm]"""
        return self.curve.k_phi_at(self.field_at(i_a))

    def relative_flux(self, i_a):
        """Curve EMF at the total field ampere-turns for ``i_a``. [V]"""
        return self.curve.emf_at(self.field_at(i_a))


def k_phi_from_rating(
    v_rated_v: float, i_rated_a: float, n_rated_rpm: float, r_armature_ohm: float, brush_drop_v: float = 0.0
) -> float:
    r"""Back-EMF constant of a shunt motor from its rating plate.

    Parameters
    ----------
    v_rated_v : float
        Rated armature voltage. [V]
    i_rated_a : float
        Rated armature current. [A]
    n_rated_rpm : float
        Rated speed. [rpm]
    r_armature_ohm : float
        Armature-circuit resistance. [ohm]
    brush_drop_v : float, optional
        Total brush drop. [V]

    Returns
    -------
    float
        :math:`k\Phi`. [V/rpm]

    Examples
    --------
    A 220 V, 100 A, 1000 rpm motor of 0.1 ohm with 2 V brush drop (invented rating):

    >>> round(k_phi_from_rating(220.0, 100.0, 1000.0, 0.1, 2.0), 4)
    0.208

    Notes
    -----
    .. math:: k\Phi = \frac{V - I R_a - V_b}{n}

    References
    ----------
    .. [1] Fitzgerald, Kingsley, Umans, *Electric Machinery*, 6th ed., 2003,
       Eq. 7.8 (terminal equation of a DC motor).
    """
    v = require_positive("v_rated", v_rated_v, "V")
    i = require_positive("i_rated", i_rated_a, "A")
    n = require_positive("n_rated", n_rated_rpm, "rpm")
    r = require_positive("r_armature", r_armature_ohm, "ohm")
    emf = v - i * r - require_non_negative("brush_drop", brush_drop_v, "V")  # Eq. 7.8 of [1]
    if emf <= 0.0:
        raise DesignError(
            f"the rating gives no back-EMF: i_rated x r_armature + brush_drop "
            f"({quantity(i * r + brush_drop_v, 'V')}) is not below v_rated ({quantity(v, 'V')})"
        )
    return emf / n


def back_emf_v(k_phi_v_per_rpm, n_rpm):
    r"""Back-EMF of a DC machine at a speed.

    Parameters
    ----------
    k_phi_v_per_rpm : float or array_like
        Machine constant times flux. [V/rpm]
    n_rpm : float or array_like
        Shaft speed. [rpm]

    Returns
    -------
    float or numpy.ndarray
        Back-EMF. [V]

    Notes
    -----
    .. math:: E = k\Phi n

    References
    ----------
    .. [1] Fitzgerald, Kingsley, Umans, *Electric Machinery*, 6th ed., 2003, Eq. 7.7.
    """
    return np.multiply(k_phi_v_per_rpm, n_rpm)  # Eq. 7.7 of [1]


def torque_nm(k_phi_v_per_rpm, i_a):
    r"""Developed torque of a DC machine.

    Parameters
    ----------
    k_phi_v_per_rpm : float or array_like
        Machine constant times flux. [V/rpm]
    i_a : float or array_like
        Armature current. [A]

    Returns
    -------
    float or numpy.ndarray
        Developed (air-gap) torque. [N·m]

    Notes
    -----
    From power balance :math:`E I = T \omega` with :math:`\omega = 2\pi n/60`:

    .. math:: T = \frac{60}{2\pi} k\Phi I

    References
    ----------
    .. [1] Fitzgerald, Kingsley, Umans, *Electric Machinery*, 6th ed., 2003, Eqs. 7.1, 7.7.
    """
    return NM_PER_V_A_PER_RPM * np.multiply(k_phi_v_per_rpm, i_a)  # Eqs. 7.1, 7.7 of [1]


def effective_supply_v(v_supply_v: float, brush_drop_v: float = 0.0) -> float:
    """Supply voltage less the brush drop, checked to be above zero. [V]

    Parameters
    ----------
    v_supply_v : float
        Supply voltage, above zero. [V]
    brush_drop_v : float, optional
        Total brush drop, at or above zero and below the supply. [V]

    Returns
    -------
    float
        :math:`V - V_b`. [V]

    Examples
    --------
    >>> effective_supply_v(220.0, 2.0)
    218.0
    """
    v = require_positive("v_supply", v_supply_v, "V")
    drop = require_non_negative("brush_drop", brush_drop_v, "V")
    if drop >= v:
        raise InputError(f"brush_drop ({quantity(drop, 'V')}) must be below v_supply ({quantity(v, 'V')})")
    return v - drop


def circuit_resistance_ohm(motor, r_external_ohm: float = 0.0) -> float:
    """Motor resistance plus external resistance, checked to be above zero. [ohm]

    Parameters
    ----------
    motor : Machine
        The machine, a DC machine object (:class:`ShuntMotor`, :class:`SeriesMotor`, :class:`CompoundMotor`). [-]
    r_external_ohm : float, optional
        Resistance in series outside the motor, at or above zero. [ohm]

    Returns
    -------
    float
        :math:`R_m + R_x`. [ohm]

    Examples
    --------
    >>> round(circuit_resistance_ohm(ShuntMotor(0.1, 0.208), 1.0), 6)
    1.1
    """
    r_external = require_non_negative("r_external", r_external_ohm, "ohm")
    return require_positive("r_circuit", motor.r_ohm + r_external, "ohm")


def steady_speed_rpm(motor, v_supply_v: float, i_a, r_external_ohm: float = 0.0, brush_drop_v: float = 0.0):
    r"""Speed at which a motor carries a given current.

    Parameters
    ----------
    motor : Machine
        The machine; its ``r_ohm`` is included in the circuit. [-]
    v_supply_v : float
        Supply voltage. [V]
    i_a : float or array_like
        Armature current, from zero up to the stall current. [A]
    r_external_ohm : float, optional
        Resistance in series outside the motor. [ohm]
    brush_drop_v : float, optional
        Total brush drop. [V]

    Returns
    -------
    float or numpy.ndarray
        Speed; ``inf`` where the flux is zero (a series motor with no
        residual flux at zero current runs away). [rpm]

    Notes
    -----
    .. math:: n = \frac{V - V_b - I (R_m + R_x)}{k\Phi(I)}

    References
    ----------
    .. [1] Fitzgerald, Kingsley, Umans, *Electric Machinery*, 6th ed., 2003, Eq. 7.8.

    Examples
    --------
    The motor of :func:`k_phi_from_rating`'s example at its rated current:

    >>> round(float(steady_speed_rpm(ShuntMotor(0.1, 0.208), 220.0, 100.0, 0.0, 2.0)), 1)
    1000.0
    """
    v = effective_supply_v(v_supply_v, brush_drop_v)
    r = circuit_resistance_ohm(motor, r_external_ohm)
    i = _currents(i_a)
    i_stall = v / r
    if np.any(i > i_stall):
        raise InputError(
            f"current ({quantity(float(np.max(i)), 'A')}) is above the stall current "
            f"{quantity(i_stall, 'A')} (supply less brush drop over circuit resistance)"
        )
    return motor.speed_rpm(v, r, i)  # Eq. 7.8 of [1]


def developed_torque_nm(motor, i_a):
    r"""Developed torque of a motor at armature current ``i_a``.

    Parameters
    ----------
    motor : Machine
        The machine. [-]
    i_a : float or array_like
        Armature current, at or above zero. [A]

    Returns
    -------
    float or numpy.ndarray
        Developed torque :math:`T = \frac{60}{2\pi} k\Phi(I)\,I`. [N·m]

    Examples
    --------
    >>> round(float(developed_torque_nm(ShuntMotor(0.1, 0.208), 100.0)), 2)
    198.63
    """
    return np.asarray(motor.torque_nm(_currents(i_a)))[()]


def series_torque_nm(curve: MagnetizationCurve, i_a):
    r"""Developed torque of a series motor from its magnetization curve alone.

    Parameters
    ----------
    curve : MagnetizationCurve
        EMF against armature current, with the speed it was measured at. [-]
    i_a : float or array_like
        Armature current, at or above zero. [A]

    Returns
    -------
    float or numpy.ndarray
        :math:`T = \frac{60}{2\pi} \frac{E_{mag}(I)}{n_{mag}} I`; the series
        resistance does not enter. [N·m]
    """
    i = _currents(i_a)
    return np.asarray(torque_nm(_checked_curve(curve, "series").k_phi_at(i), i))[()]  # Eqs. 7.1, 7.7 of [1]


def _currents(i_a) -> np.ndarray:
    """Armature currents as an array of the input's shape, each at or above zero. [A]"""
    i = as_float_array("current", i_a, "A").reshape(np.shape(i_a))
    if np.any(i < 0.0):
        raise InputError(f"current ({quantity(float(np.min(i)), 'A')}) must not be negative")
    return i


def residual_speed_rpm(motor, v_supply_v: float, brush_drop_v: float = 0.0) -> float:
    r"""Speed an unloaded motor tends to as its current tends to zero.

    Parameters
    ----------
    motor : SeriesMotor or CompoundMotor
        The machine, with its magnetization curve. [-]
    v_supply_v : float
        Supply voltage. [V]
    brush_drop_v : float, optional
        Total brush drop. [V]

    Returns
    -------
    float
        :math:`n_0 = (V - V_b)/k\Phi(0)`; ``inf`` where the curve has no
        residual flux: the series motor runs away. A warning figure: friction
        and windage hold the real speed lower. [rpm]
    """
    k_phi_zero = float(motor.k_phi(0.0))
    v = effective_supply_v(v_supply_v, brush_drop_v)
    return v / k_phi_zero if k_phi_zero > 0.0 else np.inf  # Eq. 7.8 of [1] at I = 0


@dataclass(frozen=True)
class MinimumLoad:
    """The least load that holds a series motor at or below a safe speed.

    Attributes
    ----------
    i_a : float
        Least armature current. [A]
    torque_nm : float
        Developed torque at that current; the load (with friction and
        windage) must be at least this. [N·m]
    n_residual_rpm : float
        Speed on residual flux alone (current tending to zero); ``inf`` with
        no residual flux. A warning figure of the runaway. [rpm]
    """

    i_a: float
    torque_nm: float
    n_residual_rpm: float


def minimum_load(
    motor, v_supply_v: float, n_max_rpm: float, r_external_ohm: float = 0.0, brush_drop_v: float = 0.0
) -> MinimumLoad:
    r"""Least current and torque that keep a series or compound motor below a speed.

    Speed falls as current rises (:func:`steady_speed_rpm`), so the least
    safe current is the root of :math:`V - V_b - I R = n_{max}\,k\Phi(I)`,
    found by Brent's method between zero and the lesser of the stall current
    and the end of the magnetization curve.

    Parameters
    ----------
    motor : SeriesMotor or CompoundMotor
        The machine, with its magnetization curve. [-]
    v_supply_v : float
        Supply voltage. [V]
    n_max_rpm : float
        Highest safe speed (mechanical limit of armature, gearing or load). [rpm]
    r_external_ohm : float, optional
        Resistance in series outside the motor. [ohm]
    brush_drop_v : float, optional
        Total brush drop. [V]

    Returns
    -------
    MinimumLoad
        Current 0 A and torque 0 N·m where even the no-load speed is safe. [-]

    References
    ----------
    .. [1] Fitzgerald, Kingsley, Umans, *Electric Machinery*, 6th ed., 2003,
       sec. 7.6 (series motors must not be run unloaded).
    .. [2] R. P. Brent, *Algorithms for Minimization without Derivatives*,
       Prentice-Hall, 1973, ch. 4.

    Examples
    --------
    A series motor of 0.1 ohm with a straight curve, 200 V at 100 A and 1000 rpm
    (invented figures), on 220 V and kept below 2000 rpm: by hand,
    :math:`220 - 0.1 I = 2000 \cdot 0.002 I` gives :math:`I = 220/4.1`:

    >>> curve = magnetization_curve([0.0, 100.0], [0.0, 200.0], speed_rpm=1000.0)
    >>> least = minimum_load(SeriesMotor(0.1, curve), 220.0, 2000.0)
    >>> round(least.i_a, 2), round(least.torque_nm, 1), least.n_residual_rpm
    (53.66, 55.0, inf)
    """
    v = effective_supply_v(v_supply_v, brush_drop_v)
    n_max = require_positive("n_max", n_max_rpm, "rpm")
    r = circuit_resistance_ohm(motor, r_external_ohm)
    n_residual = residual_speed_rpm(motor, v_supply_v, brush_drop_v)

    def surplus_v(i_a: float) -> float:
        return v - i_a * r - n_max * float(motor.k_phi(i_a))

    if surplus_v(0.0) <= 0.0:
        return MinimumLoad(0.0, 0.0, n_residual)
    i_top = min(v / r, motor.i_max_a)
    if surplus_v(i_top) > 0.0:
        raise DesignError(
            f"the speed stays above n_max ({quantity(n_max, 'rpm')}) up to "
            f"{quantity(i_top, 'A')}, the end of the magnetization curve: extend the curve or check n_max"
        )
    i_min = brentq(surplus_v, 0.0, i_top, xtol=1e-9, rtol=1e-12)  # Brent's method [2]
    return MinimumLoad(i_min, float(developed_torque_nm(motor, i_min)), n_residual)

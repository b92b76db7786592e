r"""Braking and lowering of DC motors: braking resistors, the stop in time, and the lowering speed.

Two braking connections are modelled [1]_, [2]_:

* **dynamic** (rheostatic): the armature is switched from the supply onto the
  braking resistor; the machine runs as a generator on its own back-EMF. A
  shunt or separately excited motor keeps its field on the supply (constant
  flux); a series motor's field is reconnected so that the braking current
  keeps its direction through it, and the field is self-excited from residual
  flux.
* **plugging** (counter-current): the armature is reversed on the supply
  through the braking resistor; supply voltage and back-EMF then drive the
  current together. At standstill the motor would start in reverse: it must be
  disconnected there.

With :math:`i` the braking current (positive against the motoring direction),
:math:`R = R_m + R_b` the whole braking circuit, :math:`V_s` the supply in the
loop (0 for dynamic braking, :math:`V - V_b` for plugging) and the laws of the
DC machine (Fitzgerald et al. [3]_, Eqs. 7.7, 7.8 and sec. 7.9):

.. math::

    L\,\frac{di}{dt} = V_s + k\Phi(i)\,n - V_b - R\,i, \qquad
    J\,\frac{d\omega}{dt} = -\frac{60}{2\pi}\,k\Phi(i)\,i - T_L(n)

where :math:`T_L` is the load torque against motion (positive: it helps the
stop; negative: an overhauling load that drives the shaft). In dynamic
braking the current does not reverse: where the back-EMF falls below the brush
drop it stays at zero.

Series self-excitation. The field builds up only where the resistance line
:math:`R\,i` lies below the magnetization curve scaled to the speed, i.e.
where :math:`R` is below the critical resistance :math:`R_c(n) = n\,\max_i
dk\Phi/di`, the slope of the linear part of the curve [3]_ (sec. 7.6, voltage
build-up of self-excited generators, from memory). Below the critical speed
:math:`n_c = R/\max dk\Phi/di` the braking rests on residual flux alone, which
cannot be relied upon.

References
----------
.. [1] G. K. Dubey, *Fundamentals of Electrical Drives*, 2nd ed., Narosa /
   Alpha Science, 2001, ch. 5 (DC motor drives), sections on dynamic braking
   and plugging of separately excited and series motors (from memory: section
   and equation numbers not verified).
.. [2] P. C. Sen, *Principles of Electric Machines and Power Electronics*,
   2nd ed., Wiley, 1997, ch. 4 (DC machines), braking of DC motors (from
   memory: section number not verified).
.. [3] A. E. Fitzgerald, C. Kingsley Jr., S. D. Umans, *Electric Machinery*,
   6th ed., McGraw-Hill, 2003, ch. 7, Eqs. 7.7-7.8; sec. 7.9 (transients).
.. [4] A. Sandu et al., "Benchmarking stiff ODE solvers for atmospheric
   chemistry problems II: Rosenbrock solvers," *Atmospheric Environment*,
   vol. 31, no. 20, pp. 3459-3472, 1997 (RODAS3, the integrator of
   :mod:`notchwise.formulas.notch_integrator`, which the stop shares).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy.integrate import quad
from scipy.optimize import brentq

from .dc_motor import effective_supply_v, torque_nm
from .induction_motor import MAX_SPEED_PER_SYNC
from .errors import DesignError, InputError, choose, quantity, require_non_negative, require_positive
from .machines import NM_PER_V_A_PER_RPM, RAD_S_PER_RPM
from .compiled import compiled
from .notch_integrator import (  # the start's integrator and its Hermite helpers: one machinery
    DYNAMIC_BRAKE, PLUG, checked_rtol, circuit_system, cubic_at, cubic_integrals, cubic_root,
    derivatives, hermite_cubic, rosenbrock_step, step_factor, turning_point,
)
from .start_load import LoadTorque, load_torque

__all__ = [
    "MODES",
    "STOP_MODES",
    "LOWERING_MODES",
    "NOT_MODELLED",
    "MAX_SPEED_RPM",
    "TIME_CAP_FACTOR",
    "SHORTEST_STOP_S",
    "MAX_EVALUATIONS",
    "brake_resistance_ohm",
    "BuildUp",
    "lowering_speed_rpm",
    "StopResult",
    "simulate_stop",
    "overspeed_margin",
]

#: Every braking and lowering mode.
MODES = ("dynamic", "plugging", "counter-torque", "regenerative")
#: Modes of a stop in time, per motor kind (kinds as in the motor block).
STOP_MODES = {"shunt": ("dynamic", "plugging"), "series": ("dynamic", "plugging"), "compound": (),
              "wound rotor": ("plugging",)}
#: Modes of steady lowering of an overhauling load, per motor kind.
LOWERING_MODES = {"shunt": ("dynamic",), "series": ("dynamic",), "compound": (),
                  "wound rotor": ("counter-torque", "regenerative")}
#: Modes named for a kind but outside the model, with the words that say so.
NOT_MODELLED = {
    ("wound rotor", "dynamic"): "dynamic braking of a wound-rotor motor is by DC injection into the stator, "
                                "which is not modelled here",
}
#: Highest speed accepted as input: no machine in this field turns faster. Common practice, no source. [rpm]
MAX_SPEED_RPM = 1.0e5
#: Points on which a magnetization curve is sampled for its steepest slope and the steady currents. [-]
_CURVE_POINTS = 1024
#: Speeds on which the decelerating torque is checked before a stop is integrated. [-]
_SPEED_POINTS = 128
#: Shortest stop accepted: no real drive stops faster. Common practice, no source. [s]
SHORTEST_STOP_S = 1e-6
#: The stop may last at most this many times its estimate before it is refused. [-]
TIME_CAP_FACTOR = 20.0


def _kind(motor) -> str:
    """The machine's kind (``Machine.kind``), by which the modes are offered."""
    kind = getattr(motor, "kind", None)
    if kind not in STOP_MODES:
        raise InputError(f"motor ({type(motor).__name__}) is not a machine model with braking: {', '.join(STOP_MODES)}")
    return kind


def _mode_for(motor, mode, offered: dict, what: str) -> str:
    """``mode`` checked against the modes ``offered`` for the motor's kind."""
    chosen = choose("mode", mode, MODES)
    kind = _kind(motor)
    if (kind, chosen) in NOT_MODELLED:
        raise InputError(f"mode {chosen}: {NOT_MODELLED[kind, chosen]}; the modes for {what} of a {kind} motor are: "
                         f"{', '.join(offered[kind])}")
    if chosen not in offered[kind]:
        modes = ", ".join(offered[kind]) or "none yet"
        raise InputError(f"mode {chosen} does not apply to {what} of a {kind} motor; its modes are: {modes}")
    return chosen


def brake_resistance_ohm(mode: str, v_supply_v: float, r_armature_ohm: float, e_motor_v: float, i_max_a: float) -> float:
    r"""External resistance that limits the braking current to ``i_max_a`` as braking begins.

    Parameters
    ----------
    mode : {"dynamic", "plugging"}
        Dynamic: armature switched onto the resistor; plugging: armature
        reversed on the supply through it. [-]
    v_supply_v : float
        Supply voltage (enters plugging only). [V]
    r_armature_ohm : float
        Resistance of the motor's armature circuit (series field included). [ohm]
    e_motor_v : float
        Back-EMF at the instant braking begins. [V]
    i_max_a : float
        Highest braking current allowed. [A]

    Returns
    -------
    float
        External braking resistance. [ohm]

    Raises
    ------
    DesignError
        Where the armature resistance alone already holds the current below ``i_max_a``.

    Notes
    -----
    .. math:: R_b = \frac{E}{I_{max}} - R_a \ \text{(dynamic)}, \qquad
              R_b = \frac{V + E}{I_{max}} - R_a \ \text{(plugging)}

    References
    ----------
    .. [1] Fitzgerald, Kingsley, Umans, *Electric Machinery*, 6th ed., 2003,
       Eq. 7.8 applied to the braking loop.
    .. [2] G. K. Dubey, *Fundamentals of Electrical Drives*, 2nd ed., 2001,
       ch. 5, dynamic braking and plugging (from memory).

    Examples
    --------
    200 V of back-EMF, a 0.1 ohm armature and 200 A allowed on a 220 V supply
    (invented figures): :math:`200/200 - 0.1` and :math:`(220 + 200)/200 - 0.1`:

    >>> round(brake_resistance_ohm("dynamic", 220.0, 0.1, 200.0, 200.0), 4)
    0.9
    >>> round(brake_resistance_ohm("plugging", 220.0, 0.1, 200.0, 200.0), 4)
    2.0
    """
    chosen = choose("mode", mode, ("dynamic", "plugging"))
    v = require_positive("v_supply", v_supply_v, "V")
    r_a = require_positive("r_armature", r_armature_ohm, "ohm")
    e = require_positive("e_motor", e_motor_v, "V")
    i_max = require_positive("i_max", i_max_a, "A")
    driving = e if chosen == "dynamic" else v + e  # Eq. 7.8 of [1] on the braking loop; [2]
    r_b = driving / i_max - r_a
    if r_b < 0.0:
        raise DesignError(
            f"no braking resistor is needed: r_armature alone ({quantity(r_a, 'ohm')}) already holds the "
            f"{chosen} current to {quantity(driving / r_a, 'A')}, below i_max ({quantity(i_max, 'A')})"
        )
    return r_b


@dataclass(frozen=True)
class _Circuit:
    """The braking loop: motor, loop voltage and resistance, and the steady current at a speed."""

    motor: object
    dynamic: bool
    v_loop_v: float  # supply less brush drop (plugging), or minus the brush drop (dynamic) [V]
    r_ohm: float

    @property
    def constant_flux(self) -> bool:
        """True where the flux does not follow the braking current (a shunt or separately excited field)."""
        return self.motor.flux_constant

    def k_phi(self, i_a):
        """Flux at braking current ``i_a``, the curve held at its ends. [V/rpm]"""
        i = np.clip(np.abs(i_a), 0.0, self.motor.i_max_a)
        return np.asarray(self.motor.k_phi(i), dtype=float)

    def steady_current_a(self, n_rpm) -> np.ndarray:
        """Current the loop settles to at speed ``n_rpm`` with inductance neglected; reached from 0 A. [A]"""
        n = np.atleast_1d(np.asarray(n_rpm, dtype=float))
        if self.constant_flux:
            return np.clip((self.v_loop_v + self.motor.k_phi_v_per_rpm * n) / self.r_ohm, 0.0, None)
        i = np.linspace(0.0, self.motor.i_max_a, _CURVE_POINTS)
        surplus = self.v_loop_v + np.outer(n, self.k_phi(i)) - self.r_ohm * i  # Eq. 7.8 of [3] at di/dt = 0
        if np.any(surplus[:, -1] > 0.0):
            top = float(n[np.argmax(surplus[:, -1] > 0.0)])
            raise DesignError(
                f"at {quantity(top, 'rpm')} and above the braking current runs beyond the end of the magnetization curve "
                f"({quantity(self.motor.i_max_a, 'A')}): extend the curve or add braking resistance"
            )
        falls = surplus <= 0.0
        first = np.argmax(falls, axis=1)  # the first root from 0 A upwards is the one the current reaches
        lo = np.maximum(first - 1, 0)
        rows = np.arange(n.size)
        s_lo, s_hi = surplus[rows, lo], surplus[rows, first]
        with np.errstate(invalid="ignore", divide="ignore"):
            share = np.where(s_lo > s_hi, s_lo / (s_lo - s_hi), 0.0)
        return np.where(surplus[:, 0] <= 0.0, 0.0, i[lo] + share * (i[first] - i[lo]))

    def refined_current_a(self, n_rpm: float) -> float:
        """:meth:`steady_current_a` at one speed, polished by Brent's method. [A]"""
        guess = float(self.steady_current_a(n_rpm)[0])
        if self.constant_flux or guess == 0.0:
            return guess
        step = self.motor.i_max_a / (_CURVE_POINTS - 1)

        def surplus(i):
            return self.v_loop_v + float(self.k_phi(i)) * n_rpm - self.r_ohm * i

        lo, hi = max(guess - 1.5 * step, 0.0), min(guess + 1.5 * step, self.motor.i_max_a)
        return brentq(surplus, lo, hi, xtol=1e-12, rtol=1e-13) if surplus(lo) > 0.0 >= surplus(hi) else guess

    def braking_torque_nm(self, i_a):
        """Developed torque against motion at braking current ``i_a``. [N·m]"""
        return torque_nm(self.k_phi(i_a), i_a)


def _circuit(motor, dynamic: bool, v_loop_v: float, r_external_ohm: float) -> _Circuit:
    """The braking loop of ``motor`` with ``r_external_ohm`` outside it, checked."""
    r = require_positive("r_circuit", motor.r_ohm + require_non_negative("r_external", r_external_ohm, "ohm"), "ohm")
    motor.require_dynamics()
    return _Circuit(motor, dynamic, v_loop_v, r)


@dataclass(frozen=True)
class BuildUp:
    """Where a series motor's self-excited braking field still builds up.

    Attributes
    ----------
    critical_speed_rpm : float
        Below this speed the circuit resistance exceeds the critical resistance. [rpm]
    i_least_a : float
        Steady braking current at the critical speed: the least current at
        which self-excited braking still builds up. [A]
    """

    critical_speed_rpm: float
    i_least_a: float


def _series_build_up(circuit: _Circuit) -> BuildUp:
    r"""Critical speed and least build-up current of self-excited series braking.

    Parameters
    ----------
    circuit : _Circuit
        The dynamic-braking loop of a series motor (its resistance and brush drop). [-]

    Returns
    -------
    BuildUp
        Critical speed [rpm] and least build-up current [A].

    .. math:: n_c = \frac{R}{\max_i dk\Phi/di}, \qquad I_b: \ k\Phi(I_b)\,n_c = V_b + R\,I_b

    Raises
    ------
    DesignError
        Where the curve has no residual flux (nothing to build up from).
    """
    if float(circuit.k_phi(0.0)) <= 0.0:
        raise DesignError(
            "mag_curve has no residual EMF at 0 A: a series motor's self-excited braking field has nothing to "
            "build up from; give the residual EMF the motor shows, or use plugging"
        )
    i = np.linspace(0.0, circuit.motor.i_max_a, _CURVE_POINTS)
    slope = float(np.max(np.diff(circuit.k_phi(i)) / np.diff(i)))  # the linear part of the curve [3]
    n_c = circuit.r_ohm / slope
    return BuildUp(n_c, circuit.refined_current_a(n_c))


def lowering_speed_rpm(motor, r_external_ohm: float, lowering_torque_nm: float, mode: str = "dynamic",
                       brush_drop_v: float = 0.0) -> float:
    r"""Steady speed at which braking holds an overhauling load.

    Parameters
    ----------
    motor : ShuntMotor, SeriesMotor or WoundRotorMotor
        The machine; a series motor needs its magnetization curve with its speed. [-]
    r_external_ohm : float
        Braking resistance outside the motor (a wound rotor: per phase, rotor side). [ohm]
    lowering_torque_nm : float
        Torque the descending load exerts on the motor shaft, above zero. [N·m]
    mode : {"dynamic", "counter-torque", "regenerative"}
        DC motors: armature on the resistor. Wound rotor: ``counter-torque``
        (stator connected for hoisting, slip above 1) or ``regenerative``
        (stator connected for lowering, above synchronous speed); see
        :func:`_rotor_lowering_rpm`. In every mode MORE resistance gives a
        FASTER descent. [-]
    brush_drop_v : float, optional
        Total brush drop. [V]

    Returns
    -------
    float
        Lowering speed. [rpm]

    Notes
    -----
    In steady state the braking torque equals the load torque and the back-EMF
    drives the current through the circuit:

    .. math:: T = \frac{60}{2\pi} k\Phi(I)\,I, \qquad k\Phi(I)\,n = V_b + I (R_m + R_x)
              \ \Rightarrow\ n = \frac{V_b + I(R_m + R_x)}{k\Phi(I)}

    (for constant flux :math:`n = (V_b + 2\pi T R/(60\,k\Phi))/k\Phi`).

    Raises
    ------
    DesignError
        Where a series field would not build up at that speed (the load is too
        light, or the resistance above the critical resistance).

    References
    ----------
    See the module docstring ([1]_, [3]_ Eqs. 7.7, 7.8).

    Examples
    --------
    The shunt motor of :func:`notchwise.formulas.dc_motor.k_phi_from_rating`'s
    example holding 150 N·m on 0.9 ohm (invented figures): the current is
    :math:`I = 150/(9.549 \cdot 0.208)` and :math:`n = I (0.1 + 0.9)/0.208`:

    >>> from notchwise.formulas.dc_motor import ShuntMotor
    >>> round(lowering_speed_rpm(ShuntMotor(0.1, 0.208), 0.9, 150.0), 1)
    363.1
    """
    chosen = _mode_for(motor, mode, LOWERING_MODES, "lowering")
    if chosen in _ROTOR_LOWERING:
        return _rotor_lowering_rpm(motor, r_external_ohm, lowering_torque_nm, chosen)
    vb = require_non_negative("brush_drop", brush_drop_v, "V")
    circuit = _circuit(motor, True, -vb, r_external_ohm)
    t = require_positive("lowering_torque", lowering_torque_nm, "N·m")
    if circuit.constant_flux:
        i = t / (NM_PER_V_A_PER_RPM * motor.k_phi_v_per_rpm)  # Eq. 7.1 of [3]
    else:
        i_top = motor.i_max_a
        if float(circuit.braking_torque_nm(i_top)) < t:
            raise DesignError(
                f"lowering_torque ({quantity(t, 'N·m')}) is above the torque at the end of the magnetization curve "
                f"({quantity(float(circuit.braking_torque_nm(i_top)), 'N·m')} at {quantity(i_top, 'A')}): extend the curve"
            )
        i = brentq(lambda x: float(circuit.braking_torque_nm(x)) - t, 0.0, i_top, xtol=1e-12, rtol=1e-13)
    n = (vb + i * circuit.r_ohm) / float(circuit.k_phi(i))  # Eq. 7.8 of [3]
    if not math.isfinite(n) or n > MAX_SPEED_RPM:
        raise DesignError(f"the load is not held: the lowering speed would exceed {quantity(MAX_SPEED_RPM, 'rpm')}")
    if not circuit.constant_flux:
        build = _series_build_up(circuit)
        if n < build.critical_speed_rpm:
            raise DesignError(
                f"the series field does not build up at {quantity(t, 'N·m')}: the current "
                f"({quantity(i, 'A')}) is below the least build-up current ({quantity(build.i_least_a, 'A')}) and "
                f"the circuit ({quantity(circuit.r_ohm, 'ohm')}) is above the critical resistance at "
                f"{quantity(n, 'rpm')}; a load this light is held on residual flux only: use less resistance"
            )
    return n


@dataclass(frozen=True)
class StopResult:
    """A simulated stop.

    Attributes
    ----------
    t_stop_s : float
        Time from the start of braking to ``n_end``. [s]
    revolutions : float
        Revolutions turned in that time. [-]
    i_peak_a : float
        Highest braking current. [A]
    n_peak_rpm : float
        Highest speed (above the start where an overhauling load speeds the shaft up first). [rpm]
    torque_start_nm : float
        Braking torque at the starting speed once the current has built up
        (inductance neglected). [N·m]
    torque_end_nm : float
        Braking torque as the speed reaches ``n_end``. [N·m]
    energy_brake_j, energy_motor_j : float
        Energy in the braking resistor and in the motor's own resistance. [J]
    energy_supply_j : float
        Energy drawn from the supply (plugging; 0 J for dynamic braking). [J]
    i_end_a : float
        Current as the speed reaches ``n_end``. [A]
    n_end_rpm : float
        The speed the stop was taken to. [rpm]
    build_up : BuildUp or None
        Series dynamic braking only: critical speed and least build-up current.
    """

    t_stop_s: float
    revolutions: float
    i_peak_a: float
    n_peak_rpm: float
    torque_start_nm: float
    torque_end_nm: float
    energy_brake_j: float
    energy_motor_j: float
    energy_supply_j: float
    i_end_a: float
    n_end_rpm: float
    build_up: BuildUp | None


#: Most evaluations of the equations and steps one stop may take before it is refused (bounds a cell's time). [-]
MAX_EVALUATIONS = 50_000


@dataclass(frozen=True)
class _Trace:
    """What the integrator hands back: end state, peaks and the integrals of i, i² and n."""

    t_s: float
    i_a: float
    i_peak_a: float
    n_peak_rpm: float
    charge_c: float
    i2t_a2s: float
    n_t_rpm_s: float


#: How the compiled stop loop ended: the speed reached ``n_end``, the time cap passed, or no step could be taken. [-]
_REACHED, _TIMED_OUT, _FAILED = 0, 1, 2


def _integrate_stop(circuit: _Circuit, load: LoadTorque, l_h: float, j: float, n_start: float, n_end: float,
                    t_cap: float, rtol: float) -> _Trace:
    """Integrate the braking loop and the shaft from (0 A, n_start) until the speed falls to ``n_end``.

    The one place that integrates, with the start's machinery
    (:mod:`notchwise.formulas.notch_integrator`): RODAS3 steps
    (:func:`~notchwise.formulas.notch_integrator.rosenbrock_step`, L-stable for
    the loop's L/R against the mechanical time constant) with the exact
    Jacobian of the braking loop
    (:func:`~notchwise.formulas.notch_integrator.derivatives` in a braking
    mode: the motor's flux at the current's magnitude, held within its curve),
    and between steps the cubic Hermite interpolant, on which the speed reaching
    ``n_end`` is located, the peaks of current and speed are found, and
    :math:`\\int i\\,dt`, :math:`\\int i^2 dt`, :math:`\\int n\\,dt` are
    integrated exactly; compiled where numba is installed. Steps are bounded by
    :data:`MAX_EVALUATIONS`.
    """
    breaks, rows = circuit.motor.notch_flux.current_pieces
    system = circuit_system(breaks, rows, load.speed_rpm, load.torque_nm, circuit.v_loop_v, circuit.r_ohm, l_h, j,
                            DYNAMIC_BRAKE if circuit.dynamic else PLUG, circuit.motor.notch_flux.i_max_a)
    i_floor = 1e-3 * max(abs(float(circuit.steady_current_a(n_start)[0])), 1.0)
    h = min(t_cap, 0.5 * l_h / circuit.r_ohm * rtol ** (1.0 / 3.0))
    code, *trace = _run_stop(system, n_start, n_end, t_cap, rtol, i_floor, 1e-3 * n_start, h, l_h / circuit.r_ohm,
                             MAX_EVALUATIONS)
    if code == _TIMED_OUT:
        raise DesignError(
            f"the speed did not fall to n_end ({quantity(n_end, 'rpm')}) within {quantity(t_cap, 's')}, "
            f"{TIME_CAP_FACTOR:g} times the stop's estimate: the braking is as good as lost"
        )
    if code == _FAILED:
        raise DesignError(
            f"the stop could not be integrated (more than {MAX_EVALUATIONS} steps or a figure that is not finite, "
            f"after {quantity(trace[0], 's')}): check inertia, inductance, load and speeds for values far outside a "
            "real drive"
        )
    return _Trace(*trace)


@compiled
def _run_stop(system, n_start, n_end, t_cap, rtol, i_floor, n_floor, h, tau, max_evaluations):
    """The step loop of :func:`_integrate_stop` (compiled): a code, then the fields of :class:`_Trace`."""
    i, n, t = 0.0, n_start, 0.0
    fi, fn, j11, j12, j21, j22 = derivatives(system, i, n)
    i_peak, n_peak = 0.0, n_start
    charge = i2t = n_t = 0.0
    for _ in range(max_evaluations):
        i1, n1, ei, en = rosenbrock_step(system, i, n, fi, fn, j11, j12, j21, j22, h)
        err = math.sqrt(0.5 * ((ei / (rtol * (max(abs(i), abs(i1)) + i_floor))) ** 2
                               + (en / (rtol * (max(abs(n), abs(n1)) + n_floor))) ** 2))
        if not err <= 1.0:  # too large, or not a number
            h *= step_factor(err)
            if h < 1e-14 * max(t, tau):
                break
            continue
        f1i, f1n, g11, g12, g21, g22 = derivatives(system, i1, n1)
        pi = hermite_cubic(i, i1, h * fi, h * f1i)  # the step's cubics in s = (t - t0)/h
        pn = hermite_cubic(n, n1, h * fn, h * f1n)
        s_end = cubic_root(pn, n_end, 0.0, 1.0, n - n_end, n1 - n_end) if n1 <= n_end else 1.0
        if fi > 0.0 >= f1i:
            s_top = turning_point(pi)
            if 0.0 < s_top <= s_end:
                i_peak = max(i_peak, cubic_at(pi, s_top))
        if fn > 0.0 >= f1n:
            s_top = turning_point(pn)
            if 0.0 < s_top <= s_end:
                n_peak = max(n_peak, cubic_at(pn, s_top))
        charge_step, i2t_step = cubic_integrals(pi, s_end)
        charge += h * charge_step
        i2t += h * i2t_step
        n_t += h * cubic_integrals(pn, s_end)[0]
        if s_end < 1.0:
            i_end = cubic_at(pi, s_end)
            return _REACHED, t + s_end * h, i_end, max(i_peak, i_end), n_peak, charge, i2t, n_t
        t += h
        if t >= t_cap:
            return _TIMED_OUT, t, i1, i_peak, n_peak, charge, i2t, n_t
        i, n = i1, n1
        fi, fn, j11, j12, j21, j22 = f1i, f1n, g11, g12, g21, g22
        i_peak, n_peak = max(i_peak, i), max(n_peak, n)
        h = min(h * step_factor(err), t_cap - t)
    return _FAILED, t, i, i_peak, n_peak, charge, i2t, n_t


def simulate_stop(
    motor,
    v_supply_v: float,
    r_brake_ohm: float,
    mode: str,
    l_circuit_h: float,
    inertia_kgm2: float,
    load,
    n_start_rpm: float,
    n_end_rpm: float | None = None,
    brush_drop_v: float = 0.0,
    rtol: float = 1e-5,
) -> StopResult:
    r"""Simulate a braking stop of a DC motor in time, from ``n_start_rpm`` to ``n_end_rpm``.

    Parameters
    ----------
    motor : ShuntMotor, SeriesMotor or WoundRotorMotor
        The machine; a series motor needs its magnetization curve with its
        speed. A wound-rotor motor is plugged quasi-steadily with
        ``r_brake_ohm`` in its rotor (:func:`_plug_rotor`); ``v_supply_v``,
        ``l_circuit_h`` and ``brush_drop_v`` are not used for it (its own
        line voltage serves). [-]
    v_supply_v : float
        Supply voltage (plugging drives the current with it). [V]
    r_brake_ohm : float
        Braking resistance outside the motor, at or above zero (a wound
        rotor: per phase, rotor side). [ohm]
    mode : {"dynamic", "plugging"}
        The braking connection (see the module docstring); a wound-rotor
        motor: ``plugging`` only (DC injection is not modelled). [-]
    l_circuit_h : float or None
        Inductance of the braking circuit, above zero (DC motors). [H]
    inertia_kgm2 : float
        Inertia of motor and load referred to the motor shaft, above zero. [kg·m²]
    load : float, array_like or LoadTorque
        Load torque against motion: positive helps the stop, negative
        overhauls (:func:`notchwise.formulas.start_load.load_torque`, signed). [N·m]
    n_start_rpm : float
        Speed at which braking begins, above zero. [rpm]
    n_end_rpm : float, optional
        Speed the stop is taken to, below ``n_start_rpm``; default 0 rpm. [rpm]
    brush_drop_v : float, optional
        Total brush drop. [V]
    rtol : float, optional
        Relative tolerance of the integrator, 1e-12 to 1e-2; the default 1e-5 keeps time, revolutions and
        energies within 1e-5 of the closed forms of tests/test_braking.py (chosen by measurement). [-]

    Returns
    -------
    StopResult

    Raises
    ------
    DesignError
        Where the braking cannot take the speed to ``n_end``: an overhauling
        load that the braking only holds, dynamic braking of a constant-flux
        motor taken to 0 rpm with nothing opposing motion (it decays without
        end), or a series field that cannot build up at ``n_start``.

    Notes
    -----
    .. math:: L\frac{di}{dt} = V_s + k\Phi(i) n - V_b - R i,\quad
              J\frac{d\omega}{dt} = -\frac{60}{2\pi}k\Phi(i) i - T_L(n)

    The braking current starts from 0 A (the braking contactor closes on a
    dead circuit). Energies: :math:`R_b\int i^2dt`, :math:`R_m\int i^2dt`,
    :math:`V\int i\,dt` (plugging).

    References
    ----------
    See the module docstring.
    """
    chosen = _mode_for(motor, mode, STOP_MODES, "a stop")
    j = require_positive("inertia", inertia_kgm2, "kg·m²")
    n_start = require_positive("n_start", n_start_rpm, "rpm")
    if n_start > MAX_SPEED_RPM:
        raise InputError(f"n_start ({quantity(n_start, 'rpm')}) must be at most {quantity(MAX_SPEED_RPM, 'rpm')}")
    n_end = 0.0 if n_end_rpm is None else require_non_negative("n_end", n_end_rpm, "rpm")
    if n_end >= n_start:
        raise InputError(f"n_end ({quantity(n_end, 'rpm')}) must be below n_start ({quantity(n_start, 'rpm')})")
    load = load_torque(load, signed=True)
    rtol = checked_rtol(rtol)
    if _kind(motor) == "wound rotor":  # quasi-steady: no circuit transient, so no supply, drop or inductance
        return _plug_rotor(motor, r_brake_ohm, j, load, n_start, n_end, rtol)
    v_eff = effective_supply_v(v_supply_v, brush_drop_v)
    dynamic = chosen == "dynamic"
    circuit = _circuit(motor, dynamic, v_eff - v_supply_v if dynamic else v_eff, r_brake_ohm)
    l_h = require_positive("l_circuit", l_circuit_h, "H")

    build = None
    if not circuit.constant_flux and dynamic:
        build = _series_build_up(circuit)
        if n_start <= build.critical_speed_rpm:
            raise DesignError(
                f"the series field cannot build up: at n_start ({quantity(n_start, 'rpm')}) the braking circuit "
                f"({quantity(circuit.r_ohm, 'ohm')}) is above the critical resistance, which needs "
                f"{quantity(build.critical_speed_rpm, 'rpm')} or more; the braking current would stay below "
                f"{quantity(build.i_least_a, 'A')}: use less braking resistance"
            )
    speeds = np.linspace(n_end, n_start, _SPEED_POINTS)
    decelerating = circuit.braking_torque_nm(circuit.steady_current_a(speeds)) + load.at(speeds)
    _check_decelerates(speeds, decelerating, chosen, n_end)
    swing = j * RAD_S_PER_RPM * (n_start - n_end)  # angular momentum to take out [N·m·s]
    t_shortest, t_estimate = swing / float(np.max(decelerating)), swing / float(np.min(decelerating)) + l_h / circuit.r_ohm
    if not t_shortest >= SHORTEST_STOP_S:
        raise DesignError(
            f"the stop would take about {quantity(t_shortest, 's')}, under {quantity(SHORTEST_STOP_S, 's')}: "
            "no real drive stops so fast; check inertia and load torque"
        )
    trace = _integrate_stop(circuit, load, l_h, j, n_start, n_end, TIME_CAP_FACTOR * t_estimate, rtol)
    if trace.i_peak_a > motor.i_max_a:
        raise DesignError(
            f"the braking current ({quantity(trace.i_peak_a, 'A')}) runs beyond the end of the magnetization curve "
            f"({quantity(motor.i_max_a, 'A')}): extend the curve or add braking resistance"
        )
    i_start = circuit.refined_current_a(n_start)
    return StopResult(
        t_stop_s=trace.t_s,
        revolutions=trace.n_t_rpm_s / 60.0,
        i_peak_a=trace.i_peak_a,
        n_peak_rpm=trace.n_peak_rpm,
        torque_start_nm=float(circuit.braking_torque_nm(i_start)),
        torque_end_nm=float(circuit.braking_torque_nm(trace.i_a)),
        energy_brake_j=(circuit.r_ohm - motor.r_ohm) * trace.i2t_a2s,
        energy_motor_j=motor.r_ohm * trace.i2t_a2s,
        energy_supply_j=0.0 if dynamic else v_supply_v * trace.charge_c,
        i_end_a=trace.i_a,
        n_end_rpm=n_end,
        build_up=build,
    )


#: The lowering modes of a wound-rotor motor.
_ROTOR_LOWERING = ("counter-torque", "regenerative")


def _rotor_lowering_rpm(motor, r_external_ohm: float, lowering_torque_nm: float, mode: str) -> float:
    r"""Steady lowering speed of a wound-rotor motor holding an overhauling load, in the lowering direction.

    Parameters
    ----------
    motor : WoundRotorMotor
        The machine (:mod:`notchwise.formulas.induction_motor`). [-]
    r_external_ohm : float
        External rotor resistance per phase, rotor side. [ohm]
    lowering_torque_nm : float
        Torque of the descending load on the motor shaft, above zero. [N·m]
    mode : {"counter-torque", "regenerative"}
        ``counter-torque``: stator connected for hoisting; the load drives the
        motor backwards against its torque, slip above 1. ``regenerative``:
        stator connected for lowering; the load drives it above synchronous
        speed, slip below 0, and it returns power to the supply. [-]

    Returns
    -------
    float
        Lowering speed, above zero. [rpm]

    Notes
    -----
    With :math:`x = R'/s` the torque :math:`T(x)` is Eq. 6.36 of [3]_ (the
    Thevenin torque). Counter-torque: :math:`T(x) = T_L` on the stable side
    (:math:`x` above breakdown), :math:`s = R'/x > 1`,
    :math:`n = n_s (s - 1)`. Regenerative: :math:`T(x) = -T_L` with
    :math:`x < 0` of larger magnitude, :math:`s = R'/x < 0`,
    :math:`n = n_s (1 - s)`. In both, :math:`x` is fixed by the torque, so the
    slip, hence the descent, grows in proportion to :math:`R'`: MORE rotor
    resistance lowers FASTER; in regenerative lowering the least speed is
    with the rotor short-circuited.

    Raises
    ------
    DesignError
        Counter-torque: the load is too light to overhaul the motor's
        standstill torque (the motor hoists it), or it is above the breakdown
        torque (nothing holds it). Regenerative: the load is above the
        generating breakdown torque. Either: the speed would pass twice
        synchronous speed, where the model ends.
    """
    t = require_positive("lowering_torque", lowering_torque_nm, "N·m")
    r2 = motor.rotor_circuit_ohm(r_external_ohm)
    n_s = motor.sync_speed_rpm
    if mode == "counter-torque":
        t_rest = float(motor.torque_at_slip_nm(1.0, r2))
        if t <= t_rest:
            raise DesignError(
                f"no lowering speed: the load ({quantity(t, 'N·m')}) is too light to overhaul the motor, which "
                f"gives {quantity(t_rest, 'N·m')} at standstill on r_external ({quantity(r_external_ohm, 'ohm')}) "
                "and hoists it; counter-torque lowering of this load needs more rotor resistance"
            )
        t_max = motor.breakdown_torque_nm
        if t > t_max:
            raise DesignError(
                f"the load is not held: lowering_torque ({quantity(t, 'N·m')}) is above the breakdown torque "
                f"({quantity(t_max, 'N·m')}), so the load accelerates downwards without a steady speed"
            )
        slip = r2 / motor.r_over_s_at_torque(t)  # Eq. 6.36 of [3], stable root, s > 1
        n = n_s * (slip - 1.0)
    else:
        t_max = motor.generating_breakdown_torque_nm
        if t > t_max:
            raise DesignError(
                f"the load is not held: lowering_torque ({quantity(t, 'N·m')}) is above the generating breakdown "
                f"torque ({quantity(t_max, 'N·m')}), so the load accelerates downwards without a steady speed"
            )
        slip = r2 / motor.r_over_s_generating_at_torque(t)  # Eq. 6.36 of [3], T = -T_L, s < 0
        n = n_s * (1.0 - slip)
    if n > MAX_SPEED_PER_SYNC * n_s:
        raise DesignError(
            f"the load is not held within the motor's model: the lowering speed ({quantity(n, 'rpm')}) would pass "
            f"twice synchronous speed ({quantity(MAX_SPEED_PER_SYNC * n_s, 'rpm')}); less rotor resistance lowers slower"
        )
    return n


def _plug_rotor(motor, r_brake_ohm: float, j: float, load: LoadTorque, n_start: float, n_end: float,
                rtol: float) -> StopResult:
    r"""A plugging stop of a wound-rotor motor with ``r_brake_ohm`` in its rotor, quasi-steady.

    Parameters
    ----------
    motor : WoundRotorMotor
        The machine. [-]
    r_brake_ohm : float
        External rotor resistance per phase, rotor side. [ohm]
    j : float
        Inertia referred to the motor shaft. [kg·m²]
    load : LoadTorque
        Load torque against motion (positive helps the stop). [N·m]
    n_start, n_end : float
        Speeds at which braking begins and the stop ends, checked. [rpm]
    rtol : float
        Relative tolerance of the quadratures. [-]

    Returns
    -------
    StopResult
        ``i_peak_a`` and ``i_end_a`` are rotor currents (rotor side, per phase);
        ``energy_supply_j`` is what the stator draws (air-gap power plus stator
        copper loss).

    Notes
    -----
    Two stator phases swapped: the field turns against the rotor, the slip is
    :math:`s = 1 + n/n_s` and the torque :math:`T(s, R')` (Eq. 6.36 of [3]_)
    opposes motion. The rotor's electrical transient is neglected (as in the
    quasi-steady start), so time and energies are quadratures over speed:

    .. math::

        t = J\frac{2\pi}{60}\int_{n_e}^{n_0}\frac{dn}{T + T_L},\qquad
        W_{rotor} = J\frac{2\pi}{60}\int_{n_e}^{n_0}\frac{s\,T\,\omega_s}{T + T_L}dn,

    the rotor copper loss being :math:`s P_{ag}` with :math:`P_{ag} = T\omega_s`
    ([3]_ sec. 6.4); the braking resistor takes the share
    :math:`(R' - R_2')/R'`. The rotor current rises with the slip, so its peak
    is at the start of braking.
    """
    r2 = motor.rotor_circuit_ohm(r_brake_ohm)
    n_s = motor.sync_speed_rpm
    if n_start > MAX_SPEED_PER_SYNC * n_s:
        raise InputError(f"n_start ({quantity(n_start, 'rpm')}) must be at most twice synchronous speed "
                         f"({quantity(MAX_SPEED_PER_SYNC * n_s, 'rpm')}) for a wound-rotor motor")

    def slip(n):
        return 1.0 + np.asarray(n, dtype=float) / n_s

    def braking(n):
        return motor.torque_at_slip_nm(slip(n), r2)

    speeds = np.linspace(n_end, n_start, _SPEED_POINTS)
    _check_decelerates(speeds, braking(speeds) + load.at(speeds), "plugging", n_end)
    breaks = [float(n) for n in load.speed_rpm if n_end < n < n_start]
    scale = j * RAD_S_PER_RPM

    def over_speed(f):
        value, _ = quad(lambda n: f(n) / (float(braking(n)) + float(load.at(n))), n_end, n_start, points=breaks or None,
                        epsrel=rtol, epsabs=0.0, limit=200)
        return scale * value

    omega_s = motor.omega_sync_rad_s
    t_stop = over_speed(lambda n: 1.0)
    rotor_j = over_speed(lambda n: float(slip(n) * braking(n)) * omega_s)  # s P_ag, sec. 6.4 of [3]

    def stator_w(n):
        i1 = float(motor.currents(slip(n), r2).stator_a)
        return float(braking(n)) * omega_s + 3.0 * motor.r_stator_ohm * i1 * i1

    supply_j = over_speed(stator_w)
    if not all(map(math.isfinite, (t_stop, rotor_j, supply_j))):
        raise DesignError("the plugging stop has no finite time: the braking torque barely exceeds the driving load")
    currents = motor.currents(slip(np.array([n_start, n_end])), r2).rotor_a
    share = (r2 - motor.r_rotor_ohm) / r2
    return StopResult(
        t_stop_s=t_stop,
        revolutions=over_speed(lambda n: n) / 60.0,
        i_peak_a=float(currents[0]),
        n_peak_rpm=n_start,
        torque_start_nm=float(braking(n_start)),
        torque_end_nm=float(braking(n_end)),
        energy_brake_j=share * rotor_j,
        energy_motor_j=(1.0 - share) * rotor_j,
        energy_supply_j=supply_j,
        i_end_a=float(currents[1]),
        n_end_rpm=n_end,
        build_up=None,
    )


def _check_decelerates(speeds, decelerating, mode, n_end):
    """Refuse a stop whose steady decelerating torque vanishes somewhere between n_end and n_start."""
    held = np.nonzero(decelerating <= 0.0)[0]
    if held.size == 0:
        return
    top = int(held[-1])
    if top == speeds.size - 1:
        raise DesignError(
            f"the load overhauls the {mode} braking at n_start ({quantity(float(speeds[-1]), 'rpm')}): the shaft "
            "would speed up, not stop; less braking resistance gives more braking torque"
        )
    if top == 0 and mode == "dynamic":
        raise DesignError(
            "dynamic braking fades with the speed (on constant flux it decays exponentially): with nothing "
            "opposing motion it never reaches n_end 0 rpm; give n_end above zero (e.g. the speed at which the "
            "holding brake sets)"
        )
    a, b = speeds[top], speeds[top + 1]
    raise DesignError(
        f"the braking cannot take the speed below about {quantity(float(0.5 * (a + b)), 'rpm')}, above n_end "
        f"({quantity(n_end, 'rpm')}): there the braking torque, which fades with the speed and ends where the "
        "back-EMF falls to the brush drop, no longer exceeds the driving load (an overhauling load is held at "
        "its lowering speed); give a higher n_end or another connection"
    )


def overspeed_margin(n_rpm: float, n_max_rpm: float) -> tuple[float, str]:
    """Margin of a speed below the highest safe speed, and the verdict.

    Parameters
    ----------
    n_rpm : float
        Speed reached. [rpm]
    n_max_rpm : float
        Highest safe speed of motor, gearing and load, above zero. [rpm]

    Returns
    -------
    tuple of (float, str)
        :math:`n_{max} - n` [rpm] and ``"within n_max"`` or ``"OVERSPEED: above n_max"``.
    """
    n_max = require_positive("n_max", n_max_rpm, "rpm")
    margin = n_max - n_rpm
    return margin, "within n_max" if margin >= 0.0 else "OVERSPEED: above n_max"

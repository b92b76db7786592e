r"""Wound-rotor (slip-ring) induction motors: the machine, its rotor-resistance starter and its check.

The machine is the per-phase T-equivalent circuit of the equivalent star
connection in the form of IEEE Std 112 and IEC 60034-28 [2]_, [3]_: stator
resistance :math:`R_1` and leakage reactance :math:`X_1`, magnetizing reactance
:math:`X_m`, rotor resistance :math:`R_2'` and leakage reactance :math:`X_2'`
referred to the stator. Iron loss is left out (no core-loss resistance beside
:math:`X_m`): it changes the torque during a start by far less than the data's
own uncertainty. Saturation of the leakage paths and skin effect in the rotor
bars are left out too: the parameters are constant.

Seen from the rotor, the stator network reduces to its Thevenin equivalent
([1]_, sec. 6.5, Eqs. 6.34-6.36; section and equation numbers from memory)

.. math::

    \hat V_{th} = \hat V_1\,\frac{jX_m}{R_1 + j(X_1 + X_m)}, \qquad
    Z_{th} = R_{th} + jX_{th} = \frac{jX_m (R_1 + jX_1)}{R_1 + j(X_1 + X_m)},

    T = \frac{3}{\omega_s}\,\frac{V_{th}^2\,(R_2'/s)}{(R_{th} + R_2'/s)^2 + (X_{th} + X_2')^2},

with :math:`V_1` the phase voltage, :math:`\omega_s = 4\pi f/p` the
synchronous speed in rad/s and :math:`s` the slip. The torque is greatest,
:math:`T_{max}`, at :math:`R_2'/s = \sqrt{R_{th}^2 + (X_{th}+X_2')^2}`
([1]_, Eqs. 6.37-6.38, from memory).

Stator-to-rotor ratio. Open-circuited at standstill, the rotor phase voltage is
:math:`V_{th}/a`, so the rating plate's rotor volts :math:`E_2` (line) give
:math:`a = \sqrt 3\,V_{th}/E_2`. Rotor-side resistances are :math:`R = R'/a^2`,
rotor-side currents :math:`I_2 = a I_2'`. Resistor sections are given and
returned in rotor-side ohm per phase, what a grid is built to.

Why the grading is geometric. Torque and both currents depend on the rotor
resistance in circuit :math:`R'` and the slip only through :math:`x = R'/s`.
On the stable side of breakdown (:math:`x` above the breakdown value) torque
falls as :math:`x` rises, so a step starting at torque :math:`T_1` starts at
one value :math:`x_1` and is cut out at torque :math:`T_2` at one value
:math:`x_2 > x_1`, whatever its resistance. Speed, hence slip, is continuous
across a cut: the cut from :math:`R_k'` to :math:`R_{k+1}'` happens at
:math:`s_k = R_k'/x_2` and the next step must start at :math:`x_1`:

.. math::

    R_{k+1}' = s_k x_1 = R_k'\,\frac{x_1}{x_2} = R_k'\,q, \qquad
    R_1' = x_1 \;(s = 1), \qquad q = \frac{x_1}{x_2} < 1,

a geometric series, like the DC shunt motor's [4]_. The same holds for a
current limit, since the current too is a function of :math:`x` alone. The
fewest steps :math:`N` with :math:`R_1' q^N \le R_2'` keep the switching torque
at or above the requested one; the convention of the DC grading then raises the
switching torque until the last cut lands exactly on the rotor's own
resistance, which here is the closed form :math:`q = (R_2'/R_1')^{1/N}`,
:math:`x_2 = x_1/q`, :math:`T_2 = T(x_2)` (the root the DC grading finds by
Brent's method).

References
----------
.. [1] A. E. Fitzgerald, C. Kingsley Jr., S. D. Umans, *Electric Machinery*,
   6th ed., McGraw-Hill, 2003, ch. 6: sec. 6.3 (equivalent circuit), 6.4
   (analysis, air-gap power), 6.5 (torque and power by Thevenin's theorem,
   Eqs. 6.34-6.38), 6.7 (effects of rotor resistance, wound rotors); section
   and equation numbers from memory, not verified against the page.
.. [2] *IEEE Standard Test Procedure for Polyphase Induction Motors and
   Generators*, IEEE Std 112-2017, clause 9 (equivalent circuit).
.. [3] *Rotating electrical machines - Part 28: Test methods for determining
   quantities of equivalent circuit diagrams for three-phase low-voltage
   cage induction motors*, IEC 60034-28:2012, clause 5 (the T circuit).
.. [4] M. G. Say and E. O. Taylor, *Direct Current Machines*, 2nd ed., Pitman,
   1986, ch. on starting (graded starter, geometric law).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import ClassVar

import numpy as np

from .errors import (
    DesignError,
    InputError,
    as_float_array,
    quantity,
    require_below,
    require_count,
    require_non_negative,
    require_positive,
)
from .grading import MAX_NOTCHES, checked_sections, notch_resistances_ohm

__all__ = [
    "WoundRotorMotor",
    "RotorCurrents",
    "RotorGrading",
    "grade_rotor",
    "PlateGrading",
    "grade_rotor_plate",
    "RotorCheck",
    "check_rotor",
    "geometric_steps",
    "rotor_sections",
]

#: Speeds accepted, as a multiple of synchronous speed either way: constant parameters hold no further. [-]
MAX_SPEED_PER_SYNC = 2.0
#: Highest resistance or reactance accepted, per phase, either side. [ohm]
MAX_OHM = 1e6
#: Least torque asked of the inverse law, as a fraction of breakdown torque. [-]
LEAST_TORQUE_FRACTION = 1e-9
#: Most poles accepted: a 6 rpm motor at 50 Hz. [-]
MAX_POLES = 1000


@dataclass(frozen=True)
class RotorCurrents:
    """Stator and rotor current and power factor, one entry per slip.

    Attributes
    ----------
    stator_a : numpy.ndarray
        Stator line current. [A]
    rotor_a : numpy.ndarray
        Rotor current, rotor side (what flows in the slip rings and the grid). [A]
    power_factor : numpy.ndarray
        Power factor at the stator terminals, positive lagging. [-]
    """

    stator_a: np.ndarray
    rotor_a: np.ndarray
    power_factor: np.ndarray


@dataclass(frozen=True)
class WoundRotorMotor:
    """A wound-rotor induction motor: per-phase T circuit of the equivalent star, rating and inertia.

    Attributes
    ----------
    r_stator_ohm : float
        Stator resistance per phase, at or above zero. [ohm]
    x_stator_ohm : float
        Stator leakage reactance per phase at rated frequency, at or above zero. [ohm]
    x_magnetizing_ohm : float
        Magnetizing reactance per phase. [ohm]
    r_rotor_ohm : float
        Rotor resistance per phase referred to the stator (the rotor's own:
        winding, leads, slip rings). [ohm]
    x_rotor_ohm : float
        Rotor leakage reactance per phase at rated frequency, referred to the
        stator, at or above zero. [ohm]
    v_line_v : float
        Stator line voltage. [V]
    frequency_hz : float
        Supply frequency. [Hz]
    poles : int
        Number of poles, even. [-]
    e_rotor_v : float
        Rotor open-circuit line voltage at standstill (the rating plate's rotor volts). [V]
    inertia_kgm2 : float
        Inertia of motor and load referred to the motor shaft. [kg·m²]
    """

    r_stator_ohm: float
    x_stator_ohm: float
    x_magnetizing_ohm: float
    r_rotor_ohm: float
    x_rotor_ohm: float
    v_line_v: float
    frequency_hz: float
    poles: int
    e_rotor_v: float
    inertia_kgm2: float
    #: The machine interface's name for this kind, and its runaway flag (it has a synchronous speed).
    kind: ClassVar[str] = "wound rotor"
    runs_away_unloaded: ClassVar[bool] = False
    #: Started quasi-steadily (:mod:`notchwise.formulas.rotor_start`), not notch by notch through ``advance_notch``.
    quasi_steady: ClassVar[bool] = True
    _v_th: complex = field(init=False, repr=False, compare=False)
    _z_th: complex = field(init=False, repr=False, compare=False)

    def __post_init__(self):
        # Limits far beyond any slip-ring motor, so that no figure overflows (common practice, no source).
        checks = {
            "r_stator_ohm": ("r_stator", "ohm", 0.0, MAX_OHM),
            "x_stator_ohm": ("x_stator", "ohm", 0.0, MAX_OHM),
            "x_magnetizing_ohm": ("x_magnetizing", "ohm", 1e-6, MAX_OHM),
            "r_rotor_ohm": ("r_rotor", "ohm", 1e-9, MAX_OHM),
            "x_rotor_ohm": ("x_rotor", "ohm", 0.0, MAX_OHM),
            "v_line_v": ("v_line", "V", 1.0, 1e6),
            "frequency_hz": ("frequency", "Hz", 1.0, 1e4),
            "e_rotor_v": ("e_rotor", "V", 1.0, 1e6),
            "inertia_kgm2": ("inertia", "kg·m²", 1e-6, 1e9),
        }
        for attribute, (name, unit, least, most) in checks.items():
            value = (require_non_negative if least == 0.0 else require_positive)(name, getattr(self, attribute), unit)
            if not least <= value <= most:
                raise InputError(f"{name} ({quantity(value, unit)}) must be from {quantity(least, unit)} to {quantity(most, unit)}")
            object.__setattr__(self, attribute, value)
        poles = require_count("poles", self.poles, 2, MAX_POLES)
        if poles % 2:
            raise InputError(f"poles ({poles}) must be an even number")
        object.__setattr__(self, "poles", poles)
        z1 = complex(self.r_stator_ohm, self.x_stator_ohm)
        zm = complex(0.0, self.x_magnetizing_ohm)
        divider = zm / (z1 + zm)
        object.__setattr__(self, "_v_th", self.v_phase_v * divider)  # Eq. 6.34 of [1]
        object.__setattr__(self, "_z_th", z1 * divider)  # Eq. 6.35 of [1]

    # --- the circuit --------------------------------------------------------------------------------------------

    @property
    def v_phase_v(self) -> float:
        """Phase voltage of the equivalent star. [V]"""
        return self.v_line_v / math.sqrt(3.0)

    @property
    def sync_speed_rpm(self) -> float:
        """Synchronous speed, :math:`120 f / p`. [rpm]"""
        return 120.0 * self.frequency_hz / self.poles

    @property
    def omega_sync_rad_s(self) -> float:
        """Synchronous speed, :math:`4\\pi f / p`. [rad/s]"""
        return 4.0 * math.pi * self.frequency_hz / self.poles

    def _thevenin(self) -> tuple[complex, complex]:
        """Thevenin phase voltage [V] and impedance [ohm] of the stator network seen by the rotor."""
        return self._v_th, self._z_th

    @property
    def v_thevenin_v(self) -> float:
        """Magnitude of the Thevenin phase voltage seen by the rotor. [V]"""
        return abs(self._thevenin()[0])

    @property
    def ratio(self) -> float:
        """Stator-to-rotor voltage ratio :math:`a = \\sqrt3 V_{th}/E_2` (module docstring). [-]"""
        return math.sqrt(3.0) * self.v_thevenin_v / self.e_rotor_v

    def to_rotor_side_ohm(self, r_referred_ohm):
        """A stator-referred resistance in rotor-side ohm, :math:`R = R'/a^2`. [ohm]"""
        return np.asarray(r_referred_ohm, dtype=float) / self.ratio**2

    def to_stator_side_ohm(self, r_rotor_side_ohm):
        """A rotor-side resistance referred to the stator, :math:`R' = a^2 R`. [ohm]"""
        return np.asarray(r_rotor_side_ohm, dtype=float) * self.ratio**2

    @property
    def r_rotor_side_ohm(self) -> float:
        """The rotor's own resistance per phase, rotor side. [ohm]"""
        return float(self.to_rotor_side_ohm(self.r_rotor_ohm))

    @property
    def r_ohm(self) -> float:
        """The machine's own resistance in the starter's circuit, as the sections are given: rotor side. [ohm]"""
        return self.r_rotor_side_ohm

    def require_dynamics(self) -> None:
        """Nothing to refuse: the circuit and the inertia are all the start needs (``Machine.require_dynamics``)."""

    def with_supply(self, v_line_v: float, inertia_kgm2: float) -> WoundRotorMotor:
        r"""The same machine on another supply and inertia, its stator-to-rotor ratio kept.

        Torque goes with the square of the supply voltage (Eq. 6.36 of [1]_, :math:`T \propto V_{th}^2`);
        the rotor volts scale with the stator's, so that :math:`a = \sqrt3 V_{th}/E_2` (a turns ratio) stays.

        Parameters
        ----------
        v_line_v : float
            Stator line voltage. [V]
        inertia_kgm2 : float
            Inertia of motor and load referred to the motor shaft. [kg·m²]

        Returns
        -------
        WoundRotorMotor
            The machine at that supply. [-]
        """
        v = require_positive("v_line", v_line_v, "V")
        return replace(self, v_line_v=v, e_rotor_v=self.e_rotor_v * v / self.v_line_v, inertia_kgm2=inertia_kgm2)

    def slip(self, n_rpm):
        """Slip at shaft speed ``n_rpm``, :math:`s = 1 - n/n_s`. [-]"""
        return 1.0 - np.asarray(n_rpm, dtype=float) / self.sync_speed_rpm

    def speed_at_slip_rpm(self, slip):
        """Shaft speed at ``slip``. [rpm]"""
        return self.sync_speed_rpm * (1.0 - np.asarray(slip, dtype=float))

    # --- torque and currents -----------------------------------------------------------------------------------

    def torque_at_slip_nm(self, slip, r_referred_ohm):
        r"""Air-gap torque at a slip with a rotor resistance in circuit, vectorised.

        Parameters
        ----------
        slip : float or array_like
            Slip; 0 at synchronous speed, 1 at standstill. [-]
        r_referred_ohm : float or array_like
            Whole rotor resistance in circuit per phase (own plus external),
            referred to the stator. [ohm]

        Returns
        -------
        float or numpy.ndarray
            Torque, three phases. [N·m]

        Notes
        -----
        .. math:: T = \frac{3 V_{th}^2 R' s}{\omega_s\,[(R_{th} s + R')^2 + (X_{th} + X_2')^2 s^2]}

        (Eq. 6.36 of [1]_ with numerator and denominator multiplied by
        :math:`s^2`, so that :math:`s = 0` gives zero torque.)
        """
        v_th, z_th = self._thevenin()
        s = np.asarray(slip, dtype=float)
        r = np.asarray(r_referred_ohm, dtype=float)
        x_sum = z_th.imag + self.x_rotor_ohm
        torque = 3.0 * abs(v_th) ** 2 * r * s / (self.omega_sync_rad_s * ((z_th.real * s + r) ** 2 + (x_sum * s) ** 2))  # Eq. 6.36 of [1]
        return torque if torque.ndim else float(torque)

    def torque_at_r_over_s(self, x_ohm):
        """Torque as a function of :math:`x = R'/s` alone (module docstring). [N·m]"""
        return self.torque_at_slip_nm(1.0, x_ohm)

    def currents(self, slip, r_referred_ohm) -> RotorCurrents:
        r"""Stator and rotor currents and power factor of the full T circuit, vectorised over slip.

        Parameters
        ----------
        slip : float or array_like
            Slip. [-]
        r_referred_ohm : float or array_like
            Whole rotor resistance in circuit per phase, referred to the stator. [ohm]

        Returns
        -------
        RotorCurrents
            Stator current [A], rotor-side rotor current [A], power factor [-].

        Notes
        -----
        .. math::

            Z = R_1 + jX_1 + \left(\frac{1}{jX_m} + \frac{s}{R' + jX_2' s}\right)^{-1},\quad
            I_1 = \frac{V_1}{Z},\quad I_2' = I_1\,\frac{jX_m}{jX_m + R'/s + jX_2'},\quad
            I_2 = a I_2'

        ([1]_, sec. 6.3, the equivalent circuit; the rotor admittance is written
        in :math:`s` so that :math:`s = 0` is no load.)
        """
        s = np.asarray(slip, dtype=float)
        r = np.asarray(r_referred_ohm, dtype=float)
        y_rotor = s / (r + 1j * self.x_rotor_ohm * s)
        y_air = 1.0 / complex(0.0, self.x_magnetizing_ohm) + y_rotor
        z = complex(self.r_stator_ohm, self.x_stator_ohm) + 1.0 / y_air  # sec. 6.3 of [1]: the T circuit
        i_stator = self.v_phase_v / z
        i_rotor = i_stator / y_air * y_rotor
        return RotorCurrents(np.abs(i_stator), self.ratio * np.abs(i_rotor), z.real / np.abs(z))

    def torque_at(self, n_rpm, r_external_ohm=0.0):
        """Torque at shaft speed(s) ``n_rpm`` with ``r_external_ohm`` (rotor side, per phase) in the rotor. [N·m]"""
        return self.torque_at_slip_nm(self._checked_slip(n_rpm), self._r_referred(r_external_ohm))

    def currents_at(self, n_rpm, r_external_ohm=0.0) -> RotorCurrents:
        """Currents and power factor at shaft speed(s) ``n_rpm`` with ``r_external_ohm`` (rotor side) in the rotor."""
        return self.currents(self._checked_slip(n_rpm), self._r_referred(r_external_ohm))

    def _checked_slip(self, n_rpm):
        """Slip at speeds within plus or minus twice synchronous speed (plugging to generating). [-]"""
        speeds = as_float_array("speed", n_rpm, "rpm")
        limit = MAX_SPEED_PER_SYNC * self.sync_speed_rpm
        if np.any(np.abs(speeds) > limit):
            worst = float(speeds[np.argmax(np.abs(speeds))])
            raise InputError(f"speed ({quantity(worst, 'rpm')}) must lie within ±{quantity(limit, 'rpm')}, twice synchronous speed")
        return self.slip(np.reshape(speeds, np.shape(n_rpm)))

    def _r_referred(self, r_external_ohm) -> float:
        r_ext = require_non_negative("r_external", r_external_ohm, "ohm")
        if r_ext > MAX_OHM:
            raise InputError(f"r_external ({quantity(r_ext, 'ohm')}) must be at most {quantity(MAX_OHM, 'ohm')}")
        return self.r_rotor_ohm + float(self.to_stator_side_ohm(r_ext))

    # --- breakdown and the inverse laws ------------------------------------------------------------------------

    @property
    def breakdown_r_over_s_ohm(self) -> float:
        """:math:`R'/s` at breakdown, :math:`\\sqrt{R_{th}^2 + (X_{th}+X_2')^2}`. [ohm]"""
        _, z_th = self._thevenin()
        return math.hypot(z_th.real, z_th.imag + self.x_rotor_ohm)  # Eq. 6.37 of [1]

    @property
    def breakdown_torque_nm(self) -> float:
        """Breakdown (pull-out) torque, whatever the rotor resistance; ``inf`` for a circuit without impedance. [N·m]"""
        v_th, z_th = self._thevenin()
        denominator = 2.0 * self.omega_sync_rad_s * (z_th.real + self.breakdown_r_over_s_ohm)
        return 3.0 * abs(v_th) ** 2 / denominator if denominator > 0.0 else math.inf  # Eq. 6.38 of [1]

    def breakdown_slip(self, r_external_ohm=0.0) -> float:
        """Slip at breakdown torque with ``r_external_ohm`` (rotor side) in the rotor. [-]"""
        return self._r_referred(r_external_ohm) / self.breakdown_r_over_s_ohm

    def r_over_s_at_torque(self, torque_nm: float) -> float:
        r"""The value of :math:`x = R'/s` on the stable side of breakdown at which the torque is ``torque_nm``.

        .. math::

            T x^2 + (2 T R_{th} - k) x + T (R_{th}^2 + X^2) = 0,\qquad
            k = 3 V_{th}^2/\omega_s,\quad X = X_{th} + X_2',

        the larger root (Eq. 6.36 of [1]_ solved for :math:`x`). [ohm]

        Raises
        ------
        DesignError
            Where ``torque_nm`` is above the breakdown torque.
        """
        v_th, z_th = self._thevenin()
        t_max = self.breakdown_torque_nm
        if torque_nm > t_max:
            raise DesignError(
                f"the torque asked ({quantity(torque_nm, 'N·m')}) is above the breakdown torque "
                f"({quantity(t_max, 'N·m')}): no rotor resistance gives it"
            )
        if math.isfinite(t_max) and torque_nm < LEAST_TORQUE_FRACTION * t_max:
            raise DesignError(
                f"the torque asked ({quantity(torque_nm, 'N·m')}) is below a billionth of the breakdown torque "
                f"({quantity(t_max, 'N·m')}): enter it in N·m"
            )
        return self._stable_r_over_s(v_th, z_th, torque_nm, 1.0)

    def _stable_r_over_s(self, v_th, z_th, torque_nm: float, sign: float) -> float:
        r"""The stable root :math:`x = R'/s` of Eq. 6.36 of [1]_ at torque ``torque_nm``, motoring (``sign`` +1) or generating (-1).

        .. math:: T x^2 + (2 T R_{th} - \sigma k) x + T (R_{th}^2 + X^2) = 0,\qquad
                  x = \sigma\,rac{b + \sqrt{b^2 - 4 T^2 (R_{th}^2 + X^2)}}{2T},\quad b = k - 2\sigma T R_{th}

        [ohm]
        """
        k = 3.0 * abs(v_th) ** 2 / self.omega_sync_rad_s
        b = k - 2.0 * sign * torque_nm * z_th.real
        root = math.sqrt(max(b * b - 4.0 * torque_nm**2 * self.breakdown_r_over_s_ohm**2, 0.0))
        return sign * (b + root) / (2.0 * torque_nm)  # Eq. 6.36 of [1] solved for x, the root of larger magnitude

    def r_over_s_at_rotor_current(self, i_rotor_a: float) -> float:
        r"""The value of :math:`x = R'/s` at which the rotor-side rotor current is ``i_rotor_a``.

        .. math:: (R_{th} + x)^2 + X^2 = (a V_{th} / I_2)^2

        (the Thevenin rotor current, [1]_ sec. 6.5). [ohm]

        Raises
        ------
        DesignError
            Where even :math:`x = 0` (short-circuited rotor at standstill)
            draws less than ``i_rotor_a``.
        """
        _, z_th = self._thevenin()
        reach = self.ratio * self.v_thevenin_v / i_rotor_a
        x_sum = z_th.imag + self.x_rotor_ohm
        if reach <= math.hypot(z_th.real, x_sum):
            raise DesignError(
                f"the rotor current {quantity(i_rotor_a, 'A')} is more than the rotor draws short-circuited at "
                f"standstill ({quantity(self.ratio * self.v_thevenin_v / math.hypot(z_th.real, x_sum), 'A')})"
            )
        return reach * math.sqrt(1.0 - (x_sum / reach) ** 2) - z_th.real  # sqrt(reach² - X²), no overflow for a tiny current

    # --- what the starter asks of the machine ------------------------------------------------------------------

    def r_standstill_ohm(self, t_peak_nm: float) -> float:
        """Whole rotor resistance (rotor side, per phase) that limits the standstill torque to ``t_peak_nm``. [ohm]

        Raises
        ------
        DesignError
            ``t_peak_nm`` above breakdown, or the rotor's own resistance already
            holds the standstill torque at or below it.
        """
        t_peak = require_positive("t_peak", t_peak_nm, "N·m")
        x_peak = self.r_over_s_at_torque(t_peak)
        if x_peak <= self.r_rotor_ohm:
            raise DesignError(
                f"the standstill torque without rotor resistance ({quantity(self.torque_at_r_over_s(self.r_rotor_ohm), 'N·m')}) "
                f"is already at or below t_peak ({quantity(t_peak, 'N·m')}): no starting resistance is needed"
            )
        return float(self.to_rotor_side_ohm(x_peak))  # R_1' = x_1 at s = 1

    def r_after_cut_ohm(self, r_ohm: float, t_peak_nm: float, t_switch_nm: float) -> float:
        """Whole rotor resistance (rotor side) of the next step: :math:`R_{k+1} = R_k x_1/x_2` (module docstring). [ohm]"""
        return r_ohm * self.r_over_s_at_torque(t_peak_nm) / self.r_over_s_at_torque(t_switch_nm)

    # --- what braking and lowering ask of the machine (notchwise.formulas.braking) ----------------------------

    def rotor_circuit_ohm(self, r_external_ohm) -> float:
        """Whole rotor resistance per phase referred to the stator: own plus ``r_external_ohm`` (rotor side). [ohm]"""
        return self._r_referred(r_external_ohm)

    @property
    def generating_breakdown_torque_nm(self) -> float:
        r"""Greatest braking torque above synchronous speed (slip below zero), whatever the rotor resistance. [N·m]

        .. math:: T_{max,gen} = \frac{3 V_{th}^2}{2\,\omega_s\,(\sqrt{R_{th}^2 + X^2} - R_{th})}

        (Eq. 6.36 of [1]_ at :math:`x = R'/s = -\sqrt{R_{th}^2 + X^2}`; larger than
        the motoring breakdown torque by the stator resistance.) ``inf`` for a
        circuit without reactance.
        """
        v_th, z_th = self._thevenin()
        denominator = 2.0 * self.omega_sync_rad_s * (self.breakdown_r_over_s_ohm - z_th.real)
        return 3.0 * abs(v_th) ** 2 / denominator if denominator > 0.0 else math.inf  # Eq. 6.36 of [1] at x = -Z

    def r_over_s_generating_at_torque(self, torque_nm: float) -> float:
        r"""The value of :math:`x = R'/s < 0` near synchronous speed at which the braking torque is ``torque_nm``.

        .. math::

            T x^2 + (2 T R_{th} + k) x + T (R_{th}^2 + X^2) = 0,\qquad k = 3 V_{th}^2/\omega_s,

        the root of larger magnitude (the stable side, slip nearer zero): Eq. 6.36
        of [1]_ with the torque :math:`-T` of a generator. [ohm]

        Raises
        ------
        DesignError
            Where ``torque_nm`` is above the generating breakdown torque.
        """
        v_th, z_th = self._thevenin()
        t_max = self.generating_breakdown_torque_nm
        if torque_nm > t_max:
            raise DesignError(
                f"the braking torque asked ({quantity(torque_nm, 'N·m')}) is above the generating breakdown torque "
                f"({quantity(t_max, 'N·m')}): no speed above synchronous gives it"
            )
        return self._stable_r_over_s(v_th, z_th, torque_nm, -1.0)


def geometric_steps(r_first: float, r_last: float, ratio: float, steps=None, limit_text: str = "") -> tuple[int, float]:
    r"""Steps and ratio of a geometric grading :math:`R_{k+1} = q R_k` from ``r_first`` landing on ``r_last``.

    Parameters
    ----------
    r_first, r_last : float
        Whole resistance on step 1 and the resistance left after the last cut. [ohm]
    ratio : float
        Requested ratio :math:`q < 1` (the smallest allowed). [-]
    steps : int, optional
        Fixed number of steps. [-]
    limit_text : str
        What keeps the ratio, for the message (``t_switch (300 N·m)``). [-]

    Returns
    -------
    (int, float)
        The number of steps :math:`N` (the fewest with :math:`R_1 q^N \le R_{last}`,
        or ``steps``) and the ratio :math:`(R_{last}/R_1)^{1/N}` at which the last
        cut lands exactly on ``r_last``. [-]
    """
    span = r_last / r_first
    needed = max(1, math.ceil(math.log(span) / math.log(ratio) - 1e-9))
    if needed > MAX_NOTCHES:
        raise DesignError(f"more than {MAX_NOTCHES} steps would be needed: widen the band of {limit_text}")
    count = needed if steps is None else require_count("steps", steps, 1, MAX_NOTCHES)
    if count < needed:
        raise DesignError(f"{count} steps cannot keep {limit_text}; {needed} are needed")
    return count, span ** (1.0 / count)


@dataclass(frozen=True)
class RotorGrading:
    """A graded rotor starter, one entry per step (step 1 = all sections in).

    Attributes
    ----------
    r_total_ohm : numpy.ndarray
        Whole rotor resistance in circuit on each step, the rotor's own included, rotor side, per phase. [ohm]
    r_section_ohm : numpy.ndarray
        Section cut out at the end of each step, rotor side, per phase. [ohm]
    t_peak_nm, t_switch_nm : numpy.ndarray
        Torque at the start of each step and at its cut-out. [N·m]
    n_cut_rpm : numpy.ndarray
        Speed at each cut-out. [rpm]
    i_rotor_peak_a, i_stator_peak_a : numpy.ndarray
        Rotor current (rotor side) and stator current at the start of each step. [A]
    r_rotor_ohm : float
        The rotor's own resistance, rotor side, left after the last cut. [ohm]
    """

    r_total_ohm: np.ndarray
    r_section_ohm: np.ndarray
    t_peak_nm: np.ndarray
    t_switch_nm: np.ndarray
    n_cut_rpm: np.ndarray
    i_rotor_peak_a: np.ndarray
    i_stator_peak_a: np.ndarray
    r_rotor_ohm: float

    @property
    def steps(self) -> int:
        """Number of steps, equal to the number of sections. [-]"""
        return int(self.r_total_ohm.size)


def _torque_band(t_peak_nm, t_switch_nm, unit: str) -> tuple[float, float]:
    t_peak = require_positive("t_peak", t_peak_nm, unit)
    t_switch = require_below("t_switch", require_positive("t_switch", t_switch_nm, unit), "t_peak", t_peak, unit)
    return t_peak, t_switch


def grade_rotor(motor: WoundRotorMotor, t_peak_nm, t_switch_nm, steps=None) -> RotorGrading:
    r"""Grade the rotor resistance sections of a wound-rotor motor by the torque limits.

    Parameters
    ----------
    motor : WoundRotorMotor
        The machine. [-]
    t_peak_nm : float
        Torque at the start of every step, the upper limit. [N·m]
    t_switch_nm : float
        Least torque at which a step may be cut out. [N·m]
    steps : int, optional
        Fixed number of steps; by default the fewest that keep ``t_switch_nm``. [-]

    Returns
    -------
    RotorGrading
        Sections, torques, speeds and currents per step. [-]

    Notes
    -----
    .. math:: R_{k+1} = R_k\,x_1/x_2, \qquad x_i = R'/s \text{ at } T_i

    (module docstring). Speed at each cut-out :math:`n_s(1 - R_k'/x_2)`.

    Raises
    ------
    DesignError
        ``t_peak_nm`` above breakdown, no resistance needed, or too few steps.

    Examples
    --------
    A 690 V, 50 Hz, 6-pole motor of about 330 kW (invented, no real machine)
    graded between 6000 N·m and 3000 N·m: four steps, the sections falling
    geometrically, the switching torque raised so that the last cut lands on
    the rotor's own resistance:

    >>> motor = WoundRotorMotor(0.02, 0.12, 4.0, 0.025, 0.13, 690.0, 50.0, 6, 750.0, 60.0)
    >>> grading = grade_rotor(motor, 6000.0, 3000.0)
    >>> [round(float(r), 4) for r in grading.r_section_ohm]
    [0.3867, 0.177, 0.0811, 0.0371]
    >>> round(float(grading.t_switch_nm[0]), 1)
    3222.5
    """
    t_peak, t_switch = _torque_band(t_peak_nm, t_switch_nm, "N·m")
    r_first = motor.r_standstill_ohm(t_peak)
    x_peak = motor.r_over_s_at_torque(t_peak)
    ratio = x_peak / motor.r_over_s_at_torque(t_switch)
    count, q = geometric_steps(r_first, motor.r_rotor_side_ohm, ratio, steps, f"t_switch ({quantity(t_switch, 'N·m')})")
    r = r_first * q ** np.arange(count + 1)
    r[-1] = motor.r_rotor_side_ohm
    x_switch = x_peak / q
    peak = motor.currents(1.0, x_peak)
    return RotorGrading(
        r_total_ohm=r[:-1],
        r_section_ohm=-np.diff(r),
        t_peak_nm=np.full(count, t_peak),
        t_switch_nm=np.full(count, motor.torque_at_r_over_s(x_switch)),
        n_cut_rpm=motor.speed_at_slip_rpm(motor.to_stator_side_ohm(r[:-1]) / x_switch),
        i_rotor_peak_a=np.full(count, float(peak.rotor_a)),
        i_stator_peak_a=np.full(count, float(peak.stator_a)),
        r_rotor_ohm=motor.r_rotor_side_ohm,
    )


@dataclass(frozen=True)
class PlateGrading:
    """A rotor starter graded from the rating plate alone, one entry per step.

    Attributes
    ----------
    r_total_ohm, r_section_ohm : numpy.ndarray
        Whole rotor resistance on each step and the section cut out, rotor side, per phase. [ohm]
    t_peak, t_switch : numpy.ndarray
        Torque at the start of each step and at its cut-out, as fractions of rated torque. [-]
    s_cut : numpy.ndarray
        Slip at each cut-out. [-]
    r_unit_ohm : float
        The rotor ohm unit :math:`E_2/(\\sqrt3 I_2)`. [ohm]
    """

    r_total_ohm: np.ndarray
    r_section_ohm: np.ndarray
    t_peak: np.ndarray
    t_switch: np.ndarray
    s_cut: np.ndarray
    r_unit_ohm: float

    @property
    def steps(self) -> int:
        """Number of steps. [-]"""
        return int(self.r_total_ohm.size)


def grade_rotor_plate(e_rotor_v, i_rotor_a, s_rated, t_peak, t_switch, steps=None) -> PlateGrading:
    r"""Grade rotor sections from the rating plate: torque proportional to slip over resistance.

    Parameters
    ----------
    e_rotor_v : float
        Rotor open-circuit standstill line voltage. [V]
    i_rotor_a : float
        Rated rotor current. [A]
    s_rated : float
        Rated slip, above 0 and below 1. [-]
    t_peak, t_switch : float
        Torque at the start of every step and least torque at cut-out, as
        fractions of rated torque (2 = 200 %). [-]
    steps : int, optional
        Fixed number of steps. [-]

    Returns
    -------
    PlateGrading

    Notes
    -----
    With the rotor's leakage reactance and the stator impedance neglected the
    rotor current is :math:`s E_2/(\sqrt3 R)` and the torque, as a fraction of
    rated,

    .. math:: t = \frac{s\,R_u}{R}, \qquad R_u = \frac{E_2}{\sqrt3 I_2}, \qquad R_2 = s_r R_u,

    the rotor ohm unit :math:`R_u` being the resistance that passes rated
    rotor current at standstill (common practice, no source). Speed continuity
    then gives :math:`R_{k+1} = R_k\,t_2/t_1` from :math:`R_1 = R_u/t_1` down to
    the rotor's own :math:`R_2`. This departs from the circuit method
    (:func:`grade_rotor`) wherever reactance matters: it knows no breakdown
    torque, and real torque at a given :math:`R/s` is lower, the more so the
    larger the torque; use it only where no circuit data exist.
    """
    e2 = require_positive("e_rotor", e_rotor_v, "V")
    i2 = require_positive("i_rotor", i_rotor_a, "A")
    s_r = require_positive("s_rated", s_rated)
    if s_r >= 1.0:
        raise InputError(f"s_rated ({quantity(s_r)}) must be below 1")
    t1, t2 = _torque_band(t_peak, t_switch, "")
    r_unit = e2 / (math.sqrt(3.0) * i2)
    r_own = s_r * r_unit
    r_first = r_unit / t1
    if r_first <= r_own:
        raise DesignError(
            f"the standstill torque without rotor resistance (1/s_rated = {1.0 / s_r:.4g}) is already at or below "
            f"t_peak ({t1:.4g}): no starting resistance is needed"
        )
    count, q = geometric_steps(r_first, r_own, t2 / t1, steps, f"t_switch ({t2:.4g})")
    r = r_first * q ** np.arange(count + 1)
    r[-1] = r_own
    return PlateGrading(
        r_total_ohm=r[:-1],
        r_section_ohm=-np.diff(r),
        t_peak=np.full(count, t1),
        t_switch=np.full(count, t1 * q),
        s_cut=t1 * q * r[:-1] / r_unit,
        r_unit_ohm=r_unit,
    )


@dataclass(frozen=True)
class RotorCheck:
    """Torques and stator currents of given rotor sections, one entry per step and a last for the run.

    Attributes
    ----------
    r_total_ohm : numpy.ndarray
        Whole rotor resistance on each step, rotor side, per phase. [ohm]
    r_section_ohm : numpy.ndarray
        Section cut out at the end of each step; NaN on the run. [ohm]
    t_peak_nm : numpy.ndarray
        Highest torque on each step (breakdown where the step passes through it). [N·m]
    i_stator_peak_a : numpy.ndarray
        Highest stator current on each step. [A]
    n_cut_rpm : numpy.ndarray
        Speed at each cut-out; NaN on the run. [rpm]
    verdict : tuple of str
        ``ok`` or the limits the step breaks.
    """

    r_total_ohm: np.ndarray
    r_section_ohm: np.ndarray
    t_peak_nm: np.ndarray
    i_stator_peak_a: np.ndarray
    n_cut_rpm: np.ndarray
    verdict: tuple

    @property
    def passes(self) -> bool:
        """True when every step is ``ok``."""
        return all(v == "ok" for v in self.verdict)


def check_rotor(motor: WoundRotorMotor, sections_ohm, t_switch_nm, t_limit_nm, i_limit_a) -> RotorCheck:
    r"""Peak torque and stator current per step of given rotor sections, with a verdict.

    Parameters
    ----------
    motor : WoundRotorMotor
        The machine. [-]
    sections_ohm : array_like
        Sections, rotor side, per phase, in the order they are cut out. [ohm]
    t_switch_nm : float
        Torque at which each step is cut out, on the stable side of breakdown
        (a step that starts at or below it is cut at once). [N·m]
    t_limit_nm : float
        Highest torque the drive allows (shaft, gearing, couplings). [N·m]
    i_limit_a : float
        Highest stator current the supply and protection allow. [A]

    Returns
    -------
    RotorCheck

    Notes
    -----
    On a step, :math:`x = R'/s` rises from :math:`x_a` to :math:`x_b`. Torque
    has one maximum, at breakdown (module docstring), so the step's peak is
    :math:`T_{max}` where :math:`x_a \le x^* \le x_b`, else the larger end.
    The stator current's modulus along the real :math:`x` axis is
    :math:`|I_1|^2 \propto (x^2 + B^2)/|P x + Q|^2`, whose derivative has the
    sign of :math:`R_1 x^2 - c\,x - R_1 B^2` (:math:`c > 0`): it falls, then
    rises once, so its peak over a step is at one of the ends:

    .. math:: I_{1,peak} = \max(|I_1(x_a)|, |I_1(x_b)|).

    The run (the rotor's own resistance) is followed to synchronous speed.
    """
    sections = rotor_sections(sections_ohm)
    t_switch = require_positive("t_switch", t_switch_nm, "N·m")
    t_limit = require_positive("t_limit", t_limit_nm, "N·m")
    i_limit = require_positive("i_limit", i_limit_a, "A")
    x_cut = motor.r_over_s_at_torque(t_switch)
    x_star, t_max = motor.breakdown_r_over_s_ohm, motor.breakdown_torque_nm
    r = notch_resistances_ohm(motor.r_rotor_side_ohm, sections)
    r_ref = motor.to_stator_side_ohm(r)
    x_start = np.empty(r.size)
    x_end = np.empty(r.size)
    slip = 1.0
    for k, rk in enumerate(r_ref):
        x_start[k] = rk / slip
        x_end[k] = max(x_cut, x_start[k]) if k < sections.size else math.inf
        slip = rk / x_end[k]
    passes_breakdown = (x_start <= x_star) & (x_star <= x_end)
    start, end = _slip_and_r(x_start), _slip_and_r(x_end)
    t_peak = np.where(passes_breakdown, t_max, np.maximum(motor.torque_at_slip_nm(*start), motor.torque_at_slip_nm(*end)))
    i_peak = np.maximum(motor.currents(*start).stator_a, motor.currents(*end).stator_a)
    n_cut = motor.speed_at_slip_rpm(r_ref[:-1] / x_end[:-1])
    verdict = tuple(
        _verdict(t, i, t_limit, i_limit, cut_at_once=k < sections.size and x_start[k] >= x_cut)
        for k, (t, i) in enumerate(zip(t_peak, i_peak))
    )
    return RotorCheck(r, np.append(sections, np.nan), t_peak, i_peak, np.append(n_cut, np.nan), verdict)


def _slip_and_r(x_ohm: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """A slip [-] and resistance [ohm] pair with the ratio :math:`x = R'/s` (``inf``: synchronous speed)."""
    at_sync = np.isinf(x_ohm)
    return np.where(at_sync, 0.0, 1.0), np.where(at_sync, 1.0, x_ohm)


def rotor_sections(sections_ohm) -> np.ndarray:
    """Rotor sections as an array, each above zero and at most :data:`MAX_OHM`.

    Parameters
    ----------
    sections_ohm : array_like
        Sections per phase, rotor side, in the order they are cut out. [ohm]

    Returns
    -------
    numpy.ndarray
        The sections. [ohm]
    """
    sections = checked_sections(sections_ohm)
    if np.any(sections > MAX_OHM):
        k = int(np.argmax(sections > MAX_OHM))
        raise InputError(f"sections entry {k + 1} ({quantity(sections[k], 'ohm')}) must be at most {quantity(MAX_OHM, 'ohm')}")
    return sections


def _verdict(t_peak: float, i_peak: float, t_limit: float, i_limit: float, cut_at_once: bool) -> str:
    faults = []
    if t_peak > t_limit:
        faults.append(f"peak torque over t_limit ({quantity(t_limit, 'N·m')})")
    if i_peak > i_limit:
        faults.append(f"stator current over i_limit ({quantity(i_limit, 'A')})")
    if cut_at_once:
        faults.append("torque at or below t_switch from the start: cut at once")
    return "; ".join(faults) or "ok"

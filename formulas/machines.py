r"""What grading, the start in time, heating, the worst case and protection ask of a machine.

Every machine kind is one frozen dataclass that checks its own data in
``__post_init__`` and offers the members of :class:`Machine`. The callers
(:mod:`notchwise.formulas.grading`, :mod:`notchwise.formulas.start_sim`,
:mod:`notchwise.formulas.worst_case`, :mod:`notchwise.formulas.resistors`)
use only these members, never ``isinstance``; adding a machine is one new
class, its tests and one line in the add-in's table of kinds
(``MACHINES`` in ``addin/starters.py``).

The state the start carries from notch to notch is the line current
:math:`i` [A] and the shaft speed :math:`n` [rpm]; a machine whose current
is not a state of its own (a wound-rotor induction motor started
quasi-steadily, with torque from :math:`R_2'/s`) sets :math:`i` from
:math:`n` at every instant and keeps one mechanical state. The power balance
of the shaft,

.. math:: P = T\,\omega, \qquad \omega = \frac{2\pi}{60}\,n,

fixes the constants below.

References
----------
.. [1] A. E. Fitzgerald, C. Kingsley Jr., S. D. Umans, *Electric Machinery*,
   6th ed., McGraw-Hill, 2003, Eqs. 7.1, 7.7 (DC machines) and sec. 6.5
   (induction-motor torque from the equivalent circuit).
"""

from __future__ import annotations

import math
from typing import ClassVar, Protocol, runtime_checkable

from .errors import InputTypeError, shown

__all__ = ["NM_PER_V_A_PER_RPM", "RAD_S_PER_RPM", "Machine", "checked_machine"]

#: Torque per (V/rpm · A): T = k_phi · I · 60 / (2 pi), from P = E I = T omega, Eq. 7.1 of [1]. [N·m/(V·A/rpm)]
NM_PER_V_A_PER_RPM = 60.0 / (2.0 * math.pi)
#: Radians per second per rpm. [rad/s/rpm]
RAD_S_PER_RPM = 2.0 * math.pi / 60.0


@runtime_checkable
class Machine(Protocol):
    r"""The members a machine offers to grading, the start in time, heating and the worst case.

    Conventions: currents in A (the line or armature current, at or above
    zero), speeds in rpm, torques in N·m (developed, air-gap torque),
    resistances of the whole circuit in ohm, the supply ``v_eff_v`` already
    less any brush drop. Methods take a float or a numpy array of currents
    and broadcast.

    Attributes
    ----------
    kind : str
        Name of the kind as the add-in lists it ("shunt", "series",
        "compound"; next: "wound rotor"), for messages.
    r_ohm : float
        The machine's own resistance in the starter's circuit (the
        starting resistance is added to it; for a wound-rotor motor the
        rotor resistance referred as the sections are). [ohm]
    i_max_a : float
        Highest current the machine's data cover; ``inf`` without a limit.
        Grading and the start refuse currents beyond it. [A]
    runs_away_unloaded : bool
        True where the speed has no bound as the load falls to zero (a
        series motor): a start against a load that vanishes is refused.
    quasi_steady : bool
        False where the current is a state of the circuit (the DC machines):
        the start goes notch by notch through ``advance_notch``. True where
        the circuit is taken steady at every instant and the shaft speed is
        the one state (the wound-rotor motor): :func:`notchwise.formulas.start_sim.simulate_start`
        hands the start to :func:`notchwise.formulas.rotor_start.simulate_rotor_start`
        (``with_supply(v_line_v, inertia_kgm2)`` gives the machine at the
        corner's supply), and such a machine needs none of ``relative_flux``,
        ``torque_nm``, ``speed_rpm``, ``mechanical_time_constant_s`` or
        ``advance_notch`` (it grades in its own module,
        :func:`notchwise.formulas.induction_motor.grade_rotor`). Its result
        carries ``phases`` (3) and the stator current.

    Methods to provide
    ------------------
    ``relative_flux(i_a)``
        Grading (:func:`notchwise.formulas.grading.grade_uniform`,
        :func:`~notchwise.formulas.grading.check_sections`): a quantity
        proportional to the flux at current ``i_a``; only ratios are used,
        through speed continuity across a cut. A machine graded by torque
        (the wound-rotor motor) returns the ratio that makes the same
        recursion hold, or grades in its own module and documents it here.
    ``require_dynamics()``
        Raise :class:`~notchwise.formulas.errors.InputError` naming the
        missing data where the machine is known well enough for grading
        but not for speed or torque (a shunt motor without ``k_phi``, a
        series curve without its speed). Called before any simulation.
    ``torque_nm(i_a)``
        Developed torque at current ``i_a``. [N·m]
    ``speed_rpm(v_eff_v, r_circuit_ohm, i_a)``
        Steady speed at which a circuit of ``r_circuit_ohm`` (machine
        included) carries ``i_a``; ``inf`` where the machine has no bound
        there (no flux). Used by the stall rule, the settling current and
        the worst-case margin. [rpm]
    ``mechanical_time_constant_s(r_circuit_ohm, inertia_kgm2, i_a)``
        :math:`J\,\omega'/T'` near ``i_a`` on that circuit, the scale of
        the time cap of a notch. [s]
    ``advance_notch(notch, circuit, i_cut_a, t_left_s, t_cap_s, final_speed_rpm)``
        The machine's own equations over one notch
        (:class:`notchwise.formulas.start_notch.NotchRecord` holds the state,
        :class:`~notchwise.formulas.start_notch.NotchCircuit` the circuit):
        advance until the current, having risen above ``i_cut_a``, falls
        to it; or ``t_left_s`` has passed (definite time); or, with
        ``final_speed_rpm`` given (the run after the last cut), the speed
        has settled; adding each stretch with ``notch.add``. Raise
        :class:`~notchwise.formulas.start_notch.StartIncomplete` where the
        notch cannot end (stalled, steady below the switching current, still
        accelerating at ``t_cap_s``, or past the step bound
        :data:`~notchwise.formulas.start_notch.MAX_STEPS_PER_NOTCH`). DC
        machines contribute their 2-state circuit
        (:func:`notchwise.formulas.start_dc.advance_dc_notch`); a
        quasi-steady machine integrates its one mechanical state.

    Notes
    -----
    .. math:: T = \frac{60}{2\pi}\,\frac{P_{air}}{n}

    A machine with an overhauling (driving) load or a braking start adds no
    member here: the load model (:mod:`notchwise.formulas.start_load`) and
    the stall rule of the orchestration are where those join.
    """

    kind: ClassVar[str]
    r_ohm: float
    runs_away_unloaded: ClassVar[bool]
    quasi_steady: ClassVar[bool]

    @property
    def i_max_a(self) -> float: ...

    def relative_flux(self, i_a): ...

    def require_dynamics(self) -> None: ...

    def torque_nm(self, i_a): ...

    def speed_rpm(self, v_eff_v, r_circuit_ohm, i_a): ...

    def mechanical_time_constant_s(self, r_circuit_ohm: float, inertia_kgm2: float, i_a: float) -> float: ...

    def advance_notch(self, notch, circuit, i_cut_a, t_left_s, t_cap_s, final_speed_rpm) -> None: ...


#: The members every caller asks first: enough to tell a machine from a stray value.
_FIRST_MEMBERS = ("kind", "quasi_steady", "require_dynamics", "r_ohm")


def checked_machine(motor, name: str = "motor"):
    """Return ``motor`` if it offers the machine interface's first members, else refuse it by name.

    Parameters
    ----------
    motor : object
        The machine: one of the kinds of :mod:`notchwise.formulas` (shunt,
        series, compound, wound rotor). [-]
    name : str, optional
        Argument name used in the message. [-]

    Returns
    -------
    Machine
        The machine, unchanged. [-]
    """
    if not all(hasattr(motor, member) for member in _FIRST_MEMBERS):
        raise InputTypeError(f"{name} ({shown(motor)}) is not a machine: build it from a motor kind (shunt, series, "
                             "compound or wound rotor)")
    return motor

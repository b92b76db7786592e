"""One notch of a start in time: its circuit, its record, and how a notch that cannot end is reported.

The orchestration (:mod:`notchwise.formulas.start_sim`) hands a machine a
:class:`NotchCircuit` and a :class:`NotchRecord`; the machine's
``advance_notch`` (:class:`notchwise.formulas.machines.Machine`) fills the
record, or raises :class:`StartIncomplete` saying what happens instead.
"""

from __future__ import annotations

from dataclasses import dataclass

from .errors import DesignError, quantity

__all__ = [
    "SETTLED_FRACTION",
    "TIME_CAP_FACTOR",
    "MAX_PHASES_PER_NOTCH",
    "MAX_STEPS_PER_NOTCH",
    "OUTCOMES",
    "Segment",
    "NotchCircuit",
    "NotchRecord",
    "StartIncomplete",
]

#: Fraction of the final speed at which the start counts as finished. Common practice, no source.
SETTLED_FRACTION = 0.98
#: A notch may last at most this many of its slowest time constants before it is called stalled. Common practice, no source.
TIME_CAP_FACTOR = 60.0
#: Most changes between standstill and motion on one notch before the start is refused. [-]
MAX_PHASES_PER_NOTCH = 8
#: Most integrator steps on one notch (or the run) before the start is stopped with a message. [-]
MAX_STEPS_PER_NOTCH = 20_000
#: What can happen instead of a cut (the ``outcome`` of :class:`StartIncomplete`).
OUTCOMES = ("stalls", "steady below cut-out", "accelerating", "runs away", "step bound")


@dataclass(frozen=True)
class Segment:
    """One stretch of the start on which the state is a known function of time.

    Attributes
    ----------
    t0_s, t1_s : float
        Start and end of the stretch. [s]
    notch : int
        Notch in circuit; N+1 is the run after the last cut. [-]
    state_at : callable
        Times from ``t0_s`` [s] -> (current [A], speed [rpm]).
    """

    t0_s: float
    t1_s: float
    notch: int
    state_at: object


@dataclass(frozen=True)
class NotchCircuit:
    """The circuit and shaft of one notch.

    Attributes
    ----------
    v_eff_v : float
        Supply less brush drop. [V]
    r_ohm : float
        Whole circuit resistance on the notch, machine included. [ohm]
    l_h : float
        Inductance of the circuit. [H]
    inertia_kgm2 : float
        Inertia referred to the motor shaft. [kg·m²]
    load : LoadTorque
        Load torque against speed (:mod:`notchwise.formulas.start_load`).
    rtol : float or None
        Relative tolerance of an integrator; None for the integrator's own default. [-]
    fast : bool
        True: the closed form where it applies and the fast integrator elsewhere; False: the general
        solver throughout, an independent second method for checks. [-]
    """

    v_eff_v: float
    r_ohm: float
    l_h: float
    inertia_kgm2: float
    load: object
    rtol: float | None
    fast: bool = True


class NotchRecord:
    """State of one notch being simulated: accumulates its integrals and segments.

    ``index`` is the notch number (N+1 for the run after the last cut);
    ``t``, ``i``, ``n`` the present time [s], current [A] and speed [rpm].
    """

    def __init__(self, index: int, t0: float, i0: float, n0: float, sections: int):
        self.index, self.t, self.i, self.n = index, t0, i0, n0
        self.sections = sections
        self.peak = i0
        self.charge = self.i2t = self.work = 0.0
        self.segments = []

    @property
    def name(self) -> str:
        """``notch k``, or ``the run after the last cut`` (which is no notch)."""
        return "the run after the last cut" if self.index > self.sections else f"notch {self.index}"

    def add(self, duration, i1, n1, peak, charge, i2t, work, state_at):
        """Append a stretch of ``duration`` [s] ending at (``i1`` [A], ``n1`` [rpm]) with its integrals."""
        self.segments.append(Segment(self.t, self.t + duration, self.index, state_at))
        self.t += duration
        self.i, self.n = i1, n1
        self.peak = max(self.peak, peak)
        self.charge += charge
        self.i2t += i2t
        self.work += work

    def incomplete(self, outcome: str, detail: str, speed_rpm: float | None = None) -> StartIncomplete:
        """The error saying that this notch ends in ``outcome`` (one of :data:`OUTCOMES`), at what speed."""
        speed = self.n if speed_rpm is None else speed_rpm
        return StartIncomplete(outcome, None if self.index > self.sections else self.index, speed,
                               f"{self.name} {detail}")


class StartIncomplete(DesignError):
    """A start that does not reach its switching current or its steady speed, and what it does instead.

    Attributes
    ----------
    outcome : str
        One of :data:`OUTCOMES`.
    notch : int or None
        Notch on which it happens; None for the run after the last cut. [-]
    speed_rpm : float
        Speed at which it happens (``inf`` for a runaway). [rpm]
    """

    def __init__(self, outcome: str, notch: int | None, speed_rpm: float, message: str):
        super().__init__(message)
        self.outcome, self.notch, self.speed_rpm = outcome, notch, speed_rpm

    @property
    def where(self) -> str:
        """Short words for a table: ``notch 3`` or ``run``."""
        return "run" if self.notch is None else f"notch {self.notch}"


def at_speed(speed_rpm: float) -> str:
    """``at 812 rpm`` for a message. [rpm]"""
    return f"at {quantity(speed_rpm, 'rpm')}"

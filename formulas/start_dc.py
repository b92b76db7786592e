r"""A DC machine's contribution to the start in time: its 2-state circuit over one notch.

The state is the armature current and the speed. While the shaft is held at
rest (the load's reaction at standstill exceeds the motor torque) the current
is a first-order lag in closed form; in motion a shunt motor against a
constant load follows the closed form of
:mod:`notchwise.formulas.start_closed_form`, every other case is integrated
(:mod:`notchwise.formulas.start_integrated`: the fast Rosenbrock integrator,
or the general solver as the second method). The breakaway current is found
only when the shaft is at rest. The equations are those of
Fitzgerald, Kingsley, Umans [1]_:

.. math::

    L\,\frac{di}{dt} = V' - R_k\,i - k\Phi(i)\,n, \qquad
    J\,\frac{d\omega}{dt} = \frac{60}{2\pi}\,k\Phi(i)\,i - T_L(n).

References
----------
.. [1] A. E. Fitzgerald, C. Kingsley Jr., S. D. Umans, *Electric Machinery*,
   6th ed., McGraw-Hill, 2003, sec. 7.9, Eqs. 7.37-7.40.
.. [2] R. P. Brent, *Algorithms for Minimization without Derivatives*,
   Prentice-Hall, 1973, ch. 4.
"""

from __future__ import annotations

import numpy as np
from scipy.optimize import brentq

from .errors import DesignError
from .start_closed_form import LinearShunt, held_phase, linear_running_phase
from .start_integrated import integrated_running_phase
from .start_notch import MAX_PHASES_PER_NOTCH

__all__ = ["breakaway_current_a", "advance_dc_notch"]


def breakaway_current_a(machine, t_rest_nm: float, i_top_a: float) -> float:
    r"""Current at which the motor torque first equals the load at rest ``t_rest_nm`` [N·m].

    Parameters
    ----------
    machine : ShuntMotor, SeriesMotor or CompoundMotor
        The machine, for its torque at a current. [-]
    t_rest_nm : float
        Load torque at 0 rpm, the reaction to overcome. [N·m]
    i_top_a : float
        Highest current searched, e.g. the standstill current of the notch. [A]

    Returns
    -------
    float
        0 A for no load at rest; ``inf`` where the torque stays at or below
        it up to ``i_top_a`` (or the end of the machine's data). By Brent's
        method [2]_. [A]

    Examples
    --------
    A shunt motor's torque is :math:`(60/2\pi) k\Phi I`, so it breaks away from
    150 N·m at :math:`150/(9.549 \cdot 0.208)` A:

    >>> from notchwise.formulas.dc_motor import ShuntMotor
    >>> round(breakaway_current_a(ShuntMotor(0.1, 0.208), 150.0, 2000.0), 2)
    75.52
    """
    if t_rest_nm <= 0.0:
        return 0.0
    i_top = min(i_top_a, machine.i_max_a)
    if float(machine.torque_nm(i_top)) <= t_rest_nm:
        return np.inf
    return brentq(lambda i: float(machine.torque_nm(i)) - t_rest_nm, 0.0, i_top, xtol=1e-12, rtol=1e-14)


def advance_dc_notch(machine, notch, circuit, i_cut_a, t_left_s, t_cap_s, final_speed_rpm) -> None:
    """Advance ``notch`` of a DC machine to its end (``Machine.advance_notch``, :mod:`notchwise.formulas.machines`).

    Parameters
    ----------
    machine : ShuntMotor, SeriesMotor or CompoundMotor
        The machine; ``flux_constant`` machines take the closed form against a constant load. [-]
    notch : NotchRecord
        The notch at its start; filled in place. [-]
    circuit : NotchCircuit
        The notch's circuit and shaft. [-]
    i_cut_a : float or None
        Switching current; None on definite time and on the run. [A]
    t_left_s : float
        Dwell of a definite-time notch; ``inf`` otherwise. [s]
    t_cap_s : float
        Longest a current-limit notch or the run may last. [s]
    final_speed_rpm : float or None
        On the run after the last cut: the steady speed. [rpm]
    """
    v_eff, r, l_h, load = circuit.v_eff_v, circuit.r_ohm, circuit.l_h, circuit.load
    i_break = None  # found only when the shaft is at rest
    closed = circuit.fast and machine.flux_constant and load.constant
    t0 = notch.t
    for _ in range(MAX_PHASES_PER_NOTCH):
        remaining = t_left_s - (notch.t - t0)
        if notch.n <= 0.0 and i_break is None:
            i_break = breakaway_current_a(machine, load.at_rest_nm, v_eff / r)
        if notch.n <= 0.0 and notch.i < i_break:
            if held_phase(notch, v_eff, r, l_h, i_break, i_cut_a, remaining):
                return
            continue
        if closed:
            lin = LinearShunt(r, machine.k_phi_v_per_rpm, l_h, circuit.inertia_kgm2, v_eff, load.at_rest_nm,
                              (notch.i, notch.n))
            if linear_running_phase(notch, lin, i_cut_a, remaining, final_speed_rpm):
                return
        if integrated_running_phase(notch, machine, circuit, i_cut_a, remaining, t_cap_s, final_speed_rpm):
            return
    raise DesignError(f"{notch.name}: the shaft keeps stopping and starting; check the load at rest")

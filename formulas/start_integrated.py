r"""The start in time of a DC machine, integrated: any flux law, any load table.

Between cuts the circuit and shaft obey (Fitzgerald, Kingsley, Umans [1]_)

.. math::

    L\,\frac{di}{dt} = V' - R_k\,i - k\Phi(i)\,n, \qquad
    J\,\frac{d\omega}{dt} = \frac{60}{2\pi}\,k\Phi(i)\,i - T_L(n),

integrated by the fast Rosenbrock method of
:func:`notchwise.formulas.notch_integrator.integrate_notch` (RODAS3 on plain
floats, the flux curve and load table built once per machine and start), or,
as the independent second method the checks use, by
``scipy.integrate.solve_ivp`` (Radau IIA, an implicit method for stiff
systems, [2]_) with the switching current, the return to standstill and the
settled speed as events, and the integrals of :math:`i`, :math:`i^2` and
:math:`T_L\omega` as quadrature rows. The whole path is the one function
:func:`integrated_running_phase`.

References
----------
.. [1] A. E. Fitzgerald, C. Kingsley Jr., S. D. Umans, *Electric Machinery*,
   6th ed., McGraw-Hill, 2003, sec. 7.9, Eqs. 7.37-7.40.
.. [2] E. Hairer and G. Wanner, *Solving Ordinary Differential Equations II:
   Stiff and Differential-Algebraic Problems*, 2nd ed., Springer, 1996,
   sec. IV.8 (Radau IIA).
"""

from __future__ import annotations

import numpy as np
from scipy.integrate import solve_ivp

from .errors import DesignError, quantity
from .machines import NM_PER_V_A_PER_RPM, RAD_S_PER_RPM
from .notch_integrator import integrate_notch_unchecked
from .start_notch import MAX_STEPS_PER_NOTCH, SETTLED_FRACTION

__all__ = ["FAST_RTOL", "GENERAL_RTOL", "integrated_running_phase"]

#: Default relative tolerance of the fast path: peaks, dwells and energies within 0.05 % of an rtol 1e-10
#: solve (tests/test_start_sim.py, a hypothesis test against solve_ivp), with a margin: 5e-5 reached 0.055 % on
#: the load work of a notch that breaks away (chosen by measurement). [-]
FAST_RTOL = 2e-5
#: Default relative tolerance of the general solver (Radau), the second method. [-]
GENERAL_RTOL = 1e-7


class _StepBound(Exception):
    """Raised inside the right-hand side when a notch has used up its evaluations."""


def integrated_running_phase(notch, machine, circuit, i_cut, t_left, t_cap, final_speed=None) -> bool:
    """Advance a notch of a DC machine until a cut, a return to rest, or the end of its time.

    Parameters
    ----------
    notch : NotchRecord
        The notch, at its present state; the stretch is added to it. [-]
    machine : ShuntMotor, SeriesMotor or CompoundMotor
        The machine: its ``notch_flux`` for the fast path, its ``k_phi`` for the general solver. [-]
    circuit : NotchCircuit
        Supply, resistance, inductance, inertia, load (and its table) and tolerance of the notch;
        ``circuit.fast`` chooses the fast path, otherwise the general solver (Radau). [-]
    i_cut : float or None
        Switching current; None on definite time and on the run. [A]
    t_left : float
        Time left on a definite-time notch; ``inf`` otherwise. [s]
    t_cap : float
        Longest a current-limit notch or the run may last. [s]
    final_speed : float, optional
        On the run after the last cut: the steady speed it settles towards. [rpm]

    Returns
    -------
    bool
        True when the notch ended (cut, dwell over, or settled); False when
        the shaft came back to rest and the caller holds it there.

    Raises
    ------
    StartIncomplete
        The notch neither ends nor comes to rest within ``t_cap`` or
        :data:`MAX_STEPS_PER_NOTCH` steps or evaluations.
    DesignError
        The current leaves the magnetization curve, or the general solver fails.
    """
    if circuit.fast:
        return _fast_phase(notch, machine.notch_flux, circuit, i_cut, t_left, t_cap, final_speed)
    return _general_phase(notch, machine.k_phi, circuit, i_cut, t_left, t_cap, final_speed)


def _fast_phase(notch, flux, circuit, i_cut, t_left, t_cap, final_speed):
    """The phase by :func:`~notchwise.formulas.notch_integrator.integrate_notch`, its statuses mapped.

    The start has checked every figure of the circuit (:func:`~notchwise.formulas.start_sim.simulate_start`), so
    the integrator is called without checking them again.
    """
    run = integrate_notch_unchecked(
        flux, circuit.v_eff_v, circuit.r_ohm, circuit.l_h, circuit.inertia_kgm2, circuit.load, float(notch.i),
        max(float(notch.n), 0.0), t_left if np.isfinite(t_left) else t_cap, i_cut,
        None if final_speed is None else SETTLED_FRACTION * final_speed,
        FAST_RTOL if circuit.rtol is None else circuit.rtol, MAX_STEPS_PER_NOTCH, True,
    )
    if run.status == "step cap":
        raise notch.incomplete("step bound", f"was stopped by the step bound: {run.message} (check the inertia and "
                               "inductance: a tiny inertia makes the start stiff beyond use)")
    if run.status == "curve end":
        raise DesignError(f"{notch.name}: {run.message}")
    notch.add(run.duration_s, run.i_end_a, run.n_end_rpm, run.i_peak_a, run.charge_c, run.i2t_a2s, run.work_load_j,
              run.state_at)
    if run.status == "rest":
        return False
    if run.status != "time" or np.isfinite(t_left):
        return True
    duration = run.duration_s
    slope_rpm_s = (run.n_end_rpm - float(run.state_at(0.9 * duration)[1])) / (0.1 * duration)  # the last tenth
    raise _not_ended(notch, i_cut, t_cap, slope_rpm_s, final_speed)


def _general_phase(notch, k_phi, circuit, i_cut, t_left, t_cap, final_speed):
    """The phase by solve_ivp (Radau), the second method."""
    v_eff, r, l_h, j, load = circuit.v_eff_v, circuit.r_ohm, circuit.l_h, circuit.inertia_kgm2, circuit.load
    rtol = GENERAL_RTOL if circuit.rtol is None else circuit.rtol
    evaluations = [0]
    c1 = NM_PER_V_A_PER_RPM

    def rhs(t, y):
        evaluations[0] += 1
        if evaluations[0] > MAX_STEPS_PER_NOTCH:
            raise _StepBound
        i, n = y[0], y[1]
        flux = float(k_phi(i))
        t_load = float(load.at(n))
        return [(v_eff - r * i - flux * n) / l_h, c1 * (c1 * flux * i - t_load) / j, i, i * i, t_load * n * RAD_S_PER_RPM]

    def jacobian(t, y):
        # Given, because the quadrature rows never feed back and scipy's difference Jacobian
        # then grows its step without bound. Slopes of flux and load by backward differences.
        i, n = y[0], y[1]
        flux = float(k_phi(i))
        step_i, step_n = 1e-6 * max(abs(i), 1.0), 1e-6 * max(abs(n), 1.0)
        dflux = (flux - float(k_phi(max(i - step_i, 0.0)))) / (i - max(i - step_i, 0.0)) if i > 0.0 else 0.0
        t_load = float(load.at(n))
        dload = (t_load - float(load.at(n - step_n))) / step_n
        jac = np.zeros((5, 5))
        jac[0, 0], jac[0, 1] = -(r + dflux * n) / l_h, -flux / l_h
        jac[1, 0], jac[1, 1] = c1 * c1 * (flux + dflux * i) / j, -c1 * dload / j
        jac[2, 0], jac[3, 0] = 1.0, 2.0 * i
        jac[4, 1] = RAD_S_PER_RPM * (t_load + n * dload)
        return jac

    def to_rest(t, y):
        return y[1]

    to_rest.terminal, to_rest.direction = True, -1.0

    def current_peak(t, y):
        return rhs(t, y)[0]

    current_peak.direction = -1.0
    events = [to_rest, current_peak]
    if final_speed is not None:
        def settled_after_peak(t, y):
            # Positive once the speed has settled and the current is falling: the start is over.
            return min(y[1] - SETTLED_FRACTION * final_speed, -rhs(t, y)[0])

        settled_after_peak.terminal, settled_after_peak.direction = True, 1.0
        events.append(settled_after_peak)
    elif i_cut is not None:
        def falls_to_cut(t, y):
            return y[0] - i_cut

        falls_to_cut.terminal, falls_to_cut.direction = True, -1.0
        events.append(falls_to_cut)
    span = t_left if np.isfinite(t_left) else t_cap
    i_scale = max(abs(notch.i), v_eff / r * 1e-3)
    scale = np.array([i_scale, max(abs(notch.n), 1.0), i_scale * span, i_scale * i_scale * span, 1.0])
    try:
        solution = solve_ivp(
            rhs, (0.0, span), [notch.i, notch.n, 0.0, 0.0, 0.0], method="Radau", rtol=rtol,
            atol=rtol * 1e-3 * scale, events=events, dense_output=True, jac=jacobian,
        )
    except _StepBound:
        raise notch.incomplete(
            "step bound",
            f"was stopped after {MAX_STEPS_PER_NOTCH} integrator evaluations (the step bound): its time scales are "
            "too far apart (check the inertia and inductance: a tiny inertia makes the start stiff beyond use)",
        ) from None
    if solution.status < 0:
        raise DesignError(f"{notch.name}: the integrator failed ({solution.message})")
    y1 = solution.y[:, -1]
    duration = float(solution.t[-1])
    peaks = [notch.i, y1[0], *solution.y_events[1][:, 0]] if solution.y_events[1].size else [notch.i, y1[0]]
    dense = solution.sol

    def state_at(t):
        y = dense(np.clip(t, 0.0, duration))
        return y[0], y[1]

    at_rest = solution.status == 1 and solution.t_events[0].size > 0
    notch.add(duration, float(y1[0]), 0.0 if at_rest else float(y1[1]), max(peaks), float(y1[2]), float(y1[3]), float(y1[4]), state_at)
    if at_rest:
        return False
    if solution.status == 1 or np.isfinite(t_left):
        return True
    slope_rpm_s = (y1[1] - dense(0.9 * duration)[1]) / (0.1 * duration)  # over the last tenth of the cap
    raise _not_ended(notch, i_cut, t_cap, slope_rpm_s, final_speed)


def _not_ended(notch, i_cut, t_cap, slope_rpm_s, final_speed):
    """What a notch does when its time cap has passed without a cut (or the run without settling)."""
    after = f"after {quantity(t_cap, 's')} (the time cap)"
    accelerating = slope_rpm_s * t_cap > 1e-3 * max(abs(notch.n), 1.0)
    if final_speed is not None:
        return notch.incomplete(
            "accelerating" if accelerating else "stalls",
            f"is still accelerating at {quantity(notch.n, 'rpm')} {after}, towards {quantity(final_speed, 'rpm')}: "
            "a series motor on a light load heads for runaway; check the load it always carries"
            if accelerating else
            f"has not settled {after}, at {quantity(notch.n, 'rpm')} against {quantity(final_speed, 'rpm')}",
        )
    if notch.peak <= i_cut:
        return notch.incomplete(
            "steady below cut-out",
            f"runs {'on, still accelerating,' if accelerating else 'steadily'} at {quantity(notch.n, 'rpm')} with its "
            f"current never above the switching current ({quantity(i_cut, 'A')}; peak {quantity(notch.peak, 'A')}), "
            "so the current relay never sees it fall: lower the switching current or cut on timers",
        )
    if accelerating:
        return notch.incomplete(
            "accelerating",
            f"is still accelerating at {quantity(notch.n, 'rpm')} {after} with the current at "
            f"{quantity(notch.i, 'A')}, above the switching current ({quantity(i_cut, 'A')})",
        )
    return notch.incomplete(
        "stalls",
        f"stalls at {quantity(notch.n, 'rpm')}: the current settles at {quantity(notch.i, 'A')}, above the cut-out "
        f"current ({quantity(i_cut, 'A')}), {after}: raise the switching current or lighten the load",
    )

"""The rotor-resistance start in time against the no-load energy law and scipy.integrate.solve_ivp."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from notchwise.formulas.errors import DesignError, InputError
from notchwise.formulas.induction_motor import WoundRotorMotor, grade_rotor
from notchwise.formulas.resistors import resistance_at_c
from notchwise.formulas.rotor_start import simulate_rotor_start

#: A motor of our own making (not any real machine), as in tests/test_induction_motor.py.
MOTOR = WoundRotorMotor(0.02, 0.12, 4.0, 0.025, 0.13, 690.0, 50.0, 6, 750.0, 60.0)
GRADING = grade_rotor(MOTOR, 6000.0, 3500.0)
SECTIONS = GRADING.r_section_ohm
I_CUT = 330.0
LOAD_TABLE = [[0.0, 800.0], [300.0, 900.0], [700.0, 1500.0], [1000.0, 2200.0]]


def reference(sections, load, i_cut=None, dwells=None):
    """An independent model: J dw/dt = T - T_L by solve_ivp (DOP853, rtol 1e-12), the external loss
    3 I2^2 R_ext integrated from the rotor current, cut-outs as events on the rotor current."""
    r_total = MOTOR.r_rotor_side_ohm + np.cumsum(np.asarray(sections)[::-1])[::-1]
    load_at = (lambda n: np.interp(n, *np.asarray(load).T)) if np.ndim(load) else (lambda n: load)
    omega_s, j = MOTOR.omega_sync_rad_s, MOTOR.inertia_kgm2
    w, out = 0.0, []
    for k, r in enumerate(r_total):
        r_ref = float(MOTOR.to_stator_side_ohm(r))

        def rhs(t, y):
            s = 1.0 - y[0] / omega_s
            i2 = float(MOTOR.currents(s, r_ref).rotor_a)
            return [(MOTOR.torque_at_slip_nm(s, r_ref) - load_at(y[0] * 30.0 / np.pi)) / j, 3.0 * i2 * i2 * (r - MOTOR.r_rotor_side_ohm)]

        def cut(t, y):
            return float(MOTOR.currents(1.0 - y[0] / omega_s, r_ref).rotor_a) - i_cut

        cut.terminal, cut.direction = True, -1
        span = 100.0 if dwells is None else dwells[k]
        sol = solve_ivp(rhs, (0.0, span), [w, 0.0], method="DOP853", rtol=1e-12, atol=1e-9,
                        events=cut if dwells is None else None)
        w = sol.y[0, -1]
        out.append((sol.t[-1], w * 30.0 / np.pi, sol.y[1, -1]))
    return np.array(out).T


class TestAgainstSolveIvp:
    @pytest.mark.parametrize("load", [1000.0, LOAD_TABLE], ids=["constant load", "load table"])
    def test_current_limit_start(self, load):
        result = simulate_rotor_start(MOTOR, SECTIONS, load, i_cut_a=I_CUT)
        dwell, n_cut, energy = reference(SECTIONS, load, i_cut=I_CUT)
        np.testing.assert_allclose(result.dwell_s, dwell, rtol=1e-7)
        np.testing.assert_allclose(result.n_cut_rpm, n_cut, rtol=1e-9)
        np.testing.assert_allclose(result.energy_notch_j, energy, rtol=1e-7)

    RISING = [[0.0, 150.0], [250.0, 400.0], [600.0, 1300.0], [900.0, 2600.0]]

    @pytest.mark.parametrize("load, dwells, rtol_speed, rtol_energy", [
        (LOAD_TABLE, [0.9, 0.5, 0.3, 0.2, 0.15], 1e-7, 1e-6),
        # Corners of a rising load table inside steps: Newton's method on the time integral lands each dwell's
        # end where the reference ends it (the reference's own error is near 1e-10).
        (RISING, [1.2, 0.0, 0.05, 0.4, 0.3], 1e-9, 5e-9),
        (RISING, [1e-3, 0.7, 0.6, 0.5, 0.6], 1e-9, 5e-9),
        # A timer longer than the motor needs to settle (the first step settles within about 24 s) still holds
        # the step its whole dwell: the rotor runs on at the step's steady slip, its resistance dissipating.
        (1000.0, [60.0, 0.5, 0.3, 0.2, 0.15], 1e-9, 1e-7),
    ], ids=["load table", "a step skipped", "a short first step", "a dwell longer than the step needs"])
    def test_definite_time_start(self, load, dwells, rtol_speed, rtol_energy):
        """Each step lasts its dwell and the next starts at the sum of the dwells; speeds and energies at each
        step's end as solve_ivp (DOP853, rtol 1e-12, a second method) gives them."""
        result = simulate_rotor_start(MOTOR, SECTIONS, load, dwell_s=dwells)
        _, n_end, energy = reference(SECTIONS, load, dwells=dwells)
        np.testing.assert_allclose(result.dwell_s, dwells, rtol=1e-12)
        np.testing.assert_allclose(result.t_start_s, np.concatenate(([0.0], np.cumsum(dwells)[:-1])), rtol=1e-12)
        np.testing.assert_allclose(result.n_cut_rpm, n_end, rtol=rtol_speed)
        np.testing.assert_allclose(result.energy_notch_j, energy, rtol=rtol_energy)

class TestEnergyLaw:
    def test_no_load_rotor_energy_is_half_j_ws2_times_slip_squares(self):
        """On no load the whole rotor circuit dissipates (1/2) J ws^2 (s1^2 - s2^2) whatever the resistance
        (W. Leonhard, Control of Electrical Drives, 3rd ed., Springer, 2001, starting losses; from memory), the
        external resistance R_ext/(R_ext + R2) of it."""
        result = simulate_rotor_start(MOTOR, SECTIONS, 0.0, i_cut_a=I_CUT)
        s = np.append(1.0, result.s_cut)
        law = 0.5 * MOTOR.inertia_kgm2 * MOTOR.omega_sync_rad_s**2 * (s[:-1] ** 2 - s[1:] ** 2)
        np.testing.assert_allclose(result.energy_rotor_j, law, rtol=1e-12)
        share = (result.r_total_ohm - MOTOR.r_rotor_side_ohm) / result.r_total_ohm
        np.testing.assert_allclose(result.energy_notch_j, law * share, rtol=1e-12)

    def test_load_adds_energy(self):
        loaded = simulate_rotor_start(MOTOR, SECTIONS, 1500.0, i_cut_a=I_CUT)
        s = np.append(1.0, loaded.s_cut)
        law = 0.5 * MOTOR.inertia_kgm2 * MOTOR.omega_sync_rad_s**2 * (s[:-1] ** 2 - s[1:] ** 2)
        assert np.all(loaded.energy_rotor_j > law)


class TestStart:
    def test_graded_start_follows_the_grading(self):
        """Cut out at the grading's switching current, the start cuts at the grading's speeds and its peaks."""
        i_switch = float(MOTOR.currents(1.0, MOTOR.r_over_s_at_torque(GRADING.t_switch_nm[0])).rotor_a)
        result = simulate_rotor_start(MOTOR, SECTIONS, 1000.0, i_cut_a=i_switch)
        np.testing.assert_allclose(result.n_cut_rpm, GRADING.n_cut_rpm, rtol=1e-10)
        np.testing.assert_allclose(result.i_peak_a, GRADING.i_rotor_peak_a, rtol=1e-10)
        np.testing.assert_allclose(result.i_stator_peak_a, GRADING.i_stator_peak_a, rtol=1e-10)
        assert result.i_peak_run_a == pytest.approx(GRADING.i_rotor_peak_a[0], rel=1e-10)

    def test_final_speed_and_acceleration_time(self):
        result = simulate_rotor_start(MOTOR, SECTIONS, 1000.0, i_cut_a=I_CUT)
        assert MOTOR.torque_at(result.n_final_rpm) == pytest.approx(1000.0, rel=1e-10)
        t_end = result.t_start_s[-1] + result.dwell_s[-1]
        assert result.t_accel_s > t_end
        # Second method: the run from the last cut to 98 % of final speed by solve_ivp.
        omega_s = MOTOR.omega_sync_rad_s
        settled = lambda t, y: y[0] - 0.98 * result.n_final_rpm * np.pi / 30.0  # noqa: E731
        settled.terminal = True
        sol = solve_ivp(lambda t, y: [(MOTOR.torque_at_slip_nm(1.0 - y[0] / omega_s, MOTOR.r_rotor_ohm) - 1000.0) / 60.0],
                        (0.0, 50.0), [result.n_cut_rpm[-1] * np.pi / 30.0], method="DOP853", rtol=1e-12, atol=1e-10, events=settled)
        assert result.t_accel_s - t_end == pytest.approx(sol.t[-1], rel=1e-8)

    def test_a_step_already_below_its_cut_out_current_is_cut_at_once(self):
        result = simulate_rotor_start(MOTOR, [5.0, *SECTIONS], 0.0, i_cut_a=I_CUT)
        assert result.dwell_s[0] == 0.0 and result.energy_notch_j[0] == 0.0


class TestMessages:
    def test_switching(self):
        with pytest.raises(InputError, match="either i_cut"):
            simulate_rotor_start(MOTOR, SECTIONS, 0.0)
        with pytest.raises(InputError, match="dwell has 2 entries but sections has 5"):
            simulate_rotor_start(MOTOR, SECTIONS, 0.0, dwell_s=[1.0, 1.0])
        with pytest.raises(InputError, match=r"dwell entry 2 \(-1 s\) must not be negative"):
            simulate_rotor_start(MOTOR, SECTIONS, 0.0, dwell_s=[1.0, -1.0, 1.0, 1.0, 1.0])
        with pytest.raises(DesignError, match="more than the rotor draws short-circuited"):
            simulate_rotor_start(MOTOR, SECTIONS, 0.0, i_cut_a=1e5)

    def test_stalls(self):
        with pytest.raises(DesignError, match="step 1 stalls at standstill"):
            simulate_rotor_start(MOTOR, SECTIONS, 7000.0, i_cut_a=I_CUT)
        with pytest.raises(DesignError, match="step 1 stalls: the torque meets the load"):
            simulate_rotor_start(MOTOR, SECTIONS, 3000.0, i_cut_a=200.0)
        for switching in (dict(i_cut_a=I_CUT), dict(dwell_s=[1.0] * 5)):  # a load table above the standstill torque
            with pytest.raises(DesignError, match=r"step 1 stalls at standstill: the torque \(6000 N·m\) is not above the load \(7000 N·m\)"):
                simulate_rotor_start(MOTOR, SECTIONS, [[0.0, 7000.0], [1000.0, 8000.0]], **switching)

    def test_bad_load_and_sections(self):
        with pytest.raises(InputError, match="must not be negative"):
            simulate_rotor_start(MOTOR, SECTIONS, -5.0, i_cut_a=I_CUT)
        with pytest.raises(InputError, match="must be above zero"):
            simulate_rotor_start(MOTOR, [0.3, 0.0], 0.0, i_cut_a=I_CUT)
        with pytest.raises(InputError, match=r"load_torque \(\[1.0, 2.0, 3.0\]\) must be a number or two columns"):
            simulate_rotor_start(MOTOR, SECTIONS, [1.0, 2.0, 3.0], i_cut_a=I_CUT)


#: The same motor as a name/value block, as the start-in-time cells read it.
ROTOR_CELLS = [["kind", "wound rotor"], ["v_line", 690.0], ["frequency", 50.0], ["poles", 6], ["r_stator", 0.02],
               ["x_stator", 0.12], ["x_magnetizing", 4.0], ["r_rotor", 0.025], ["x_rotor", 0.13], ["e_rotor", 750.0],
               ["inertia", 60.0]]
SECTION_CELLS = [[float(r)] for r in SECTIONS]


def _cells(name, *arguments):
    from notchwise.addin import udfs
    from notchwise.addin.cells import call_with_cells

    return call_with_cells(getattr(udfs, name), list(arguments))


class TestThroughTheStartCells:
    def test_no_load_energy_law_through_nw_start_sim(self):
        """NW_START_SIM's energy column against (1/2) J ws^2 (s1^2 - s2^2) R_ext/(R_ext + R2) per step, its slips
        from its own speed column (Leonhard, Control of Electrical Drives, 3rd ed., starting losses; from memory)."""
        table = _cells("NW_START_SIM", ROTOR_CELLS, SECTION_CELLS, 0.0, I_CUT, None, None)
        assert table[0][-1] == "peak stator current [A]" and len(table[0]) == 8
        steps = np.array([row[:8] for row in table[1:1 + SECTIONS.size]], dtype=float)
        s = np.append(1.0, 1.0 - steps[:, 5] / MOTOR.sync_speed_rpm)
        r_total = MOTOR.r_rotor_side_ohm + np.cumsum(SECTIONS[::-1])[::-1]
        law = 0.5 * MOTOR.inertia_kgm2 * MOTOR.omega_sync_rad_s**2 * (s[:-1] ** 2 - s[1:] ** 2)
        np.testing.assert_allclose(steps[:, 6], law * (r_total - MOTOR.r_rotor_side_ohm) / r_total, rtol=1e-10)
        np.testing.assert_allclose(steps[:, 4], I_CUT, rtol=1e-9)  # rotor current in the cut-out column

    def test_history_against_solve_ivp(self):
        """Speed and rotor current of NW_START_HISTORY at its sample times against J dw/dt = T - T_L by solve_ivp
        (DOP853, rtol 1e-12) on each step, the steps' dwells from NW_START_SIM (a second method)."""
        table = _cells("NW_START_SIM", ROTOR_CELLS, SECTION_CELLS, LOAD_TABLE, I_CUT, None, False)
        dwells = [row[2] for row in table[:SECTIONS.size]]
        rows = np.array(_cells("NW_START_HISTORY", ROTOR_CELLS, SECTION_CELLS, LOAD_TABLE, I_CUT, 120, None, False), dtype=float)
        t, rotor, speed, torque, stator = rows.T
        r_total = MOTOR.r_rotor_side_ohm + np.append(np.cumsum(SECTIONS[::-1])[::-1], 0.0)
        ends = np.append(np.cumsum(dwells), np.inf)
        omega_s, w, t0 = MOTOR.omega_sync_rad_s, 0.0, 0.0
        load_at = lambda n: np.interp(n, *np.asarray(LOAD_TABLE).T)  # noqa: E731
        for k, r in enumerate(r_total):
            r_ref = float(MOTOR.to_stator_side_ohm(r))
            inside = (t >= t0) & (t < ends[k]) if k < SECTIONS.size else t >= t0
            t1 = min(ends[k], t[-1])
            sol = solve_ivp(lambda _, y: [(MOTOR.torque_at_slip_nm(1.0 - y[0] / omega_s, r_ref) - load_at(y[0] * 30.0 / np.pi)) / 60.0],
                            (t0, t1), [w], method="DOP853", rtol=1e-12, atol=1e-10, dense_output=True)
            n_ref = sol.sol(t[inside])[0] * 30.0 / np.pi
            np.testing.assert_allclose(speed[inside], n_ref, rtol=1e-6, atol=1e-4)
            ref = MOTOR.currents(1.0 - n_ref / MOTOR.sync_speed_rpm, r_ref)
            np.testing.assert_allclose(rotor[inside], ref.rotor_a, rtol=1e-6)
            np.testing.assert_allclose(stator[inside], ref.stator_a, rtol=1e-6)
            w, t0 = sol.y[0, -1], t1

    def test_heating_is_three_phases(self):
        """Three phases carry the rotor current: each section's energy is 3 R_s sum(i2t), and together the
        sections take the whole start's external energy (conservation, a closed form)."""
        start = _cells("NW_START_SIM", ROTOR_CELLS, SECTION_CELLS, 1000.0, I_CUT, None, False)
        heating = _cells("NW_SECTION_HEATING", ROTOR_CELLS, SECTION_CELLS, 1000.0, I_CUT, "AISI 304", 30.0, 6.0, None,
                         None, None, False)
        assert heating[0][1] == pytest.approx(float(resistance_at_c(SECTIONS[0], 20.0, "AISI 304")), rel=1e-12)
        energy = np.array([row[3] for row in heating], dtype=float)
        assert energy.sum() == pytest.approx(start[-1][6], rel=1e-10)

    def test_worst_case_scales_torque_with_the_square_of_voltage(self):
        """At 90 % supply the standstill torque is 0.81 of nominal (T ~ V_th^2, Eq. 6.36 of Fitzgerald et al.,
        6th ed.): the same start at v_line 621 V is the worst case's 621 V corner."""
        low = MOTOR.with_supply(621.0, MOTOR.inertia_kgm2)
        assert low.torque_at(0.0, 0.3) == pytest.approx(0.81 * MOTOR.torque_at(0.0, 0.3), rel=1e-12)
        assert low.ratio == pytest.approx(MOTOR.ratio, rel=1e-12)
        table = _cells("NW_WORST_CASE", ROTOR_CELLS, SECTION_CELLS, 1000.0, I_CUT, -0.1, -0.1, 0.0, "AISI 304", 20.0,
                       1, None, None, False)
        peak = table[0]
        direct = simulate_rotor_start(low, SECTIONS, 1000.0, i_cut_a=I_CUT)  # tolerance 0, grid at 20 °C
        assert peak[2] == pytest.approx(621.0) and peak[1] == pytest.approx(max(direct.i_peak_a.max(), direct.i_peak_run_a), rel=1e-12)

    def test_protection_takes_the_stator_history_directly(self):
        """NW_RIDE_THROUGH on the whole five-column history reads the stator current, the same as on the two
        columns time and stator current (and not the rotor current)."""
        history = _cells("NW_START_HISTORY", ROTOR_CELLS, SECTION_CELLS, 1000.0, I_CUT, 60, None, True)
        two = [[row[0], row[4]] for row in history]
        rotor = [[row[0], row[1]] for row in history]
        arguments = ("IEC VI", 300.0, 0.3, None, None, None, None, None, None, None)
        whole = _cells("NW_RIDE_THROUGH", history, *arguments)
        assert whole == _cells("NW_RIDE_THROUGH", two, *arguments)
        assert whole != _cells("NW_RIDE_THROUGH", rotor, *arguments)


def test_worst_case_counts_a_wound_rotor_stall_by_its_step():
    """At 90 % supply the standstill torque on step 1 is 0.81 x 6000 = 4860 N·m (T ~ V², Eq. 6.36 of Fitzgerald
    et al., 6th ed.), below a 5000 N·m load: that corner stalls on step 1, the others run."""
    from notchwise.formulas.worst_case import sweep_corners

    sweep = sweep_corners(MOTOR, 690.0, SECTIONS, None, MOTOR.inertia_kgm2, 5000.0, -0.1, 0.1, 0.0, "AISI 304",
                          20.0, 20.0, (3, 1, 1), i_cut_a=I_CUT * 1.5)
    assert sweep.status == ("stalls", "ran", "ran")
    assert sweep.status_notch[0] == 1 and "step 1 stalls at standstill" in sweep.reason[0]
    assert sweep.worst_margin in (1, 2) and np.all(sweep.margin[1:] > 0.0)

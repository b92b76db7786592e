"""The rotor-resistance start in time against the no-load energy law and scipy.integrate.solve_ivp."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from notchwise.formulas.errors import DesignError, InputError
from notchwise.formulas.induction_motor import WoundRotorMotor, grade_rotor
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

    def test_definite_time_start(self):
        dwells = [0.9, 0.5, 0.3, 0.2, 0.15]
        result = simulate_rotor_start(MOTOR, SECTIONS, LOAD_TABLE, dwell_s=dwells)
        _, n_end, energy = reference(SECTIONS, LOAD_TABLE, dwells=dwells)
        np.testing.assert_allclose(result.dwell_s, dwells, rtol=1e-9)
        np.testing.assert_allclose(result.n_cut_rpm, n_end, rtol=1e-7)
        np.testing.assert_allclose(result.energy_notch_j, energy, rtol=1e-6)


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

    def test_bad_load_and_sections(self):
        with pytest.raises(InputError, match="must not be negative"):
            simulate_rotor_start(MOTOR, SECTIONS, -5.0, i_cut_a=I_CUT)
        with pytest.raises(InputError, match="must be above zero"):
            simulate_rotor_start(MOTOR, [0.3, 0.0], 0.0, i_cut_a=I_CUT)
        with pytest.raises(InputError, match="load_torque must be a number or two columns"):
            simulate_rotor_start(MOTOR, SECTIONS, [1.0, 2.0, 3.0], i_cut_a=I_CUT)

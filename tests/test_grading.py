"""Starter grading against published laws, worked examples and a second method."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st

from notchwise.formulas.dc_motor import CompoundMotor, SeriesMotor, ShuntMotor, magnetization_curve
from notchwise.formulas.errors import DesignError, InputError, InputTypeError
from notchwise.formulas.grading import MAX_NOTCHES, check_sections, grade_uniform, peak_after_cut_a
from tests.conftest import SATURATING_CURVE

# A saturating curve of our own making (not any real machine): EMF [V] at 1000 rpm against current [A].
CURVE = SATURATING_CURVE


def shunt(r_ohm=0.05):
    return ShuntMotor(r_ohm, 1.0)


class TestShuntGeometricLaw:
    """M. G. Say and E. O. Taylor, Direct Current Machines, 2nd ed., Pitman, 1986 (graded starter):
    with constant flux, R_{k+1} = (I2/I1) R_k and n = ln(R1/Ra) / ln(I1/I2) sections (from memory: chapter)."""

    def test_resistances_form_a_geometric_series_landing_on_ra(self):
        g = grade_uniform(shunt(0.05), 220.0, 300.0, 150.0)
        ratio = g.i_switch_a[0] / g.i_peak_a[0]
        np.testing.assert_allclose(g.r_total_ohm[1:] / g.r_total_ohm[:-1], ratio, rtol=1e-12)
        assert g.r_total_ohm[-1] * ratio == pytest.approx(0.05, rel=1e-12)

    def test_count_is_the_ceiling_of_the_log_ratio(self):
        g = grade_uniform(shunt(0.05), 220.0, 300.0, 150.0)
        assert g.notches == math.ceil(math.log((220.0 / 300.0) / 0.05) / math.log(300.0 / 150.0))

    def test_switching_current_is_raised_to_the_exact_ratio(self):
        g = grade_uniform(shunt(0.05), 220.0, 300.0, 150.0)
        r1 = 220.0 / 300.0
        assert g.i_switch_a[0] == pytest.approx(300.0 * (0.05 / r1) ** (1.0 / g.notches), rel=1e-12)

    def test_worked_example_three_stages(self):
        """S. J. Chapman, Electric Machinery Fundamentals, 4th ed., McGraw-Hill, 2005, Example 9-8
        (from memory): 250 V shunt motor, R_A = 0.05 ohm, current between 700 A and 350 A: three stages,
        R1 = 0.1786, R2 = 0.0893, R3 = 0.0393 ohm (current kept at 350 A, so the last peak is below 700 A)."""
        g = grade_uniform(shunt(0.05), 250.0, 700.0, 350.0)
        assert g.notches == 3
        check = check_sections(shunt(0.05), 250.0, [0.1786, 0.0893, 0.0393], 350.0, 701.0, 1e4)
        np.testing.assert_allclose(check.i_peak_a[:3], 700.0, rtol=5e-4)  # 4 digits printed
        assert check.i_peak_a[3] == pytest.approx(350.0 * 0.0893 / 0.05, rel=1e-3)
        assert check.i_peak_a[3] < 700.0
        assert check.passes


class TestSeriesLinearFlux:
    r"""Series motor with flux proportional to current (no saturation).

    From E = k·phi·n and T = k·phi·I (A. E. Fitzgerald, C. Kingsley, S. D. Umans, Electric Machinery,
    6th ed., 2003, Eqs. 7.7 and 7.1) with phi = c·I: just before a cut, E = V - I2·R_k; speed holds across
    the cut, so just after it E' = E·I1/I2. Then V - I1·R_{k+1} = (V - I2·R_k)·I1/I2, which gives
    R_k - R_{k+1} = V(1/I2 - 1/I1): every section is the same.
    """

    def test_every_section_equals_v_times_the_reciprocal_difference(self):
        g = grade_uniform(SeriesMotor(0.04), 230.0, 400.0, 300.0, notches=None)
        i2 = g.i_switch_a[0]
        np.testing.assert_allclose(g.r_section_ohm, 230.0 * (1 / i2 - 1 / 400.0), rtol=1e-10)

    def test_count_follows_from_the_arithmetic_series(self):
        g = grade_uniform(SeriesMotor(0.04), 230.0, 400.0, 300.0)
        step = 230.0 * (1 / 300.0 - 1 / 400.0)
        assert g.notches == math.ceil((230.0 / 400.0 - 0.04) / step)


class TestGeneralRecursion:
    def test_compound_without_series_turns_is_the_shunt_law(self):
        motor = CompoundMotor(0.05, magnetization_curve([0, 1000, 3000], [0, 150, 240]), 2000.0, 1e-9)
        a, b = grade_uniform(motor, 220.0, 300.0, 150.0), grade_uniform(shunt(0.05), 220.0, 300.0, 150.0)
        np.testing.assert_allclose(a.r_total_ohm, b.r_total_ohm, rtol=1e-6)

    def test_compound_on_a_straight_curve_without_shunt_is_the_linear_series_law(self):
        motor = CompoundMotor(0.04, magnetization_curve([0, 10000], [0, 500]), 0.0, 10.0)
        a, b = grade_uniform(motor, 230.0, 400.0, 300.0), grade_uniform(SeriesMotor(0.04), 230.0, 400.0, 300.0)
        np.testing.assert_allclose(a.r_section_ohm, b.r_section_ohm, rtol=1e-9)

    def test_curve_grading_is_reproduced_by_an_independent_root_finder(self):
        """The section check solves each cut with Brent's method on the speed-continuity equation,
        a different path from the grading recursion: every peak must come back at i_peak."""
        motor = SeriesMotor(0.05, CURVE)
        g = grade_uniform(motor, 230.0, 420.0, 250.0, brush_drop_v=2.0)
        check = check_sections(motor, 230.0, g.r_section_ohm, g.i_switch_a[0], 421.0, 500.0, brush_drop_v=2.0)
        np.testing.assert_allclose(check.i_peak_a, 420.0, rtol=1e-9)

    def test_fixed_notches_raise_the_switching_current(self):
        free = grade_uniform(shunt(), 220.0, 300.0, 150.0)
        fixed = grade_uniform(shunt(), 220.0, 300.0, 150.0, notches=free.notches + 2)
        assert fixed.notches == free.notches + 2 and fixed.i_switch_a[0] > free.i_switch_a[0]

    def test_too_few_fixed_notches_name_the_count_needed(self):
        with pytest.raises(DesignError, match=r"2 notches cannot keep .* 4 are needed"):
            grade_uniform(shunt(), 220.0, 300.0, 150.0, notches=2)


def test_peak_after_cut_for_a_shunt_motor_is_ohms_law():
    # constant flux: E is unchanged across the cut, so I = (V - E)/R_after.
    e = 220.0 - 150.0 * 0.7
    assert peak_after_cut_a(shunt(), 220.0, 0.7, 0.4, 150.0) == pytest.approx((220.0 - e) / 0.4, rel=1e-12)


motors = st.one_of(
    st.builds(ShuntMotor, st.floats(0.005, 2.0), st.just(1.0)),
    st.builds(SeriesMotor, st.floats(0.005, 2.0)),
    st.builds(SeriesMotor, st.floats(0.005, 2.0), st.just(CURVE)),
)


@settings(max_examples=150, deadline=None)
@given(motor=motors, v=st.floats(24.0, 3000.0), i_peak=st.floats(20.0, 600.0), band=st.floats(0.3, 0.9))
def test_every_grading_keeps_its_limits_and_sums_up(motor, v, i_peak, band):
    """Laws of the convention (module docstring of formulas.grading); common practice, no source."""
    i_switch = band * i_peak
    assume(v / i_peak > motor.r_ohm * 1.001)
    try:
        g = grade_uniform(motor, v, i_peak, i_switch)
    except DesignError as error:
        assert "notches" in str(error) or "lower the circuit resistance" in str(error)
        return
    assert np.all(g.i_peak_a <= i_peak * (1 + 1e-12))
    assert np.all(g.i_switch_a >= i_switch * (1 - 1e-12))
    assert g.r_section_ohm.sum() + motor.r_ohm == pytest.approx(g.r_total_ohm[0], rel=1e-12)
    assert np.all(g.r_section_ohm > 0.0)


@settings(max_examples=100, deadline=None)
@given(motor=motors, v=st.floats(24.0, 3000.0), i_peak=st.floats(20.0, 600.0), bands=st.lists(st.floats(0.3, 0.9), min_size=2, max_size=2))
def test_a_wider_band_never_needs_more_notches(motor, v, i_peak, bands):
    narrow, wide = max(bands), min(bands)
    assume(v / i_peak > motor.r_ohm * 1.001)
    try:
        n_narrow = grade_uniform(motor, v, i_peak, narrow * i_peak).notches
    except DesignError:
        return
    assert grade_uniform(motor, v, i_peak, wide * i_peak).notches <= n_narrow


@pytest.mark.parametrize(
    "args, error, words",
    [
        ((220.0, 150.0, 300.0), InputError, "i_switch (300 A) must be below i_peak (150 A)"),
        ((220.0, 300.0, -1.0), InputError, "i_switch (-1 A) must be above zero"),
        ((-220.0, 300.0, 150.0), InputError, "v_supply (-220 V) must be above zero"),
        (("220", 300.0, 150.0), InputTypeError, "v_supply ('220') is not a number"),
        ((None, 300.0, 150.0), InputTypeError, "v_supply is empty"),
        ((10.0, 300.0, 150.0), DesignError, "no starting resistance is needed"),
        ((220.0, 300.0, 299.9), DesignError, f"more than {MAX_NOTCHES} notches"),
    ],
)
def test_bad_grading_inputs_name_argument_and_limit(args, error, words):
    with pytest.raises(error) as caught:
        grade_uniform(shunt(), *args)
    assert words in str(caught.value)


def test_notches_out_of_range_and_fractional():
    with pytest.raises(InputError, match="notches .* must be from 1 to 30"):
        grade_uniform(shunt(), 220.0, 300.0, 150.0, notches=31)
    with pytest.raises(InputError, match="whole number"):
        grade_uniform(shunt(), 220.0, 300.0, 150.0, notches=2.5)


def test_peak_beyond_the_curve_is_refused():
    with pytest.raises(InputError, match="beyond the magnetization curve"):
        grade_uniform(SeriesMotor(0.05, CURVE), 230.0, 700.0, 400.0)


def test_bad_sections_are_named():
    with pytest.raises(InputError, match=r"sections entry 2 \(-0.1 ohm\) must be above zero"):
        check_sections(shunt(), 220.0, [0.3, -0.1], 150.0, 300.0, 400.0)
    with pytest.raises(InputError, match="at most 30"):
        check_sections(shunt(), 220.0, [0.01] * 31, 150.0, 300.0, 400.0)


def test_check_verdicts_name_the_limit_broken():
    check = check_sections(shunt(0.05), 250.0, [0.1786, 0.0893, 0.0393], 350.0, 650.0, 690.0)
    assert check.verdict[0] == "peak over i_limit (650 A); peak over i_commutation (690 A)"
    assert check.verdict[3] == "ok" and not check.passes

"""Voltage dip at a starting motor's terminals against closed forms."""

from __future__ import annotations

import math

import numpy as np
import pytest

from notchwise.formulas.errors import InputError
from notchwise.formulas.supply import voltage_dip


def test_equal_angles_give_the_kva_ratio():
    """IEEE Std 141-1993 (Red Book), ch. 3 (from memory): with motor and source impedance at the same angle the
    dip is S_motor / (S_motor + S_sc); here X/R = 2 and power factor cos(atan 2)."""
    v, mva, ratio = 690.0, 20.0, 2.0
    pf = math.cos(math.atan(ratio))
    current = np.array([100.0, 632.0, 4000.0])
    s_motor = math.sqrt(3.0) * v * current / 1e6
    np.testing.assert_allclose(voltage_dip(v, mva, ratio, current, pf), s_motor / (s_motor + mva), rtol=1e-12)


def test_divider_by_hand():
    """Closed form: the complex divider V_t/V = Z_m / (Z_s + Z_m) written out with complex numbers."""
    v, mva, ratio, i, pf = 3300.0, 50.0, 10.0, 400.0, 0.3
    z_s = v * v / (mva * 1e6) * complex(1.0, ratio) / math.hypot(1.0, ratio)
    z_m = v / (math.sqrt(3.0) * i) * complex(pf, math.sqrt(1.0 - pf * pf))
    assert voltage_dip(v, mva, ratio, i, pf) == pytest.approx(1.0 - abs(z_m / (z_s + z_m)), rel=1e-12)


def test_limits():
    assert voltage_dip(690.0, 20.0, 8.0, 0.0, 0.5) == 0.0
    dips = voltage_dip(690.0, 20.0, 8.0, np.linspace(0.0, 1000.0, 11), 0.4)
    assert np.all(np.diff(dips) > 0.0)


@pytest.mark.parametrize(
    "args, words",
    [
        ((690.0, 20.0, 8.0, 600.0, 1.2), "power_factor (1.2) must be at most 1"),
        ((690.0, 20.0, 8.0, 600.0, 0.0), "power_factor (0) must be above zero"),
        ((690.0, 0.0, 8.0, 600.0, 0.4), "fault_level (0 MVA) must be above zero"),
        ((690.0, 20.0, -1.0, 600.0, 0.4), "x_over_r (-1) must not be negative"),
        ((690.0, 20.0, 8.0, -5.0, 0.4), "current (-5 A) must not be negative"),
        ((690.0, 1.0, 8.0, 5000.0, 0.4), "must not exceed the source's fault current (836.7 A)"),
        ((math.nan, 20.0, 8.0, 600.0, 0.4), "v_line (nan) must be a finite number in V"),
    ],
)
def test_bad_inputs(args, words):
    with pytest.raises(InputError) as caught:
        voltage_dip(*args)
    assert words in str(caught.value)

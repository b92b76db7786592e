r"""The supply seen by a starting motor: voltage dip at the motor terminals.

The supply is its Thevenin source: the open-circuit voltage behind the
short-circuit impedance given by its fault level and X/R ratio,

.. math::

    |Z_s| = \frac{V^2}{S_{sc}}, \qquad R_s = \frac{|Z_s|}{\sqrt{1 + (X/R)^2}}, \qquad X_s = (X/R)\,R_s,

and the motor, while a step lasts, is a constant impedance: the one that draws
``current`` at lagging ``power_factor`` from the full line voltage,
:math:`Z_m = (V/\sqrt3\,I)(\cos\varphi + j\sin\varphi)`. The terminal voltage is
the divider :math:`V_t = V\,Z_m/(Z_s + Z_m)` and the dip :math:`1 - |V_t|/V`.
This is the impedance method of motor-starting voltage-drop studies ([1]_,
ch. 9; [2]_, ch. 3, from memory); where the two impedances have the same angle
it reduces to the handbook ratio :math:`S_m/(S_m + S_{sc})`. Other loads on
the bus, transformer taps and regulator action are left out.

References
----------
.. [1] *IEEE Recommended Practice for Industrial and Commercial Power Systems
   Analysis (Brown Book)*, IEEE Std 399-1997, ch. 9 (motor-starting studies,
   impedance representation of the starting motor; from memory).
.. [2] *IEEE Recommended Practice for Electric Power Distribution for
   Industrial Plants (Red Book)*, IEEE Std 141-1993, ch. 3 (voltage
   considerations, motor-starting voltage drop; from memory).
"""

from __future__ import annotations

import math

import numpy as np

from .errors import InputError, as_magnitudes, quantity, require_non_negative, require_positive

__all__ = ["voltage_dip"]


def voltage_dip(v_line_v, fault_level_mva, x_over_r, current_a, power_factor):
    r"""Fractional voltage dip at the motor terminals while the motor draws ``current_a``.

    Parameters
    ----------
    v_line_v : float
        Line voltage of the supply at no load. [V]
    fault_level_mva : float
        Three-phase short-circuit level at the motor's bus. [MVA]
    x_over_r : float
        X/R ratio of the source impedance, at or above zero. [-]
    current_a : float or array_like
        Line current the motor draws at full voltage (e.g. per step), from zero to the
        source's fault current :math:`S_{sc}/(\sqrt3 V)`. [A]
    power_factor : float
        Lagging power factor of that current, above 0 and at most 1. [-]

    Returns
    -------
    float or numpy.ndarray
        Dip as a fraction of ``v_line_v`` (0.1 = 10 %), one per current. [-]

    Notes
    -----
    .. math:: \text{dip} = 1 - \left|\frac{Z_m}{Z_s + Z_m}\right| = 1 - \frac{1}{|1 + Z_s Y_m|}

    (module docstring, [1]_ ch. 9).

    Examples
    --------
    1500 A at power factor 0.3 from a 690 V, 25 MVA bus (invented figures).
    With the source's X/R equal to the motor's, :math:`\sqrt{1 - 0.3^2}/0.3`,
    the dip is the kVA ratio :math:`S_m/(S_m + S_{sc})` of [2]_,
    :math:`S_m = \sqrt3 \cdot 690 \cdot 1500` VA:

    >>> round(voltage_dip(690.0, 25.0, (1.0 - 0.3**2) ** 0.5 / 0.3, 1500.0, 0.3), 4)
    0.0669
    >>> round(voltage_dip(690.0, 25.0, 8.0, 1500.0, 0.3), 4)
    0.066
    """
    v = require_positive("v_line", v_line_v, "V")
    s_sc = require_positive("fault_level", fault_level_mva, "MVA") * 1e6
    ratio = require_non_negative("x_over_r", x_over_r)
    pf = require_positive("power_factor", power_factor)
    if pf > 1.0:
        raise InputError(f"power_factor ({quantity(pf)}) must be at most 1")
    current = as_magnitudes("current", current_a, "A")
    i_fault = s_sc / (math.sqrt(3.0) * v)
    if np.any(current > i_fault):
        raise InputError(
            f"current ({quantity(float(np.max(current)), 'A')}) must not exceed the source's fault current "
            f"({quantity(i_fault, 'A')}): check fault_level and v_line"
        )
    z_source = v * v / s_sc
    r_source = z_source / math.hypot(1.0, ratio)
    source = complex(r_source, ratio * r_source)
    y_motor = math.sqrt(3.0) * current / (v * complex(pf, math.sqrt(1.0 - pf * pf)))
    dip = 1.0 - 1.0 / np.abs(1.0 + source * y_motor)  # V_t/V = Z_m/(Z_s + Z_m) = 1/(1 + Z_s Y_m), [1] ch. 9
    return dip if dip.ndim else float(dip)

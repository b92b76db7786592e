"""The test motors and curves that several test modules share (invented data, no real machine).

Plain module-level values, imported by name (``from tests.conftest import TEST_SHUNT``), so that a
change of a constructor is made here once. A module's own one-off motors stay with it.
"""

from __future__ import annotations

from notchwise.formulas.dc_motor import ShuntMotor, magnetization_curve

__all__ = [
    "SATURATING_I_A", "SATURATING_E_V", "SATURATING_SPEED_RPM", "SATURATING_CURVE", "TEST_SHUNT", "TEST_SECTIONS_OHM",
    "COMPOUND_AMPERE_TURNS",
]

#: A saturating magnetization curve of our own making: current [A] against EMF [V] at 1000 rpm.
SATURATING_I_A = (0.0, 50.0, 100.0, 200.0, 300.0, 400.0, 600.0)
SATURATING_E_V = (4.0, 110.0, 190.0, 280.0, 320.0, 345.0, 370.0)
SATURATING_SPEED_RPM = 1000.0
SATURATING_CURVE = magnetization_curve(SATURATING_I_A, SATURATING_E_V, SATURATING_SPEED_RPM)

#: A shunt (separately excited) motor: armature circuit 0.1 ohm, kΦ 0.4 V/rpm.
TEST_SHUNT = ShuntMotor(0.1, 0.4)
#: Three starter sections for it, in the order cut out [ohm].
TEST_SECTIONS_OHM = (1.0, 0.5, 0.25)

#: A compound motor's curve: excitation [ampere-turns] against EMF [V] (at the speed each test gives).
COMPOUND_AMPERE_TURNS = ((0.0, 0.0), (1000.0, 100.0), (3000.0, 200.0), (6000.0, 260.0), (9000.0, 290.0))

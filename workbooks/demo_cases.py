"""Demo cases: invented drives at the fictional Port of Merrow and Caldbeck Quarry.

All motor data here are made up for the demonstration; they are no
manufacturer's figures and no textbook problem. They are used by
``notchwise demo``, ``notchwise diagram`` and the reference workbook, never as test references.
"""

from __future__ import annotations

from dataclasses import dataclass, field

__all__ = ["HOIST", "CONVEYOR", "CONTRACTOR", "HOIST_START", "CONVEYOR_START", "HOIST_PROTECTION", "STARTS", "MILL", "DemoCase"]


@dataclass(frozen=True)
class DemoCase:
    """One worked case: a title, its story and the cell arguments of its functions."""

    key: str
    title: str
    story: str
    inputs: dict = field(default_factory=dict)


#: Main hoist of the Merrow quay crane no. 3: a 230 V DC series motor.
HOIST = DemoCase(
    key="hoist",
    title="Merrow quay crane 3, main hoist (DC series motor)",
    story=(
        "A 230 V series-wound hoist motor on the Port of Merrow's quay crane 3, "
        "started through a graded resistor with current-limit contactors."
    ),
    inputs={
        "v_supply": 230.0,
        "r_motor": 0.062,
        "i_peak": 420.0,
        "i_switch": 290.0,
        "brush_drop": 2.0,
        "mag_speed": 700.0,
        "n_max": 2100.0,
        # dynamic data for the start in time (invented): circuit inductance, inertia on the motor shaft,
        # and the hoisting torque of the rated hook load referred to the motor shaft
        "l_circuit": 0.004,
        "inertia": 6.5,
        "load_torque": 520.0,
        # current [A], EMF [V] measured at mag_speed
        "mag_curve": [
            [0.0, 6.0],
            [40.0, 62.0],
            [80.0, 112.0],
            [120.0, 150.0],
            [160.0, 178.0],
            [220.0, 205.0],
            [300.0, 228.0],
            [400.0, 246.0],
            [500.0, 258.0],
        ],
        # currents at which the speed-current characteristic is drawn [A]
        "sweep_current": [40.0, 60.0, 80.0, 100.0, 140.0, 180.0, 220.0, 260.0, 300.0, 350.0, 400.0, 450.0, 500.0],
    },
)

#: Drive of the Caldbeck Quarry overland conveyor: a 460 V separately excited motor.
CONVEYOR = DemoCase(
    key="conveyor",
    title="Caldbeck Quarry overland conveyor (DC separately excited motor)",
    story=(
        "A 460 V separately excited motor driving the Caldbeck Quarry overland "
        "conveyor, started on a definite number of notches."
    ),
    inputs={
        "v_supply": 460.0,
        "r_motor": 0.085,
        "i_peak": 380.0,
        "i_switch": 210.0,
        "brush_drop": 2.0,
        "notches": 6.0,
        "i_rated": 300.0,
        "n_rated": 1150.0,
        # dynamic data for the start in time (invented): belt breakaway at rest, easing once moving,
        # then rising with speed; speed [rpm], torque [N·m] on the motor shaft
        "l_circuit": 0.006,
        "inertia": 14.0,
        "load_torque": [[0.0, 560.0], [150.0, 430.0], [1200.0, 500.0]],
    },
)

#: A contractor's proposed sections for the Merrow hoist, to be checked.
CONTRACTOR = DemoCase(
    key="contractor",
    title="Contractor's proposal for the Merrow hoist starter",
    story=(
        "Sections proposed by the crane contractor for the quay crane 3 hoist, "
        "checked against the drive's peak limit and the motor's commutation limit."
    ),
    inputs={
        "sections": [0.190, 0.125, 0.095, 0.070],
        "i_switch": 290.0,
        "i_limit": 420.0,
        "i_commutation": 480.0,
    },
)

#: The Merrow hoist started in time, its resistor grid and its protection (invented settings data).
HOIST_START = DemoCase(
    key="hoist start",
    title="Merrow quay crane 3, main hoist: the start in time and the resistor grid",
    story=(
        "The graded sections of the quay crane 3 hoist, started against the rated hook load with "
        "current relays set to cut out at 300 A; stainless-steel grid elements."
    ),
    inputs={
        "i_cut": 300.0,
        "history_points": 120.0,
        "alloy": "AISI 304",
        "grid_mass": 4.0,
        "starts_per_hour": 30.0,
        "v_low": -0.10,
        "v_high": 0.10,
        "tolerance": 0.05,
        "hot": 300.0,
        "corner_points": 2.0,
    },
)

#: The conveyor started in time (drawn by ``notchwise diagram``; the workbook has no conveyor start).
CONVEYOR_START = DemoCase(
    key="conveyor start",
    title="Caldbeck Quarry overland conveyor: the start in time",
    story="The six graded notches of the conveyor, started against the belt with relays set to cut out at 245 A.",
    inputs={"i_cut": 245.0},
)

#: Each start in time: its machine case and the case holding its switching (the switching current). The
#: workbook's Hoist start sheet and ``notchwise diagram`` both take their inputs from these pairs.
STARTS = {HOIST.key: (HOIST, HOIST_START), CONVEYOR.key: (CONVEYOR, CONVEYOR_START)}

HOIST_PROTECTION = DemoCase(
    key="hoist protection",
    title="Merrow quay crane 3, main hoist: overcurrent and thermal protection",
    story=(
        "Settings for the hoist motor's protection, proposed from the simulated start and checked to ride "
        "through it, with the quay substation's feeder relay upstream."
    ),
    inputs={
        "curve": "IEC VI",
        "i_full_load": 205.0,
        "i_stall": 420.0,
        "t_stall": 20.0,
        "pickup": 250.0,
        "multiplier": 0.05,
        "highset": 540.0,
        "highset_delay": 0.05,
        "k_factor": 1.05,
        "tau": 900.0,
        "curve_up": "IEC SI",
        "pickup_up": 600.0,
        "i_max": 3600.0,
        "sweep_current": [260.0, 300.0, 350.0, 420.0, 500.0, 700.0, 1000.0, 1500.0, 2200.0, 3000.0, 4000.0],
        # currents at which the feeder relay is drawn, above its pickup [A]
        "sweep_current_up": [660.0, 750.0, 900.0, 1200.0, 1600.0, 2200.0, 3000.0, 3600.0],
        # extent of the coordination diagram: currents [A] and times [s]
        "drawn_currents": (100.0, 10000.0),
        "drawn_times": (0.01, 10000.0),
    },
)

#: The Caldbeck Quarry ball-mill drive: a 690 V, 6-pole slip-ring induction motor with a rotor-resistance starter.
MILL = DemoCase(
    key="mill",
    title="Caldbeck Quarry ball mill (wound-rotor induction motor)",
    story=(
        "A 690 V, 50 Hz, 6-pole slip-ring motor turning the Caldbeck Quarry ball mill through a girth gear, "
        "started by stepping out a stainless-steel rotor grid on current-limit relays in the rotor circuit; "
        "the charge breaks away at 2200 N·m on the motor shaft and settles to about 1500 N·m once it cascades. "
        "The rotor volts (750 V at standstill, open circuit) are lethal: the slip rings are guarded and the "
        "rotor circuit is never opened while the motor runs on resistance."
    ),
    inputs={
        "v_line": 690.0,
        "frequency": 50.0,
        "poles": 6.0,
        "r_stator": 0.02,
        "x_stator": 0.12,
        "x_magnetizing": 4.0,
        "r_rotor": 0.025,
        "x_rotor": 0.13,
        "e_rotor": 750.0,
        "inertia": 60.0,
        "t_peak": 6000.0,
        "t_switch": 3500.0,
        "t_limit": 6500.0,
        "i_limit": 700.0,
        "load_torque": [[0.0, 2200.0], [50.0, 1500.0], [500.0, 1700.0], [1000.0, 2100.0]],
        "i_cut": 320.0,
        "history_points": 120.0,
        "alloy": "AISI 304",
        "grid_mass": 25.0,
        "starts_per_hour": 4.0,
        "fault_level": 25.0,
        "x_over_r": 8.0,
        "curve": "IEC VI",
        "i_full_load": 325.0,
        "i_stall": 640.0,
        "t_stall": 20.0,
        "pickup": 375.0,
        "multiplier": 0.3,
        "highset": 1000.0,
        "highset_delay": 0.05,
        "k_factor": 1.05,
        "tau": 1200.0,
        # External rotor resistance on each step (the graded sections still in, rounded) and 0 for the run.
        "r_external": [0.6819, 0.3504, 0.1730, 0.0780, 0.0272, 0.0],
        "sweep_speed": [float(n) for n in range(0, 1001, 50)],
    },
)
#: The Merrow hoist lowering and stopping: its braking resistor, lowering points and duty cycle (invented).
HOIST_LOWERING = DemoCase(
    key="hoist lowering",
    title="Merrow quay crane 3, main hoist: dynamic lowering, the braking stop and the grid over a duty cycle",
    story=(
        "The quay crane 3 hoist lowers a container in dynamic lowering: the series motor, driven by the load, "
        "brakes on four lowering points of resistance; it stops a lift from full speed by dynamic braking, and "
        "its grid works a stated cycle of starts and braking stops per hour."
    ),
    inputs={
        "n_full": 770.0,  # full hoisting speed with the hook load [rpm]
        "e_full": 216.0,  # back-EMF at that speed [V]
        "i_brake": 300.0,  # highest braking current allowed [A]
        "lowering_light": 150.0,  # empty spreader, on the motor shaft [N·m]
        "lowering_full": 470.0,  # rated container less the gearing losses, on the motor shaft [N·m]
        "lowering_points": [0.35, 0.50, 0.70, 0.95],  # lowering resistance per point, first to last [ohm]
        "starts_per_hour": 30.0,
        "stops_per_hour": 30.0,
        "n_stop": 700.0,  # each stop of the cycle begins once the driver has notched back [rpm]
        "sweep_torque": [100.0, 150.0, 200.0, 250.0, 300.0, 350.0, 400.0, 450.0, 500.0, 550.0],
    },
)
__all__.append("HOIST_LOWERING")  # appended with its case, so parallel cases add their own lines

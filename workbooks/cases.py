"""The cases of the reference workbook: one :class:`~notchwise.workbooks.schema.Sheet` per worked case.

The figures come from :mod:`notchwise.workbooks.demo_cases`, the one description of each demo
case, which the ``notchwise diagram`` command draws from too. Adding a case means adding a
sheet to ``SHEETS``: no new code.
"""

from __future__ import annotations

from notchwise.addin import SERIES_WARNING
from notchwise.workbooks.demo_cases import CONTRACTOR, CONVEYOR, HOIST, HOIST_PROTECTION, HOIST_START, MILL, STARTS
from notchwise.workbooks.schema import EACH, Chart, Input, Link, Literal, Part, Result, Series, Sheet, Sweep, Table

__all__ = ["FUNCTION_BASIS", "SHEETS", "HOW_TO_GO_LIVE", "CAUTIONS", "INSTALL_LINE"]

FUNCTION_BASIS = {
    "grading": (
        "Uniform current-limit grading (notchwise.formulas.grading): M. G. Say and E. O. Taylor, Direct Current "
        "Machines, 2nd ed., Pitman, 1986, chapter on starting (from memory); A. E. Fitzgerald, C. Kingsley Jr., "
        "S. D. Umans, Electric Machinery, 6th ed., McGraw-Hill, 2003, sec. 7.6."
    ),
    "start": (
        "Time-domain start L di/dt = V - Vb - R i - kΦ(i) n, J dω/dt = T - T_load (notchwise.formulas.start_sim), closed "
        "form for the shunt motor, Radau otherwise: A. E. Fitzgerald, C. Kingsley Jr., S. D. Umans, Electric "
        "Machinery, 6th ed., McGraw-Hill, 2003, sec. 7.9; E. Hairer and G. Wanner, Solving Ordinary "
        "Differential Equations II, 2nd ed., Springer, 1996 (Radau IIA)."
    ),
    "heating": (
        "Section energy, r.m.s. duty, adiabatic rise m·c·ΔT = E and R(θ) = R20(1 + α(θ - 20 °C)) "
        "(notchwise.formulas.resistors); alloy data and the IEEE Std 32 rise limits from memory, see formulas/resistors.py."
    ),
    "relay": (
        "Inverse-time elements t = m(k/(M^α - 1) + c) (notchwise.formulas.relays): IEC 60255-151:2009, Table 1; "
        "IEEE Std C37.112-1996, Table 1; operate progress Σ dt/t(I); thermal element IEC 60255-149."
    ),
    "rotor": (
        "Per-phase T circuit (IEEE Std 112-2017 clause 9, IEC 60034-28:2012), torque from the Thevenin form, "
        "rotor grading geometric in R2'/s (notchwise.formulas.induction_motor): A. E. Fitzgerald, C. Kingsley Jr., "
        "S. D. Umans, Electric Machinery, 6th ed., McGraw-Hill, 2003, sec. 6.3-6.5, 6.7 (numbers from memory)."
    ),
    "rotor start": (
        "Quasi-steady rotor start J dω/dt = T(s, R') - T_load, time and energy integrals in slip by Gauss-Legendre "
        "(notchwise.formulas.rotor_start); leaves out the stator's switching transient; no-load rotor energy "
        "½Jωs²(s1² - s2²) (W. Leonhard, Control of Electrical Drives, 3rd ed., Springer, 2001; from memory)."
    ),
    "dip": (
        "Voltage dip with the motor as a constant impedance against the source (notchwise.formulas.supply): "
        "IEEE Std 399-1997 ch. 9, IEEE Std 141-1993 ch. 3 (from memory)."
    ),
    "machine": (
        "DC machine laws E = kΦn, T = (60/2π)kΦI, V = E + IR + Vb (notchwise.formulas.dc_motor): A. E. Fitzgerald, "
        "C. Kingsley Jr., S. D. Umans, Electric Machinery, 6th ed., McGraw-Hill, 2003, ch. 7, Eqs. 7.1-7.8; "
        "curve between points: F. N. Fritsch and R. E. Carlson, SIAM J. Numer. Anal., vol. 17, no. 2, 1980."
    ),
}



def _hoist_sheet() -> Sheet:
    h = HOIST.inputs
    motor = ("hoist_v_supply", "hoist_r_motor")
    curve = ("hoist_mag_curve", "hoist_mag_speed")
    return Sheet(
        name="Hoist",
        title=HOIST.title,
        story=HOIST.story,
        inputs=(
            Input("hoist_v_supply", "Supply voltage at the starter", h["v_supply"], "V"),
            Input("hoist_r_motor", "Motor circuit resistance (armature + series field)", h["r_motor"], "ohm"),
            Input("hoist_i_peak", "Peak current on every notch", h["i_peak"], "A"),
            Input("hoist_i_switch", "Least switching current", h["i_switch"], "A"),
            Input("hoist_brush_drop", "Total brush drop", h["brush_drop"], "V"),
            Input("hoist_mag_speed", "Speed at which the curve was measured", h["mag_speed"], "rpm"),
            Input("hoist_n_max", "Highest safe speed of hoist and gearing", h["n_max"], "rpm"),
            Table("hoist_mag_curve", "Magnetization curve at mag_speed", ("current [A]", "EMF [V]"), h["mag_curve"]),
        ),
        results=(
            Result(
                "Graded starter sections (fewest notches that keep the switching current)",
                "NW_GRADE_SERIES",
                (*motor, "hoist_i_peak", "hoist_i_switch", "hoist_mag_curve", None, "hoist_brush_drop"),
                FUNCTION_BASIS["grading"],
                parts=(Part("hoist_sections", 2, 2),),
            ),
            Result(
                "Least load that holds the motor at or below n_max",
                "NW_SERIES_MIN_LOAD",
                (*motor, "hoist_n_max", *curve, "hoist_brush_drop"),
                FUNCTION_BASIS["machine"],
                labels=("least current [A]", "developed torque [N·m]"),
            ),
            Result(
                "Speed unloaded on residual flux alone (runaway warning figure)",
                "NW_SERIES_RESIDUAL_SPEED",
                (*motor, *curve, "hoist_brush_drop"),
                FUNCTION_BASIS["machine"],
                unit="rpm",
            ),
        ),
        sweeps=(
            Sweep(
                "Speed-current characteristic on full voltage",
                Table("hoist_sweep_current", "Armature current", ("current [A]",), [[i] for i in h["sweep_current"]]),
                (
                    ("speed [rpm]", "NW_SERIES_SPEED", (*motor, EACH, *curve, "hoist_brush_drop"),
                     FUNCTION_BASIS["machine"]),
                    ("developed torque [N·m]", "NW_SERIES_TORQUE", (EACH, *curve), FUNCTION_BASIS["machine"]),
                ),
                Chart("Hoist motor: speed against armature current", x=0, y=(1,)),
            ),
        ),
        notes=(SERIES_WARNING,),
    )


def _conveyor_sheet() -> Sheet:
    c = CONVEYOR.inputs
    return Sheet(
        name="Conveyor",
        title=CONVEYOR.title,
        story=CONVEYOR.story,
        inputs=(
            Input("conveyor_v_supply", "Supply voltage at the starter", c["v_supply"], "V"),
            Input("conveyor_r_motor", "Motor's own resistance (armature circuit)", c["r_motor"], "ohm"),
            Input("conveyor_i_peak", "Peak current on every notch", c["i_peak"], "A"),
            Input("conveyor_i_switch", "Least switching current", c["i_switch"], "A"),
            Input("conveyor_notches", "Number of notches", c["notches"], "-"),
            Input("conveyor_brush_drop", "Total brush drop", c["brush_drop"], "V"),
            Input("conveyor_i_rated", "Rated armature current", c["i_rated"], "A"),
            Input("conveyor_n_rated", "Rated speed", c["n_rated"], "rpm"),
        ),
        results=(
            Result(
                "Graded starter sections on the given number of notches",
                "NW_GRADE_SHUNT",
                ("conveyor_v_supply", "conveyor_r_motor", "conveyor_i_peak", "conveyor_i_switch",
                 "conveyor_notches", "conveyor_brush_drop"),
                FUNCTION_BASIS["grading"],
            ),
            Result(
                "Back-EMF constant from the rating plate (rated voltage = supply voltage)",
                "NW_SHUNT_KPHI",
                ("conveyor_v_supply", "conveyor_i_rated", "conveyor_n_rated", "conveyor_r_motor",
                 "conveyor_brush_drop"),
                FUNCTION_BASIS["machine"],
                unit="V/rpm",
            ),
        ),
    )


def _contractor_sheet() -> Sheet:
    p = CONTRACTOR.inputs
    return Sheet(
        name="Contractor check",
        title=CONTRACTOR.title,
        story=CONTRACTOR.story + " Motor data and curve are those of the Hoist sheet.",
        inputs=(
            Table("contractor_sections", "Proposed sections, in the order cut out", ("section [ohm]",),
                  [[r] for r in p["sections"]]),
            Input("contractor_i_switch", "Current at which each notch is cut out", p["i_switch"], "A"),
            Input("contractor_i_limit", "Highest peak current allowed", p["i_limit"], "A"),
            Input("contractor_i_commutation", "Commutation limit of the motor", p["i_commutation"], "A"),
        ),
        results=(
            Result(
                "Peak current per notch and verdict against the limits",
                "NW_CHECK_SECTIONS",
                (Literal("series"), "hoist_v_supply", "hoist_r_motor", "contractor_sections", "contractor_i_switch",
                 "contractor_i_limit", "contractor_i_commutation", "hoist_mag_curve", None, None,
                 "hoist_brush_drop"),
                FUNCTION_BASIS["grading"],
            ),
        ),
        notes=(SERIES_WARNING,),
    )


def _hoist_start_sheet() -> Sheet:
    h, d = (case.inputs for case in STARTS[HOIST.key])  # the pair notchwise diagram draws too
    start = ("hoist_motor", "hoist_sections", "hoist_load_torque", "hoist_i_cut")
    return Sheet(
        name="Hoist start",
        title=HOIST_START.title,
        story=HOIST_START.story + " Motor data link to the Hoist sheet; the sections are its graded ones.",
        inputs=(
            Table("hoist_motor", "Motor for the start in time (name, value)", ("name", "value", "unit"), [
                ["kind", "series", "-"],
                ["v_supply", Link("hoist_v_supply"), "V"],
                ["r_motor", Link("hoist_r_motor"), "ohm"],
                ["l_circuit", h["l_circuit"], "H"],
                ["inertia", h["inertia"], "kg·m²"],
                ["mag_speed", Link("hoist_mag_speed"), "rpm"],
                ["brush_drop", Link("hoist_brush_drop"), "V"],
            ]),
            Input("hoist_load_torque", "Hoisting torque of the rated load on the motor shaft", h["load_torque"], "N·m"),
            Input("hoist_i_cut", "Switching current of the accelerating relays", d["i_cut"], "A"),
            Input("hoist_history_points", "Points of the time history", d["history_points"], "-"),
            Input("hoist_alloy", "Grid element alloy", d["alloy"], "-"),
            Input("hoist_grid_mass", "Element mass per section", d["grid_mass"], "kg"),
            Input("hoist_starts_per_hour", "Starts per hour", d["starts_per_hour"], "1/h"),
            Input("hoist_v_low", "Supply band, low side", d["v_low"], "-"),
            Input("hoist_v_high", "Supply band, high side", d["v_high"], "-"),
            Input("hoist_tolerance", "Resistor tolerance", d["tolerance"], "-"),
            Input("hoist_hot", "Hot grid temperature", d["hot"], "°C"),
            Input("hoist_corner_points", "Points per swept quantity", d["corner_points"], "-"),
        ),
        results=(
            Result("Notch by notch: times, peaks, cut-out speeds, energy", "NW_START_SIM",
                   (*start, "hoist_mag_curve"), FUNCTION_BASIS["start"]),
            Result(
                "Starting diagram: the time history", "NW_START_HISTORY",
                (*start, "hoist_history_points", "hoist_mag_curve"), FUNCTION_BASIS["start"],
                chart=Chart("Hoist start: armature current and speed against time", x=0, y=(1,), y2=(2,),
                            markers=False, colours=("current", "speed")),
                parts=(Part("hoist_start_history", 0, 1),),
            ),
            Result(
                "Grid sections: energy, duty, rise, cold and hot peaks", "NW_SECTION_HEATING",
                (*start, "hoist_alloy", "hoist_grid_mass", "hoist_starts_per_hour", None, None, "hoist_mag_curve"),
                FUNCTION_BASIS["heating"],
            ),
            Result(
                "Worst case over supply band, tolerance and grid temperature", "NW_WORST_CASE",
                (*start, "hoist_v_low", "hoist_v_high", "hoist_tolerance", "hoist_alloy", "hoist_hot",
                 "hoist_corner_points", None, "hoist_mag_curve"),
                FUNCTION_BASIS["start"],
            ),
        ),
        notes=(SERIES_WARNING,),
    )


def _hoist_protection_sheet() -> Sheet:
    p = HOIST_PROTECTION.inputs
    settings = ("hoist_start_history", "hoist_curve", "hoist_pickup", "hoist_multiplier")
    relay = "Operating times of the motor relay as set: inverse-time element, thermal element cold and hot"
    feeder = "Operating time of the feeder relay at the proposed multiplier"
    two = ("current [A]", "time [s]")
    return Sheet(
        name="Hoist protection",
        title=HOIST_PROTECTION.title,
        story=HOIST_PROTECTION.story + " The current history is the one simulated on the Hoist start sheet.",
        inputs=(
            Input("hoist_curve", "Inverse-time curve of the motor relay", p["curve"], "-"),
            Input("hoist_i_full_load", "Full-load current of the motor", p["i_full_load"], "A"),
            Input("hoist_i_stall", "Current of a stall on notch 1 (jammed hook)", p["i_stall"], "A"),
            Input("hoist_t_stall", "Time the motor withstands that current", p["t_stall"], "s"),
            Input("hoist_pickup", "Pickup as set", p["pickup"], "A"),
            Input("hoist_multiplier", "TMS as set", p["multiplier"], "-"),
            Input("hoist_highset", "High-set pickup as set", p["highset"], "A"),
            Input("hoist_highset_delay", "High-set delay as set", p["highset_delay"], "s"),
            Input("hoist_k_factor", "Thermal element k factor", p["k_factor"], "-"),
            Input("hoist_tau", "Thermal time constant of the motor", p["tau"], "s"),
            Input("hoist_curve_up", "Curve of the feeder relay upstream", p["curve_up"], "-"),
            Input("hoist_pickup_up", "Pickup of the feeder relay", p["pickup_up"], "A"),
            Input("hoist_i_max", "Largest fault current at the motor", p["i_max"], "A"),
        ),
        results=(
            Result(
                "Settings proposed from the start, with their reasoning", "NW_PROPOSE_SETTINGS",
                ("hoist_start_history", "hoist_curve", "hoist_i_full_load", "hoist_i_stall", "hoist_t_stall"),
                FUNCTION_BASIS["relay"],
            ),
            Result(
                "Ride-through of the start with the settings as set", "NW_RIDE_THROUGH",
                (*settings, "hoist_highset", "hoist_highset_delay", "hoist_i_full_load", "hoist_k_factor",
                 "hoist_tau"),
                FUNCTION_BASIS["relay"],
            ),
            Result(
                "Coordination with the feeder relay upstream", "NW_COORDINATE",
                ("hoist_curve_up", "hoist_pickup_up", "hoist_curve", "hoist_pickup", "hoist_multiplier",
                 "hoist_i_max", None, "hoist_highset", "hoist_highset_delay"),
                FUNCTION_BASIS["relay"],
                parts=(
                    Part("hoist_multiplier_up", 1, 1, row="upstream multiplier at least"),
                    Part("hoist_i_tightest", 1, 1, row="interval is tightest at"),
                    Part("hoist_t_motor_tightest", 1, 1, row="motor protection there"),
                    Part("hoist_t_upstream_tightest", 1, 1, row="upstream there"),
                ),
            ),
            Result(
                "Inverse-time element of the motor relay at the high-set pickup", "NW_RELAY_TIME",
                ("hoist_curve", "hoist_highset", "hoist_pickup", "hoist_multiplier"),
                FUNCTION_BASIS["relay"], unit="s", name="hoist_t_at_highset",
            ),
        ),
        sweeps=(
            Sweep(
                relay,
                Table("hoist_relay_current", "Current", ("current [A]",), [[i] for i in p["sweep_current"]]),
                (
                    ("inverse-time [s]", "NW_RELAY_TIME", ("hoist_curve", EACH, "hoist_pickup", "hoist_multiplier"),
                     FUNCTION_BASIS["relay"]),
                    ("thermal, cold [s]", "NW_THERMAL_TIME",
                     (EACH, "hoist_i_full_load", "hoist_k_factor", "hoist_tau"), FUNCTION_BASIS["relay"]),
                    ("thermal, hot after full load [s]", "NW_THERMAL_TIME",
                     (EACH, "hoist_i_full_load", "hoist_k_factor", "hoist_tau", "hoist_i_full_load"),
                     FUNCTION_BASIS["relay"]),
                ),
            ),
            Sweep(
                feeder,
                Table("hoist_feeder_current", "Current", ("current [A]",), [[i] for i in p["sweep_current_up"]]),
                (("operating time [s]", "NW_RELAY_TIME",
                  ("hoist_curve_up", EACH, "hoist_pickup_up", "hoist_multiplier_up"), FUNCTION_BASIS["relay"]),),
            ),
        ),
        points=(
            Table("hoist_highset_drawn", "High-set element: drop from the inverse-time curve, then its delay", two, [
                [Link("hoist_highset"), Link("hoist_t_at_highset")],
                [Link("hoist_highset"), Link("hoist_highset_delay")],
                [Link("hoist_i_max"), Link("hoist_highset_delay")],
            ]),
            Table("hoist_stall_drawn", "Stall: current and the time the motor withstands it", two,
                  [[Link("hoist_i_stall"), Link("hoist_t_stall")]]),
            Table("hoist_running_drawn", "Running (full-load) current, drawn across the time axis", two,
                  [[Link("hoist_i_full_load"), p["drawn_times"][0]], [Link("hoist_i_full_load"), p["drawn_times"][1]]]),
            Table("hoist_interval_drawn", "Coordination interval where it is tightest: motor protection, then feeder",
                  two, [
                      [Link("hoist_i_tightest"), Link("hoist_t_motor_tightest")],
                      [Link("hoist_i_tightest"), Link("hoist_t_upstream_tightest")],
                  ]),
        ),
        charts=(
            Chart(
                "Hoist: time-current coordination diagram", key="coordination", log=True,
                x_label="current [A]", y_label="time [s]", x_range=p["drawn_currents"], y_range=p["drawn_times"],
                series=(
                    Series("motor start (simulated)", "Starting diagram: the time history", 1, 0, "start",
                           first_row=1),
                    Series("running current (full load)", "hoist_running_drawn", 0, 1, "running", "dash"),
                    Series("motor relay, inverse-time", relay, 0, 1, "motor relay"),
                    Series("motor relay, high-set", "hoist_highset_drawn", 0, 1, "high-set"),
                    Series("thermal element, cold", relay, 0, 2, "thermal cold"),
                    Series("thermal element, hot", relay, 0, 3, "thermal hot", "dash"),
                    Series("stall point (withstand time)", "hoist_stall_drawn", 0, 1, "stall", "points"),
                    Series("feeder relay upstream", feeder, 0, 1, "feeder relay"),
                    Series("coordination interval where tightest", "hoist_interval_drawn", 0, 1, "interval"),
                ),
            ),
        ),
    )


def _mill_sheet() -> Sheet:
    m = MILL.inputs
    rows = [[name, m[name], unit] for name, unit in (
        ("v_line", "V"), ("frequency", "Hz"), ("poles", "-"), ("r_stator", "ohm"), ("x_stator", "ohm"),
        ("x_magnetizing", "ohm"), ("r_rotor", "ohm"), ("x_rotor", "ohm"), ("e_rotor", "V"), ("inertia", "kg·m²"))]
    start = ("mill_motor", "mill_sections", "mill_load_torque", "mill_i_cut")
    steps = range(1, len(m["r_external"]))
    r_external = tuple(
        Input(f"mill_r_external_{k}", f"External rotor resistance on step {k} (graded sections still in, rounded)",
              r, "ohm") for k, r in enumerate(m["r_external"][:-1], start=1)
    )
    speed = Table("mill_sweep_speed", "Shaft speed", ("speed [rpm]",), [[n] for n in m["sweep_speed"]])
    external = [(f"step {k}", f"mill_r_external_{k}") for k in steps] + [("run", Literal(0.0))]
    return Sheet(
        name="Mill",
        title=MILL.title,
        story=MILL.story + " The sections are the graded ones; sections and currents are rotor side, per phase.",
        inputs=(
            Table("mill_motor", "Motor (name, value): the per-phase T circuit, stator-referred", ("name", "value", "unit"),
                  [["kind", "wound rotor", "-"], *rows]),
            Input("mill_t_peak", "Torque at the start of every step", m["t_peak"], "N·m"),
            Input("mill_t_switch", "Least torque at cut-out", m["t_switch"], "N·m"),
            Input("mill_t_limit", "Highest torque the mill gearing allows", m["t_limit"], "N·m"),
            Input("mill_i_limit", "Highest stator current the supply allows", m["i_limit"], "A"),
            Table("mill_load_torque", "Mill load on the motor shaft", ("speed [rpm]", "torque [N·m]"), m["load_torque"]),
            Input("mill_i_cut", "Switching current of the rotor current relays (rotor side)", m["i_cut"], "A"),
            Input("mill_history_points", "Points of the time history", m["history_points"], "-"),
            Input("mill_alloy", "Grid element alloy", m["alloy"], "-"),
            Input("mill_grid_mass", "Element mass per section, three phases", m["grid_mass"], "kg"),
            Input("mill_starts_per_hour", "Starts per hour", m["starts_per_hour"], "1/h"),
            Input("mill_v_line", "Supply line voltage at no load", m["v_line"], "V"),
            Input("mill_fault_level", "Short-circuit level at the mill's 690 V bus", m["fault_level"], "MVA"),
            Input("mill_x_over_r", "X/R of the source", m["x_over_r"], "-"),
            Input("mill_curve", "Inverse-time curve of the stator relay", m["curve"], "-"),
            Input("mill_i_full_load", "Full-load stator current", m["i_full_load"], "A"),
            Input("mill_i_stall", "Stator current of a stall on step 1 (mill jammed)", m["i_stall"], "A"),
            Input("mill_t_stall", "Time the motor withstands that current", m["t_stall"], "s"),
            Input("mill_pickup", "Stator relay pickup as set", m["pickup"], "A"),
            Input("mill_multiplier", "TMS as set", m["multiplier"], "-"),
            Input("mill_highset", "High-set pickup as set", m["highset"], "A"),
            Input("mill_highset_delay", "High-set delay as set", m["highset_delay"], "s"),
            Input("mill_k_factor", "Thermal element k factor", m["k_factor"], "-"),
            Input("mill_tau", "Thermal time constant of the motor", m["tau"], "s"),
            *r_external,
        ),
        results=(
            Result("Graded rotor sections (fewest steps that keep the switching torque)", "NW_GRADE_ROTOR",
                   ("mill_motor", "mill_t_peak", "mill_t_switch"), FUNCTION_BASIS["rotor"],
                   parts=(Part("mill_sections", 2, 2),)),
            Result("The graded sections checked against the gearing and the supply", "NW_CHECK_ROTOR",
                   ("mill_motor", "mill_sections", "mill_t_switch", "mill_t_limit", "mill_i_limit"),
                   FUNCTION_BASIS["rotor"]),
            Result("Power factor at standstill on step 1", "NW_ROTOR_CURRENTS",
                   ("mill_motor", Literal(0.0), "mill_r_external_1"), FUNCTION_BASIS["rotor"],
                   parts=(Part("mill_pf_start", 2, 2),)),
            Result("Step by step in time: rotor currents, speeds, energy in the grid, peak stator current", "NW_START_SIM",
                   (*start, None), FUNCTION_BASIS["rotor start"], parts=(Part("mill_stator_peaks", 7, 7),)),
            Result("Supply dip at each step's peak stator current (rows as above)", "NW_VOLTAGE_DIP",
                   ("mill_v_line", "mill_fault_level", "mill_x_over_r", "mill_stator_peaks", "mill_pf_start"),
                   FUNCTION_BASIS["dip"], labels=("dip [-]",)),
            Result(
                "Starting diagram: rotor and stator current and speed against time", "NW_START_HISTORY",
                (*start, "mill_history_points"), FUNCTION_BASIS["rotor start"],
                chart=Chart("Mill start: currents and speed against time", x=0, y=(1, 4), y2=(2,), markers=False),
                parts=(Part("mill_start_history", 0, 4),),
            ),
            Result(
                "Rotor grid sections: energy (three phases), duty, rise, cold and hot peaks", "NW_SECTION_HEATING",
                (*start, "mill_alloy", "mill_grid_mass", "mill_starts_per_hour"), FUNCTION_BASIS["heating"],
            ),
            Result(
                "Stator relay settings proposed from the simulated start (stator current)", "NW_PROPOSE_SETTINGS",
                ("mill_start_history", "mill_curve", "mill_i_full_load", "mill_i_stall", "mill_t_stall"),
                FUNCTION_BASIS["relay"],
            ),
            Result(
                "Ride-through of the start with the stator relay as set", "NW_RIDE_THROUGH",
                ("mill_start_history", "mill_curve", "mill_pickup", "mill_multiplier", "mill_highset",
                 "mill_highset_delay", "mill_i_full_load", "mill_k_factor", "mill_tau"),
                FUNCTION_BASIS["relay"],
            ),
        ),
        sweeps=(
            Sweep(
                "Torque and stator current against speed on every step",
                speed,
                (*((f"torque {label} [N·m]", "NW_ROTOR_TORQUE", ("mill_motor", EACH, r), FUNCTION_BASIS["rotor"])
                   for label, r in external),
                 *((f"stator current {label} [A]", "NW_ROTOR_CURRENTS", ("mill_motor", EACH, r, Literal(False)),
                    FUNCTION_BASIS["rotor"], 1) for label, r in external)),
                Chart("Mill motor: torque and stator current against speed, every step", x=0,
                      y=tuple(range(1, len(external) + 1)), y2=tuple(range(len(external) + 1, 2 * len(external) + 1)),
                      y_label="torque [N·m]", y2_label="stator current [A]", markers=False),
            ),
        ),
        notes=(
            "Quasi-steady start: each instant takes the steady-state torque and currents at its slip; the stator's "
            "switching transient (a DC offset over the first cycles) is left out, so instantaneous elements need "
            "its asymmetric peak added.",
            "Danger: the rotor's open-circuit voltage (e_rotor) stands on the slip rings at standstill; never open "
            "the rotor circuit while the motor runs on resistance. The maker's data and local codes prevail.",
        ),
    )


#: The workbook's case sheets, in order. Add a case here to add a sheet.
SHEETS = (_hoist_sheet(), _hoist_start_sheet(), _hoist_protection_sheet(), _conveyor_sheet(), _contractor_sheet(),
          _mill_sheet())

#: How to install, as the README gives it (a test keeps the two equal).
INSTALL_LINE = "python -m pip install . (in Notchwise's source folder), then xlwings addin install"

HOW_TO_GO_LIVE = (
    "The figures you see were computed by Notchwise when this file was built and are saved with it, so Excel "
    "shows them without the add-in. LibreOffice recomputes spilled tables on opening (they then read #NAME?); "
    "the Computed cells sheet lists every figure as built. To make the functions live:",
    f"1. Install Python, then Notchwise and the xlwings add-in into it: {INSTALL_LINE}.",
    "2. Save this workbook as an Excel macro-enabled workbook (.xlsm).",
    "3. On the xlwings ribbon tab set Interpreter to that Python, UDF Modules to notchwise.addin.udfs, "
    "then click Import Functions.",
    "4. Press Ctrl+Alt+F9 to recalculate every formula with the live functions.",
    "Without the add-in, editing an input turns the cells that depend on it into #NAME?.",
    "To check a workbook without a spreadsheet program: notchwise audit FILE --report report.html",
    "For readers without the functions: notchwise freeze FILE COPY.xlsx writes a copy in which every NW_ result is "
    "its saved value (tables included) with the formula kept as a cell note, so any spreadsheet program shows "
    "every figure.",
)


#: What the models include and what they leave out (module docstrings of notchwise.formulas).
CAUTIONS = (
    "Results must be checked by a competent person before they are used to build, set or operate equipment.",
    "Local codes, the equipment makers' instructions and licensed engineering practice prevail over these figures.",
    SERIES_WARNING,
    "What the models include. The grading and section checks (Hoist, Conveyor, Contractor check) are steady "
    "state: speed holds across a cut, the circuit inductance is left out and the flux follows the current at once. "
    "The start in time (Hoist start) includes the circuit inductance (taken constant), the inertia of motor and "
    "load on the motor shaft and the load torque against speed, and it integrates the i²t of every section; the "
    "grid's heating is computed from that energy as an adiabatic rise per start, and its r.m.s. duty over the "
    "starts per hour; the worst case repeats the start at the corners of the supply band, resistor tolerance and "
    "grid temperature.",
    "What the models leave out: armature reaction beyond what the magnetization curve holds, the heating of the "
    "windings, the grid's cooling during a start and its resistance rising within a start (held at its value at "
    "the start of the start), elasticity and backlash of ropes and gearing, a series motor driven by an "
    "overhauling load (it runs away and the start says so), and the supply's own impedance (the supply is a fixed voltage, varied only over the worst "
    "case's band); in the worst case every section takes the same tolerance and temperature. The alloy data and the temperature-rise limits are "
    "from memory (see SOURCES.md); check them against the grid's own rating.",
    "Braking and lowering: the wrong resistance can drop a load or reverse the drive. In every lowering mode "
    "(DC dynamic, wound-rotor counter-torque and regenerative) MORE resistance means a FASTER descent; a series "
    "field that fails to build up lets the load fall almost unbraked; a load too light to overhaul a counter-torque "
    "connection is hoisted instead; plugging left on at standstill reverses the drive. Overspeed protection and a "
    "mechanical brake that holds the load are needed whatever these figures say; local codes and licensed "
    "practice prevail.",
    "The demo drives (Port of Merrow, Caldbeck Quarry) are invented; their data belong to no real machine.",
)


# -- Hoist lowering (issue 10): appended as one block, so that parallel sheets append their own ---------------
from notchwise.workbooks.demo_cases import HOIST_LOWERING  # noqa: E402

#: Basis of the braking and lowering figures (notchwise.formulas.braking, notchwise.formulas.resistors).
BRAKING_BASIS = (
    "Dynamic braking and lowering of DC motors: R = E/I - Ra; L di/dt = kΦ(i)n - Vb - R i, J dω/dt = -T(i) - T_L; "
    "steady lowering n = (Vb + I(Rm + Rx))/kΦ(I) with T(I) = T_L (notchwise.formulas.braking): G. K. Dubey, "
    "Fundamentals of Electrical Drives, 2nd ed., Narosa, 2001, ch. 5, and P. C. Sen, Principles of Electric Machines "
    "and Power Electronics, 2nd ed., Wiley, 1997, ch. 4 (both from memory); A. E. Fitzgerald, C. Kingsley Jr., "
    "S. D. Umans, Electric Machinery, 6th ed., McGraw-Hill, 2003, Eqs. 7.7-7.8, sec. 7.9."
)

#: What the Hoist lowering sheet says before any figure.
LOWERING_NOTE = (
    "In dynamic lowering MORE resistance means a FASTER descent: each lowering point further on lowers the load "
    "faster. A series field that fails to build up (too much resistance, too light a load, too low a speed) lets "
    "the load fall almost unbraked. Overspeed protection and a mechanical brake that holds the load are needed "
    "whatever these figures say. Results must be checked by a competent person; local codes and licensed "
    "practice prevail."
)


def _hoist_lowering_sheet() -> Sheet:
    w = HOIST_LOWERING.inputs
    points = [f"hoist_lowering_r{k + 1}" for k in range(len(w["lowering_points"]))]
    lowering = (Literal("dynamic"),)
    cycle = ("hoist_motor", "hoist_sections", "hoist_load_torque", "hoist_i_cut", "hoist_alloy", "hoist_grid_mass",
             "hoist_cycle_starts", Literal("dynamic"), "hoist_load_torque", "hoist_cycle_n_stop", "hoist_cycle_stops",
             None, None, None, "hoist_mag_curve")
    return Sheet(
        name="Hoist lowering",
        title=HOIST_LOWERING.title,
        story=HOIST_LOWERING.story + " Motor data, curve, n_max, hook load, grid and sections are those of the Hoist "
        "and Hoist start sheets, taken by their defined names.",
        inputs=(
            Input("hoist_n_full", "Full hoisting speed with the hook load (as braking begins)", w["n_full"], "rpm"),
            Input("hoist_e_full", "Back-EMF at that speed", w["e_full"], "V"),
            Input("hoist_i_brake", "Highest braking current allowed as braking begins", w["i_brake"], "A"),
            Table("hoist_lowering_torque", "Lowering torque on the motor shaft: light (empty spreader), then full load",
                  ("torque [N·m]",), [[w["lowering_light"]], [w["lowering_full"]]]),
            *(Input(name, f"Lowering point {k + 1}: resistance outside the motor", r, "ohm")
              for k, (name, r) in enumerate(zip(points, w["lowering_points"]))),
            Input("hoist_cycle_starts", "Cycle: starts per hour, each against the hook load", w["starts_per_hour"],
                  "1/h"),
            Input("hoist_cycle_stops", "Cycle: dynamic braking stops per hour on the whole grid", w["stops_per_hour"],
                  "1/h"),
            Input("hoist_cycle_n_stop", "Cycle: speed as each stop begins (the driver notches back first)",
                  w["n_stop"], "rpm"),
        ),
        results=(
            Result("Braking resistor that holds the current to i_brake as dynamic braking begins", "NW_BRAKE_RESISTOR",
                   (Literal("dynamic"), "hoist_v_supply", "hoist_r_motor", "hoist_e_full", "hoist_i_brake"),
                   BRAKING_BASIS, unit="ohm", name="hoist_r_brake"),
            Result("Stop from full speed with the hook load, dynamic braking on that resistor", "NW_STOP_SIM",
                   ("hoist_motor", "hoist_r_brake", Literal("dynamic"), "hoist_load_torque", "hoist_n_full", None,
                    "hoist_mag_curve", None, "hoist_n_max"), BRAKING_BASIS),
            *(Result(f"Lowering point {k + 1}: lowering speed at light and full load, margin to n_max",
                     "NW_LOWERING_CHECK", ("hoist_motor", name, "hoist_lowering_torque", *lowering, "hoist_n_max",
                                           "hoist_mag_curve"), BRAKING_BASIS)
              for k, name in enumerate(points)),
            Result("Grid over the cycle: starts and dynamic braking stops per hour", "NW_CYCLE_HEATING", cycle,
                   FUNCTION_BASIS["heating"]),
        ),
        sweeps=(
            Sweep(
                "Lowering speed against lowering torque on every lowering point",
                Table("hoist_lowering_sweep_torque", "Lowering torque", ("lowering torque [N·m]",),
                      [[t] for t in w["sweep_torque"]]),
                tuple((f"point {k + 1} [rpm]", "NW_LOWERING_SPEED",
                       ("hoist_motor", name, EACH, *lowering, "hoist_mag_curve"), BRAKING_BASIS)
                      for k, name in enumerate(points)),
                Chart("Hoist lowering: speed against lowering torque, one line per lowering point", x=0,
                      y=tuple(range(1, len(points) + 1)), y_label="lowering speed [rpm]"),
            ),
        ),
        notes=(LOWERING_NOTE, SERIES_WARNING),
    )


SHEETS = (*SHEETS, _hoist_lowering_sheet())

"""The spreadsheet contract: what Excel, through xlwings, needs of every function.

Each function of ``notchwise.addin.udfs`` is registered under xlwings' real decorators,
has its VBA wrapper written by xlwings' own writer (as "Import Functions" does),
and is called through xlwings' own converters with the raw values Excel passes:
floats, text, booleans, None for a blank, tuples of rows for a range, and the
"missing" marker for a skipped optional argument. A function Excel could not
import, or that raises into a cell, fails here.

Every function must have an entry in ``EXAMPLES``; add one with each new function.
"""

from __future__ import annotations

import inspect
import io
import os
import re

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from tests.conftest import COMPOUND_AMPERE_TURNS
from tests.xlwings_standin import EXCEL_MISSING, call_like_excel, real_xlwings

SERIES_CURVE = (("current A", "EMF V"), (0.0, 5.0), (50.0, 120.0), (100.0, 200.0), (200.0, 290.0), (400.0, 350.0))
COMPOUND_CURVE = COMPOUND_AMPERE_TURNS
M = EXCEL_MISSING
#: A resistance start as (time s, current A) rows: four notches between 420 A and 300 A, then 120 A running.
START = (("time s", "current A"), (0.0, 420.0), (1.5, 300.0), (1.5, 420.0), (3.0, 300.0), (3.0, 420.0), (4.5, 300.0),
         (4.5, 420.0), (6.0, 300.0), (6.0, 120.0), (10.0, 120.0))
SHUNT_MOTOR = (("kind", "shunt"), ("v_supply", 220.0), ("r_motor", 0.05), ("l_circuit", 0.005), ("inertia", 4.0),
               ("k_phi", 0.2), ("brush_drop", 2.0))
SERIES_MOTOR = (("Kind", "Series"), ("v_supply", 220.0), ("r_motor", 0.05), ("l_circuit", 0.004),
                ("inertia", 3.0), ("mag_speed", 800.0))
SECTIONS = ((0.5,), (0.25,), (0.12,))
#: The invented ball-mill motor of Caldbeck Quarry (tests/test_induction_motor.py), as a name/value block.
ROTOR_MOTOR = (("kind", "Wound Rotor"), ("v_line", 690.0), ("frequency", 50.0), ("poles", 6.0), ("r_stator", 0.02),
               ("x_stator", 0.12), ("x_magnetizing", 4.0), ("r_rotor", 0.025), ("x_rotor", 0.13), ("e_rotor", 750.0),
               ("inertia", 60.0))
ROTOR_SECTIONS = ((0.33,), (0.18,), (0.1,), (0.05,), (0.027,))

#: Valid raw arguments, as Excel passes them, for every spreadsheet function.
EXAMPLES = {
    "NW_GRADE_SHUNT": (220.0, 0.05, 300.0, 150.0, M, M, M),
    "NW_GRADE_SERIES": (220.0, 0.05, 300.0, 150.0, SERIES_CURVE, M, 2.0, True),
    "NW_GRADE_COMPOUND": (220.0, 0.05, 300.0, 150.0, COMPOUND_CURVE, 1500.0, 10.0, M, M, M),
    "NW_CHECK_SECTIONS": ("Series", 220.0, 0.05, ((0.4,), (0.3,)), 150.0, 310.0, 350.0, SERIES_CURVE, M, M, M, M),
    "NW_SERIES_SPEED": (220.0, 0.1, 100.0, SERIES_CURVE, 800.0, M),
    "NW_SERIES_TORQUE": (((50.0,), (100.0,)), SERIES_CURVE, 800.0),
    "NW_SERIES_MIN_LOAD": (220.0, 0.1, 2000.0, SERIES_CURVE, 800.0, M),
    "NW_SERIES_RESIDUAL_SPEED": (220.0, 0.1, SERIES_CURVE, 800.0, M),
    "NW_SHUNT_KPHI": (220.0, 100.0, 1000.0, 0.1, M),
    "NW_RELAY_TIME": ("IEC SI", ((200.0,), (500.0,), (1000.0,)), 100.0, 0.2, 25.0),
    "NW_RELAY_MULTIPLIER": ("ieee vi", 600.0, 100.0, 1.5, 20.0),
    "NW_RELAY_CURRENT": ("IEC EI", 2.0, 100.0, 0.5, 30.0),
    "NW_RELAY_RESET_TIME": ("IEEE MI", ((0.0,), (50.0,)), 100.0, 2.0),
    "NW_THERMAL_TIME": (((150.0,), (300.0,)), 100.0, 1.05, 900.0, 60.0),
    "NW_THERMAL_LEVEL": (START, 120.0, 1.05, 900.0, 60.0),
    "NW_CT_PRIMARY": (((8.0,), (130.0,)),),
    "NW_CT_RATIO": (130.0, 5.0),
    "NW_RIDE_THROUGH": (START, "IEC VI", 140.0, 1.2, 650.0, M, 120.0, 1.05, 900.0, M, True),
    "NW_PROPOSE_SETTINGS": (START, "IEC VI", 120.0, 420.0, 30.0, M, M, M, M, M, M),
    "NW_COORDINATE": ("IEC SI", 300.0, "IEC VI", 138.0, 1.2, 4000.0, M, 650.0, 0.05, M, 0.6, 20.0),
    "NW_START_SIM": (SHUNT_MOTOR, SECTIONS, 300.0, 200.0, M, M),
    "NW_SECTION_HEATING": (SHUNT_MOTOR, SECTIONS, 300.0, 200.0, "AISI 304", 3.0, 20.0, M, M, M, M),
    "NW_WORST_CASE": (SHUNT_MOTOR, SECTIONS, 300.0, 200.0, -0.1, 0.1, 0.05, "NiCr 80/20", 300.0, 2.0, M, M, M),
    "NW_GRADE_ROTOR": (ROTOR_MOTOR, 6000.0, 3500.0, M, M),
    "NW_GRADE_ROTOR_PLATE": (750.0, 400.0, 0.02, 2.0, 1.1, M, True),
    "NW_CHECK_ROTOR": (ROTOR_MOTOR, ROTOR_SECTIONS, 3500.0, 6500.0, 700.0, M),
    "NW_ROTOR_TORQUE": (ROTOR_MOTOR, ((0.0,), (500.0,), (1000.0,)), M),
    "NW_ROTOR_CURRENTS": (ROTOR_MOTOR, ((0.0,), (950.0,)), 0.1, M),
    "NW_VOLTAGE_DIP": (690.0, 20.0, 8.0, ((632.0,), (0.0,)), 0.45),
    "NW_START_HISTORY": (SERIES_MOTOR, SECTIONS, ((0.0, 200.0), (600.0, 260.0)), ((0.4,), (0.3,), (0.2,)), 50.0, SERIES_CURVE, M),
    "NW_BRAKE_RESISTOR": ("dynamic", 220.0, 0.05, 200.0, 400.0),
    "NW_STOP_SIM": (SHUNT_MOTOR, 0.5, "plugging", 50.0, 1000.0, M, M, M, 1100.0),
    "NW_LOWERING_SPEED": (SERIES_MOTOR, 0.5, ((100.0,), (300.0,)), "dynamic", SERIES_CURVE),
    "NW_LOWERING_CHECK": (SHUNT_MOTOR, 0.5, ((100.0,), (300.0,)), "Dynamic", 1200.0, M, M),
    "NW_CYCLE_HEATING": (SHUNT_MOTOR, SECTIONS, 50.0, 200.0, "AISI 304", 3.0, 20.0, "plugging", 50.0, 1000.0, 20.0,
                         2.0, M, M, M, M),
}

#: Words VBA reserves (Office VBA language reference, "Keywords"); an argument may not use them.
VBA_KEYWORDS = set(
    """and as boolean byref byte byval call case class const currency date decimal declare defbool
    defbyte defcur defdate defdbl defdec defint deflng defobj defsng defstr defvar dim do double each
    else elseif empty end endif enum eqv erase error event exit false for friend function get global
    gosub goto if imp implements in integer is let lib like load long loop lset me mod new next not
    nothing null object on option optional or paramarray preserve private property public raiseevent
    redim rem resume return rset select set single static step stop string sub then to true type
    typeof unload until variant wend while with withevents xor""".split()
)


@pytest.fixture(scope="module")
def excel():
    with real_xlwings() as loaded:
        yield loaded


def functions(udfs):
    return [getattr(udfs, name) for name in udfs.__all__]


def test_every_function_is_registered_and_has_an_example(excel):
    udfs, _, _ = excel
    names = set(udfs.__all__)
    assert names == set(EXAMPLES), "every spreadsheet function needs an entry in EXAMPLES"
    for func in functions(udfs):
        assert hasattr(func, "__xlfunc__"), func.__name__
        assert func.__xlfunc__["category"] == "Notchwise"


def test_xlwings_writes_a_vba_wrapper_excel_can_import(excel):
    udfs, xlwings_udfs, _ = excel
    book = type("Book", (), {"Name": "notchwise-reference.xlsm"})()
    out = io.StringIO()
    xlwings_udfs.generate_vba_wrapper("notchwise.addin.udfs", udfs, out, book)
    vba = out.getvalue()
    for func in functions(udfs):
        params = inspect.signature(func).parameters.values()
        wanted = ", ".join(("Optional " if p.default is not p.empty else "") + p.name for p in params)
        assert f"Function {func.__name__}({wanted})" in vba
        assert f'XLPy.CallUDF("notchwise.addin.udfs", "{func.__name__}"' in vba
    assert all(len(line) <= 1024 for line in vba.splitlines()), "VBA lines are limited to 1024 characters"


def test_names_and_help_fit_excel(excel):
    udfs, _, _ = excel
    for func in functions(udfs):
        doc = func.__xlfunc__["ret"]["doc"]
        assert len(doc) < 255, f"{func.__name__}: the wizard cuts descriptions at 255 characters"
        assert doc.count(". ") == 0 and doc.endswith((".", "]")), f"{func.__name__}: one sentence"
        assert re.fullmatch(r"NW_[A-Z0-9_]+", func.__name__)
        for arg in func.__xlfunc__["args"]:
            assert re.fullmatch(r"[A-Za-z][A-Za-z0-9_]{0,30}", arg["name"]), arg["name"]
            assert arg["name"].lower() not in VBA_KEYWORDS, f"{func.__name__}: {arg['name']} is a VBA keyword"
            assert not arg["doc"].startswith("Positional argument"), f"{func.__name__}.{arg['name']} has no help"
            assert len(arg["doc"]) < 255
            assert re.search(r"\[[^\]]+\]", arg["doc"]), f"{func.__name__}.{arg['name']}: unit in brackets"


def _excel_types_only(value) -> bool:
    cells = value if isinstance(value, list) else [[value]]
    return all(isinstance(c, (float, int, str, bool)) and not isinstance(c, type(None)) for row in cells for c in row)


@pytest.mark.parametrize("name", sorted(EXAMPLES))
def test_valid_example_gives_numbers_through_the_converters(excel, name):
    udfs, _, conversion = excel
    result = call_like_excel(conversion, getattr(udfs, name), EXAMPLES[name])
    assert _excel_types_only(result)
    flat = [c for row in result for c in row] if isinstance(result, list) else [result]
    assert not any(isinstance(c, str) and c.startswith("Error") for c in flat), result


#: Raw cell values a careless sheet passes; -2146826281 is how COM hands over a #DIV/0! cell.
BAD_VALUES = ["", "abc", None, True, -1.0, 0.0, -1e300, 1e300, ((1.0, "x"),), (("a",),), 1e-300, -2146826281]


# NW_FUZZ_EXAMPLES=5000 for a longer hunt by hand; CI keeps the suite short.
@settings(max_examples=int(os.environ.get("NW_FUZZ_EXAMPLES", 300)), deadline=None)
@given(data=st.data())
def test_any_bad_argument_gives_a_message_never_an_exception(excel, data):
    udfs, _, conversion = excel
    name = data.draw(st.sampled_from(sorted(EXAMPLES)))
    raw = list(EXAMPLES[name])
    position = data.draw(st.integers(0, len(raw) - 1))
    raw[position] = data.draw(st.sampled_from(BAD_VALUES) | st.floats(allow_nan=False, allow_infinity=False))
    result = call_like_excel(conversion, getattr(udfs, name), tuple(raw))
    assert _excel_types_only(result)
    if isinstance(result, list) and len(result) == 1 and len(result[0]) == 1:
        result = result[0][0]
    if isinstance(result, str) and result.startswith("Error"):
        assert "internal fault" not in result, result


@pytest.mark.parametrize(
    "name, position, bad, words",
    [
        ("NW_GRADE_SHUNT", 0, "abc", "v_supply ('abc') is not a number in V"),
        ("NW_GRADE_SHUNT", 1, None, "r_motor is empty"),
        ("NW_GRADE_SHUNT", 3, 400.0, "i_switch (400 A) must be below i_peak (300 A)"),
        ("NW_GRADE_SHUNT", 1, -0.05, "r_motor (-0.05 ohm) must be above zero"),
        ("NW_GRADE_SHUNT", 4, 99.0, "notches (99) must be from 1 to 30"),
        ("NW_GRADE_SERIES", 4, (("I", "E"), (0.0, 10.0), (100.0, 5.0)), "EMF must not fall"),
        ("NW_CHECK_SECTIONS", 0, "wound rotor", "kind ('wound rotor') must be one of: shunt, series, compound"),
        ("NW_SERIES_SPEED", 2, 5000.0, "above the stall current"),
        ("NW_RELAY_TIME", 0, "IEC XI", "curve ('IEC XI') must be one of: IEC SI, IEC VI, IEC EI, IEC LTI, IEEE MI"),
        ("NW_RELAY_TIME", 2, -100.0, "pickup (-100 A) must be above zero"),
        ("NW_RELAY_TIME", 3, 0.0, "multiplier (0) must be above zero"),
        ("NW_RELAY_TIME", 4, 1.0, "flat_from (1) must be above 1 and at most 1000 times pickup"),
        ("NW_RELAY_CURRENT", 1, 0.01, "no current operates that fast"),
        ("NW_COORDINATE", 1, 100.0, "pickup_up (100 A) is below the motor element's pickup (138 A)"),
        ("NW_COORDINATE", 10, -0.5, "multiplier_up (-0.5) must be above zero"),
        ("NW_RELAY_MULTIPLIER", 1, 100.0, "current (100 A) is at or below pickup (100 A)"),
        ("NW_THERMAL_TIME", 4, 200.0, "i_prior (200 A) must be below k_factor x i_base (105 A)"),
        ("NW_CT_RATIO", 1, 2.0, "secondary (2 A) must be 1 A or 5 A"),
        ("NW_RIDE_THROUGH", 1, "IEC Z", "curve ('IEC Z') must be one of"),
        ("NW_PROPOSE_SETTINGS", 3, 100.0, "i_stall (100 A) is not above the overload pickup (138 A)"),
        ("NW_COORDINATE", 0, "ansi", "curve_up ('ansi') must be one of"),
        ("NW_START_SIM", 0, (("kind", "shunt"), ("speed", 1.0)), "must be one of: kind, v_supply, r_motor"),
        ("NW_START_SIM", 0, SHUNT_MOTOR[:3] + (("l_circuit", 0.0),) + SHUNT_MOTOR[4:], "l_circuit (0 H) must be above zero"),
        ("NW_START_SIM", 0, SHUNT_MOTOR[:4] + (("inertia", 0.0),) + SHUNT_MOTOR[5:], "inertia (0 kg·m²) must be above zero"),
        ("NW_START_SIM", 2, 1e6, "the load is above the motor's capability"),
        ("NW_START_SIM", 3, 30.0, "notch 1 stalls"),
        ("NW_START_SIM", 3, ((0.5,), (0.4,)), "dwell has 2 entries but sections has 3"),
        ("NW_WORST_CASE", 6, 0.9, "tolerance (0.9) must be at most 0.5"),
        ("NW_GRADE_ROTOR", 1, 9000.0, "above the breakdown torque (8050 N·m)"),
        ("NW_GRADE_ROTOR", 0, ROTOR_MOTOR[:-1], "motor needs a row named inertia [kg·m²]; the names are: kind, v_line"),
        ("NW_GRADE_ROTOR", 0, ROTOR_MOTOR + (("speed", 3.0),), "must be one of: kind, v_line, frequency, poles"),
        ("NW_GRADE_ROTOR", 0, (("kind", "shunt"),) + ROTOR_MOTOR[1:], "motor kind ('shunt') must be one of: wound rotor"),
        ("NW_GRADE_ROTOR", 0, ROTOR_MOTOR[:4] + (("r_stator", -0.02),) + ROTOR_MOTOR[5:], "r_stator (-0.02 ohm) must not be negative"),
        ("NW_GRADE_ROTOR", 0, ROTOR_MOTOR[:3] + (("poles", 5.0),) + ROTOR_MOTOR[4:], "poles (5) must be an even number"),
        ("NW_GRADE_ROTOR", 0, (("kind",), ("v_line",)), "motor needs two columns, name and value; row 1 has one"),
        ("NW_GRADE_ROTOR", 1, None, "t_peak is empty; a number in N·m is needed"),
        ("NW_ROTOR_TORQUE", 1, ((0.0,), (float("nan"),)), "speed entry 2 (nan) must be a finite number in rpm"),
        ("NW_GRADE_ROTOR", 2, 7000.0, "t_switch (7000 N·m) must be below t_peak (6000 N·m)"),
        ("NW_GRADE_ROTOR", 3, 2.0, "2 steps cannot keep t_switch (3500 N·m); 5 are needed"),
        ("NW_GRADE_ROTOR", 0, ROTOR_MOTOR[:7] + (("r_rotor", 2.0),) + ROTOR_MOTOR[8:], "no starting resistance is needed"),
        ("NW_GRADE_ROTOR_PLATE", 2, 1.5, "s_rated (1.5) must be below 1"),
        ("NW_GRADE_ROTOR_PLATE", 3, 60.0, "no starting resistance is needed"),
        ("NW_CHECK_ROTOR", 1, ((0.3,), (-0.1,)), "sections entry 2 (-0.1 ohm) must be above zero"),
        ("NW_CHECK_ROTOR", 2, 9000.0, "above the breakdown torque"),
        ("NW_ROTOR_TORQUE", 2, -0.1, "r_external (-0.1 ohm) must not be negative"),
        ("NW_ROTOR_CURRENTS", 1, ((0.0,), ("x",)), "speed entry 2 ('x') is not a number in rpm"),
        ("NW_VOLTAGE_DIP", 4, 1.2, "power_factor (1.2) must be at most 1"),
        ("NW_VOLTAGE_DIP", 3, -5.0, "current (-5 A) must not be negative"),
        ("NW_SECTION_HEATING", 4, "brass", "alloy ('brass') must be one of: AISI 304, NiCr 80/20, CuNi 44"),
        ("NW_BRAKE_RESISTOR", 4, 40000.0, "no braking resistor is needed: r_armature alone (0.05 ohm)"),
        ("NW_BRAKE_RESISTOR", 0, "regenerative", "mode ('regenerative') must be one of: dynamic, plugging"),
        ("NW_STOP_SIM", 2, "counter-torque", "mode counter-torque does not apply to a stop of a shunt motor"),
        ("NW_STOP_SIM", 5, 1500.0, "n_end (1500 rpm) must be below n_start (1000 rpm)"),
        ("NW_STOP_SIM", 0, SERIES_MOTOR, "mag_curve has 0 rows of numbers"),
        ("NW_LOWERING_SPEED", 2, 10.0, "the series field does not build up at 10 N·m"),
        ("NW_LOWERING_SPEED", 3, "regenerative", "mode regenerative does not apply to lowering of a series motor"),
        ("NW_LOWERING_CHECK", 4, -5.0, "n_max (-5 rpm) must be above zero"),
        ("NW_CYCLE_HEATING", 11, 9.0, "brake_from (9) must be from 1 to 3"),
        ("NW_CYCLE_HEATING", 10, -2.0, "stops_per_hour (-2 1/h) must be above zero"),
        ("NW_CYCLE_HEATING", 7, "regenerative", "mode regenerative does not apply to a stop of a shunt motor"),
        ("NW_LOWERING_SPEED", 0, ROTOR_MOTOR, "mode dynamic: dynamic braking of a wound-rotor motor is by DC injection"),
    ],
)
def test_bad_input_message_names_the_argument_and_limit(excel, name, position, bad, words):
    _assert_message(excel, EXAMPLES[name], name, position, bad, words)


def _assert_message(excel, example, name, position, bad, words):
    """``example`` with ``bad`` at ``position`` answers one line of text holding ``words``."""
    udfs, _, conversion = excel
    raw = list(example)
    raw[position] = bad
    result = call_like_excel(conversion, getattr(udfs, name), tuple(raw))
    text = result[0][0] if isinstance(result, list) else result
    assert text.startswith("Error: ") and words in text, text


def test_wound_rotor_block_reaches_braking_and_lowering(excel):
    udfs, _, conversion = excel
    stop = call_like_excel(conversion, udfs.NW_STOP_SIM, (ROTOR_MOTOR, 0.1, "plugging", 500.0, 950.0, M, M, M, 1100.0))
    assert stop[1][0] == "time to n_end" and stop[1][1] > 0.0, stop
    injection = call_like_excel(conversion, udfs.NW_STOP_SIM, (ROTOR_MOTOR, 0.1, "dynamic", 500.0, 950.0, M, M, M, M))
    assert "by DC injection into the stator, which is not modelled" in str(injection), injection
    light = call_like_excel(conversion, udfs.NW_LOWERING_SPEED, (ROTOR_MOTOR, 0.05, 100.0, "counter-torque", M))
    assert "too light to overhaul" in str(light), light
    fast = call_like_excel(conversion, udfs.NW_LOWERING_CHECK, (ROTOR_MOTOR, 0.05, ((2000.0,), (4000.0,)), "regenerative", 1100.0, M, M))
    assert fast[1][1] < fast[2][1] and fast[1][1] > 1000.0, fast


def test_blank_optional_in_the_middle_means_its_default(excel):
    udfs, _, conversion = excel
    skipped = call_like_excel(conversion, udfs.NW_GRADE_SHUNT, (220.0, 0.05, 300.0, 150.0, M, 2.0, M))
    blank = call_like_excel(conversion, udfs.NW_GRADE_SHUNT, (220.0, 0.05, 300.0, 150.0, None, 2.0, None))
    assert skipped == blank and skipped[0][0] == "notch"


@pytest.mark.parametrize(
    "currents",
    [((150.0,),), ((50.0, 150.0, 300.0),), ((50.0,), (150.0,), (300.0,))],
    ids=["one cell", "a row", "a column"],
)
def test_cell_values_are_shaped_as_xlwings_converts_them(excel, currents):
    # The reference workbook and the audit call functions without Excel (notchwise.addin.cells.call_with_cells);
    # xlwings' own converters are the reference for how a range reaches each argument.
    from notchwise.addin.cells import call_with_cells

    udfs, _, conversion = excel
    func = udfs.NW_SERIES_TORQUE
    rows = [list(r) for r in SERIES_CURVE]
    through_xlwings = call_like_excel(conversion, func, (currents, SERIES_CURVE, ((800.0,),)))
    direct = call_with_cells(func, [[list(r) for r in currents], rows, [[800.0]]])
    options = func.__xlfunc__["ret"]["options"]
    assert conversion.write(direct, None, options) == through_xlwings
    # A one-row range given to a table argument stays a table (xlwings ndim=2).
    one_row_curve = call_with_cells(func, [[[150.0]], [rows[1]], [[800.0]]])
    assert conversion.write(one_row_curve, None, options) == call_like_excel(
        conversion, func, (150.0, (SERIES_CURVE[1],), 800.0)
    )


def test_readme_lists_every_function_with_its_arguments():
    """The README's function tables are the designer's reference: every function, every argument, in order."""
    from pathlib import Path

    import notchwise.addin.udfs as plain

    readme = (Path(__file__).resolve().parents[1] / "README.md").read_text(encoding="utf-8")
    listed = dict(re.findall(r"`(NW_[A-Z0-9_]+)\(([^)]*)\)`", readme))
    for name in plain.__all__:
        params = inspect.signature(getattr(plain, name)).parameters.values()
        wanted = ", ".join(p.name if p.default is p.empty else f"[{p.name}]" for p in params)
        assert listed.get(name) == wanted, f"README lists {name}({listed.get(name)}); the function is {name}({wanted})"


#: Wound-rotor variants of the start-in-time functions (EXAMPLES keeps one example per function).
ROTOR_VARIANTS = {
    "NW_START_SIM": (ROTOR_MOTOR, ROTOR_SECTIONS, 1000.0, 400.0, M, M),
    "NW_START_HISTORY": (ROTOR_MOTOR, ROTOR_SECTIONS, ((0.0, 800.0), (1000.0, 2200.0)), ((0.5,), (0.4,), (0.3,), (0.2,), (0.2,)), 20.0, M, M),
    "NW_SECTION_HEATING": (ROTOR_MOTOR, ROTOR_SECTIONS, 1000.0, 400.0, "AISI 304", 30.0, 6.0, M, M, M, M),
    "NW_WORST_CASE": (ROTOR_MOTOR, ROTOR_SECTIONS, 1000.0, 400.0, -0.1, 0.1, 0.05, "AISI 304", 200.0, 2.0, M, M, M),
}


@pytest.mark.parametrize("name", sorted(ROTOR_VARIANTS))
def test_wound_rotor_variant_gives_numbers_with_the_stator_last(excel, name):
    udfs, _, conversion = excel
    result = call_like_excel(conversion, getattr(udfs, name), ROTOR_VARIANTS[name])
    assert _excel_types_only(result)
    flat = [c for row in result for c in row]
    assert not any(isinstance(c, str) and c.startswith("Error") for c in flat), result
    if name in ("NW_START_SIM", "NW_START_HISTORY"):
        assert "stator current [A]" in result[0][-1]


@pytest.mark.parametrize("name", sorted(ROTOR_VARIANTS))
def test_wound_rotor_variant_every_bad_argument_gives_a_message(excel, name):
    udfs, _, conversion = excel
    for position in range(len(ROTOR_VARIANTS[name])):
        for bad in BAD_VALUES:
            raw = list(ROTOR_VARIANTS[name])
            raw[position] = bad
            result = call_like_excel(conversion, getattr(udfs, name), tuple(raw))
            assert _excel_types_only(result), (position, bad, result)
            text = result[0][0] if isinstance(result, list) else result
            if isinstance(text, str) and text.startswith("Error"):
                assert "internal fault" not in text, (position, bad, text)


@pytest.mark.parametrize(
    "name, position, bad, words",
    [
        ("NW_START_SIM", 0, ROTOR_MOTOR[:4] + (("r_stator", "abc"),) + ROTOR_MOTOR[5:], "r_stator ('abc') is not a number in ohm"),
        ("NW_START_SIM", 0, ROTOR_MOTOR[:4] + (("r_stator", None),) + ROTOR_MOTOR[5:], "r_stator is empty"),
        ("NW_START_SIM", 0, ROTOR_MOTOR[:7] + (("r_rotor", -0.025),) + ROTOR_MOTOR[8:], "r_rotor (-0.025 ohm) must be above zero"),
        ("NW_START_SIM", 0, ROTOR_MOTOR[:10] + (("inertia", 0.0),), "inertia (0 kg·m²) must be above zero"),
        ("NW_START_SIM", 0, ROTOR_MOTOR[:2] + (("frequency", float("nan")),) + ROTOR_MOTOR[3:], "frequency (nan) must be a finite number in Hz"),
        ("NW_START_SIM", 0, ROTOR_MOTOR[:-1], "motor needs a row named inertia [kg·m²] for a wound rotor motor"),
        ("NW_START_SIM", 0, ROTOR_MOTOR + (("l_circuit", 0.01),), "motor row l_circuit does not apply to a wound rotor motor; the names for it are: kind, v_line"),
        ("NW_START_SIM", 0, (("kind", "slip ring"),) + ROTOR_MOTOR[1:], "motor kind ('slip ring') must be one of: shunt, series, compound, wound rotor"),
        ("NW_START_SIM", 0, ROTOR_MOTOR[1:], "motor needs a row named kind"),
        ("NW_START_SIM", 1, ((0.3,), (-0.1,)), "sections entry 2 (-0.1 ohm) must be above zero"),
        ("NW_START_SIM", 2, 9000.0, "above the breakdown torque (8050 N·m)"),
        ("NW_START_SIM", 2, 7000.0, "step 1 stalls at standstill"),
        ("NW_START_SIM", 2, ((0.0, 1.0, 2.0),), "load_torque"),
        ("NW_START_SIM", 3, 0.0, "must be above zero"),
        ("NW_START_SIM", 3, 4000.0, "more than the rotor draws short-circuited at standstill"),
        ("NW_START_SIM", 3, ((0.5,), (0.4,)), "dwell has 2 entries but sections has 5"),
        ("NW_START_HISTORY", 4, 1.0, "points (1) must be"),
        ("NW_SECTION_HEATING", 5, -3.0, "mass"),
        ("NW_WORST_CASE", 6, 0.9, "tolerance (0.9) must be at most 0.5"),
    ],
)
def test_wound_rotor_bad_input_message(excel, name, position, bad, words):
    _assert_message(excel, ROTOR_VARIANTS[name], name, position, bad, words)

"""``notchwise demo``: the demo cases computed through the spreadsheet functions."""

from __future__ import annotations

from workbooks.demo_cases import CONTRACTOR, CONVEYOR, HOIST

from . import CAUTION
from .udfs import NW_CHECK_SECTIONS, NW_GRADE_SERIES, NW_GRADE_SHUNT, NW_SERIES_MIN_LOAD

__all__ = ["add_parser", "run", "format_table"]


def add_parser(subparsers) -> None:
    """Register the ``demo`` subcommand."""
    parser = subparsers.add_parser("demo", help="compute the built-in demo cases and print their tables")
    parser.set_defaults(run=run)


def format_table(rows) -> str:
    """Rows of cells (a spilled result, or one error text) as aligned plain text."""
    if isinstance(rows, str):
        return rows
    text = [[f"{c:.4g}" if isinstance(c, float) else str(c) for c in row] for row in rows]
    widths = [max(len(row[k]) for row in text) for k in range(len(text[0]))]
    return "\n".join("  ".join(cell.rjust(w) for cell, w in zip(row, widths)) for row in text)


def run(arguments) -> int:
    """Print the graded starters, the contractor check and the hoist's minimum load."""
    hoist, conveyor, proposal = HOIST.inputs, CONVEYOR.inputs, CONTRACTOR.inputs
    sections = [[r] for r in proposal["sections"]]
    blocks = [
        (
            HOIST.title + ": NW_GRADE_SERIES",
            NW_GRADE_SERIES(
                hoist["v_supply"], hoist["r_motor"], hoist["i_peak"], hoist["i_switch"],
                hoist["mag_curve"], None, hoist["brush_drop"],
            ),
        ),
        (
            CONVEYOR.title + ": NW_GRADE_SHUNT",
            NW_GRADE_SHUNT(
                conveyor["v_supply"], conveyor["r_armature"], conveyor["i_peak"], conveyor["i_switch"],
                None, conveyor["brush_drop"],
            ),
        ),
        (
            CONTRACTOR.title + ": NW_CHECK_SECTIONS",
            NW_CHECK_SECTIONS(
                "series", hoist["v_supply"], hoist["r_motor"], sections, proposal["i_switch"],
                proposal["i_limit"], proposal["i_commutation"], hoist["mag_curve"], None, None,
                hoist["brush_drop"],
            ),
        ),
        (
            HOIST.title + ": NW_SERIES_MIN_LOAD (least current, torque)",
            [["least current [A]", "developed torque [N·m]"]]
            + NW_SERIES_MIN_LOAD(
                hoist["v_supply"], hoist["r_motor"], hoist["n_max"], hoist["mag_curve"],
                hoist["mag_speed"], hoist["brush_drop"],
            ),
        ),
    ]
    for title, rows in blocks:
        print(title)
        print(format_table(rows))
        print()
    print(CAUTION)
    return 0

"""Comparing a saved result with its recomputation, cell by cell, within a stated tolerance."""

from __future__ import annotations

import dataclasses
import math

__all__ = ["REL_TOL", "ABS_TOL", "Comparison", "compare", "as_block", "is_blank", "show"]

#: Agreement: |saved - recomputed| <= ABS_TOL + REL_TOL * max(|saved|, |recomputed|).
REL_TOL = 1e-9
ABS_TOL = 1e-12


def as_block(value) -> list:
    """A result or saved range as a list of rows."""
    return value if isinstance(value, list) else [[value]]


def is_blank(value) -> bool:
    return value is None or value == ""


def show(value, limit: int = 12) -> str:
    """A value or a range as short text; ranges show their size and first cells."""
    if isinstance(value, list) and len(value) == 1 and len(value[0]) == 1:
        return show(value[0][0])
    if isinstance(value, list):
        flat = [c for row in value for c in row]
        shown = ", ".join(show(c) for c in flat[:limit])
        more = ", ..." if len(flat) > limit else ""
        return f"{len(value)} x {len(value[0]) if value else 0}: [{shown}{more}]"
    if isinstance(value, float):
        return f"{value:.10g}"
    return "(blank)" if value is None else str(value)


def _same(saved, recomputed):
    """(agrees, numeric difference or None) of two cell values."""
    if isinstance(saved, bool) or isinstance(recomputed, bool):
        return saved is recomputed, None
    if isinstance(saved, (int, float)) and isinstance(recomputed, (int, float)):
        difference = abs(float(saved) - float(recomputed))
        if math.isnan(difference):
            return False, None
        return difference <= ABS_TOL + REL_TOL * max(abs(saved), abs(recomputed)), difference
    if is_blank(saved) and is_blank(recomputed):
        return True, None
    return saved == recomputed, None


@dataclasses.dataclass
class Comparison:
    """The outcome of comparing a saved range with a recomputed result."""

    agrees: bool
    largest: float | None = None  # largest numeric difference
    note: str = ""  # why the shapes do not match
    entries: list = dataclasses.field(default_factory=list)  # (row, col) of the differing cells, from 0

    def described(self, saved: list, recomputed: list, limit: int = 4) -> list:
        """The differing entries as text: position, the column's label where the result has a header row."""
        header = recomputed[0] if recomputed and len(recomputed) > 1 and all(
            isinstance(v, str) for v in recomputed[0]) else None
        lines = []
        for r, c in self.entries[:limit]:
            where = f"row {r + 1}, column {c + 1}" if len(saved) > 1 or len(saved[0]) > 1 else "value"
            if header is not None and c < len(header) and r > 0:
                where = f"row {r + 1}, {header[c]}"
            got = recomputed[r][c] if r < len(recomputed) and c < len(recomputed[r]) else None
            lines.append(f"{where}: saved {show(saved[r][c])}, recomputed {show(got)}")
        if len(self.entries) > limit:
            lines.append(f"... {len(self.entries) - limit} more differing entries")
        return lines


def compare(saved: list, recomputed: list) -> Comparison:
    """Compare a saved range (list of rows) with the recomputed result (list of rows)."""
    rows, cols = len(recomputed), max((len(r) for r in recomputed), default=0)
    saved_rows, saved_cols = len(saved), len(saved[0]) if saved else 0
    if (rows, cols) == (1, 1) and (saved_rows, saved_cols) != (1, 1):
        recomputed = [[recomputed[0][0]] * saved_cols for _ in range(saved_rows)]  # a legacy array fills its range
        rows, cols = saved_rows, saved_cols
    if rows > saved_rows or cols > saved_cols:
        return Comparison(False, None, f"the result is {rows} x {cols} cells but the saved range is {saved_rows} x {saved_cols}")
    found = Comparison(True)
    for r in range(saved_rows):
        for c in range(saved_cols):
            if r >= rows or c >= len(recomputed[r]):
                if saved[r][c] not in ("#N/A", None):  # a legacy array pads its range with #N/A
                    found.agrees = False
                    found.note = f"the saved range holds more cells than the result ({saved_rows} x {saved_cols})"
                    found.entries.append((r, c))
                continue
            same, difference = _same(saved[r][c], recomputed[r][c])
            if not same:
                found.agrees = False
                found.entries.append((r, c))
            if difference is not None:
                found.largest = difference if found.largest is None else max(found.largest, difference)
    return found

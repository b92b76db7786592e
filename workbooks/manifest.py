"""The list of computed cells that a workbook built by Notchwise carries, for ``notchwise audit``.

A hidden sheet named :data:`SHEET` holds :data:`HEADER` in its first row and
then one row per computed result: the sheet, the cell or spilled range the
result fills, and the NW_ function its formula calls. The audit checks that
every listed cell still holds that formula, so that a result typed over with
a number is named rather than silently dropped from the count.
"""

from __future__ import annotations

__all__ = ["SHEET", "HEADER"]

SHEET = "Notchwise manifest"
HEADER = ("sheet", "cell or range", "function")

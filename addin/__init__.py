"""Notchwise spreadsheet functions (xlwings) and the command-line tool."""

CAUTION = (
    "CAUTION: Notchwise results concern rotating machines, cranes and protection. They must be "
    "checked by a competent person before use; local codes and licensed practice prevail."
)

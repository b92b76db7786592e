"""Notchwise spreadsheet functions (xlwings), and the caution texts that every surface shows."""

#: The one caution, shown by the README, the workbook, the command line, the audit report and the cells.
CAUTION = (
    "CAUTION: Notchwise results concern rotating machines, cranes and protection. They must be "
    "checked by a competent person before use; local codes and licensed practice prevail."
)

#: The one series-motor warning, shown by the README, the workbook, the command line and the audit report.
SERIES_WARNING = "Series motors must never be run unloaded: with no load they race to destruction."

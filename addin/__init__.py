"""Notchwise spreadsheet functions (xlwings) and the command-line tool."""

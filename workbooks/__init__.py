"""The reference workbook of Notchwise and the demo cases it holds."""

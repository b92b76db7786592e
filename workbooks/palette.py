"""The colours of Notchwise's drawings: one table used by the workbook's charts and the command line's PNGs.

A quantity keeps its colour on every surface (armature current is always the same red, speed the same
blue), so a designer reading the PNG beside the workbook chart matches them by eye.
"""

from __future__ import annotations

__all__ = ["INK", "SAND", "SAND_EDGE", "MIST", "MIST_EDGE", "GREY", "RED", "QUANTITY_COLOURS"]

#: Palette of the workbook: ink blue headings, sand inputs, mist results, a brick red for cautions and current.
INK, SAND, SAND_EDGE, MIST, MIST_EDGE, GREY, RED = (
    "#1D3B53", "#FBF1D4", "#B8912F", "#E3ECF1", "#5E7F95", "#6B6B6B", "#8A2D1E")

#: Quantity drawn -> its colour, in charts and PNGs alike.
QUANTITY_COLOURS = {
    "current": RED,
    "speed": INK,
    "start": RED,
    "motor relay": INK,
    "high-set": "#3C7DB0",
    "thermal cold": SAND_EDGE,
    "thermal hot": "#D9652B",
    "stall": "#000000",
    "running": GREY,
    "feeder relay": "#3F7F3A",
    "interval": "#7A3E9D",
}

"""Workbooks for the audit's tests and benchmark, built here from nothing: good ones and hostile ones.

Each builder returns the file's bytes. The NW_ cells use a linear
magnetization curve, E = I (V per A) at 1000 rpm, so that their results have
closed forms: kΦ = I/1000 V/rpm, T = (60/2π)·kΦ·I and n = (V - I·R)/kΦ, the
DC machine laws of A. E. Fitzgerald, C. Kingsley Jr., S. D. Umans, *Electric
Machinery*, 6th ed., McGraw-Hill, 2003, ch. 7, Eqs. 7.1-7.8. A straight line
is interpolated exactly by the shape-preserving cubic (Fritsch and Carlson,
SIAM J. Numer. Anal. 17(2), 1980: the interpolant reproduces linear data).
"""

from __future__ import annotations

import datetime as dt
import io
import math
import struct
import zipfile

import xlsxwriter

LINEAR_CURVE = [[0.0, 0.0], [100.0, 100.0], [200.0, 200.0], [400.0, 400.0]]
CURVE_SPEED = 1000.0


def torque_closed_form(i_a: float) -> float:
    """T = (60/2π) kΦ I with kΦ = I/1000 V/rpm (Fitzgerald et al., 6th ed., Eqs. 7.1 and 7.7, P = EI = Tω). [N·m]"""
    return 60.0 / (2.0 * math.pi) * (i_a / CURVE_SPEED) * i_a


def speed_closed_form(v: float, r: float, i_a: float) -> float:
    """n = (V - IR)/kΦ with kΦ = I/1000 V/rpm (Fitzgerald et al., 6th ed., ch. 7). [rpm]"""
    return (v - i_a * r) / (i_a / CURVE_SPEED)


def _curve_sheet(book):
    data = book.add_worksheet("Curve data")
    data.write_row(0, 0, ("current [A]", "EMF [V]"))
    for r, row in enumerate(LINEAR_CURVE, start=1):
        data.write_row(r, 0, row)
    book.define_name("lin_curve", f"='Curve data'!$A$2:$B${len(LINEAR_CURVE) + 1}")
    book.define_name("lin_speed", "='Curve data'!$D$1")
    data.write_number(0, 3, CURVE_SPEED)


def torque_workbook(currents, saved=None, vba: bytes | None = None, extra=None) -> bytes:
    """Column A: currents; column B: =NW_SERIES_TORQUE(An, lin_curve, lin_speed) saved with ``saved(i)``."""
    saved = saved or torque_closed_form
    out = io.BytesIO()
    book = xlsxwriter.Workbook(out, {"in_memory": True})
    book.set_properties({"created": dt.datetime(2026, 1, 5)})  # the same bytes on every call
    sheet = book.add_worksheet("Torques")
    _curve_sheet(book)
    for r, current in enumerate(currents):
        sheet.write_number(r, 0, current)
        sheet.write_formula(r, 1, f"=NW_SERIES_TORQUE(A{r + 1},lin_curve,lin_speed)", None, saved(current))
    if extra:
        extra(book, sheet)
    if vba is not None:
        book.add_vba_project(io.BytesIO(vba), is_stream=True)
    book.close()
    return out.getvalue()


def replace_member(data: bytes, name: str, transform) -> bytes:
    """The same zip with one member's bytes replaced by ``transform(old bytes)``."""
    source = zipfile.ZipFile(io.BytesIO(data))
    out = io.BytesIO()
    with zipfile.ZipFile(out, "w", zipfile.ZIP_DEFLATED) as target:
        for info in source.infolist():
            body = source.read(info)
            target.writestr(info.filename, transform(body) if info.filename == name else body)
    return out.getvalue()


ENTITY_BOMB = b"""<?xml version="1.0"?>
<!DOCTYPE lolz [<!ENTITY a "aaaaaaaaaa"><!ENTITY b "&a;&a;&a;&a;&a;&a;&a;&a;&a;&a;">
<!ENTITY c "&b;&b;&b;&b;&b;&b;&b;&b;&b;&b;"><!ENTITY d "&c;&c;&c;&c;&c;&c;&c;&c;&c;&c;">
<!ENTITY e "&d;&d;&d;&d;&d;&d;&d;&d;&d;&d;"><!ENTITY f "&e;&e;&e;&e;&e;&e;&e;&e;&e;&e;">
<!ENTITY g "&f;&f;&f;&f;&f;&f;&f;&f;&f;&f;"><!ENTITY h "&g;&g;&g;&g;&g;&g;&g;&g;&g;&g;">]>
<sst xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main" count="1" uniqueCount="1"><si><t>&h;</t></si></sst>
"""


def entity_bomb() -> bytes:
    """A workbook whose shared strings expand to 100 MB through nested entities (the "billion laughs")."""
    return replace_member(torque_workbook([50.0]), "xl/sharedStrings.xml", lambda _: ENTITY_BOMB)


def ratio_bomb(megabytes: int = 40) -> bytes:
    """A zip whose sheet is ``megabytes`` of blanks: it compresses a thousandfold."""
    out = io.BytesIO()
    with zipfile.ZipFile(out, "w", zipfile.ZIP_DEFLATED) as target:
        for info in zipfile.ZipFile(io.BytesIO(torque_workbook([50.0]))).infolist():
            target.writestr(info.filename, zipfile.ZipFile(io.BytesIO(torque_workbook([50.0]))).read(info))
        with target.open("xl/worksheets/padding.xml", "w") as member:
            block = b" " * 2**20
            for _ in range(megabytes):
                member.write(block)
    return out.getvalue()


def lying_sizes(data: bytes, name: str, claimed: int = 100) -> bytes:
    """The zip with ``name``'s declared uncompressed size set to ``claimed`` bytes in both headers."""
    body = bytearray(data)
    encoded = name.encode()
    for signature, size_at in ((b"PK\x03\x04", 22), (b"PK\x01\x02", 24)):
        start = 0
        while (at := body.find(signature, start)) >= 0:
            name_at = 30 if signature == b"PK\x03\x04" else 46
            length = struct.unpack_from("<H", body, at + (26 if signature == b"PK\x03\x04" else 28))[0]
            if bytes(body[at + name_at: at + name_at + length]) == encoded:
                struct.pack_into("<I", body, at + size_at, claimed)
            start = at + 4
    return bytes(body)


def sparse_far_cell() -> bytes:
    """One NW_ cell and one value at the sheet's last cell, XFD1048576: a dimension of 17 billion cells."""

    def far(book, sheet):
        sheet.write_number(1048575, 16383, 1.0)

    return torque_workbook([50.0], extra=far)

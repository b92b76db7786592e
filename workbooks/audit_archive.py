"""Reading a workbook from a stranger safely: the file's bytes and its zip, checked before any XML is parsed.

The file is read into memory once (its SHA-256 is of those bytes). The zip is
checked for its member count, declared and actual expanded sizes and each
member's compression ratio; every member is expanded once, in chunks,
counting bytes. Macro parts are reported, never run.
"""

from __future__ import annotations

import dataclasses
import io
import zipfile
import zlib
from pathlib import Path

__all__ = ["Limits", "LIMITS", "UnreadableWorkbook", "read_file_bytes", "check_archive"]


@dataclasses.dataclass
class Limits:
    """What a workbook from outside may ask of the machine that audits it."""

    file_bytes: int = 100 * 2**20  # size of the file itself
    expanded_bytes: int = 200 * 2**20  # all zip members expanded, declared and actual
    members: int = 5000  # zip members
    ratio: float = 200.0  # expanded/compressed size of one member above ratio_from bytes
    ratio_from: int = 2**20
    cells: int = 2_000_000  # cells read over all sheets
    range_cells: int = 200_000  # cells of one argument range


LIMITS = Limits()
MACRO_PARTS = ("vbaproject.bin",)


class UnreadableWorkbook(Exception):
    """The file cannot be read as a workbook, or asks more than the limits allow."""


def read_file_bytes(path: Path) -> bytes:
    """The file's bytes, refusing what is not a regular file or exceeds the size limit."""
    try:
        if not path.exists():
            raise UnreadableWorkbook(f"{path} not found")
        if not path.is_file():
            raise UnreadableWorkbook(f"{path} is not a file")
        size = path.stat().st_size
        if size > LIMITS.file_bytes:
            raise UnreadableWorkbook(f"{path} is {size / 2**20:.0f} MB; the limit is {LIMITS.file_bytes / 2**20:.0f} MB")
        with path.open("rb") as handle:
            return handle.read(LIMITS.file_bytes + 1)
    except OSError as error:
        raise UnreadableWorkbook(f"cannot read {path}: {error.strerror or error}") from None


def check_archive(data: bytes) -> list:
    """Check the zip before any XML is parsed; returns notes (macro parts found).

    Every member is expanded once, in chunks, counting bytes: a member that
    expands beyond its declared size, or a total beyond the limit, is refused
    as soon as it is seen, and a damaged member fails its CRC check.
    """
    try:
        archive = zipfile.ZipFile(io.BytesIO(data))
    except zipfile.BadZipFile:
        raise UnreadableWorkbook("not a workbook: the file is not a zip archive (or it is truncated)") from None
    except _ZIP_FAULTS as error:
        raise UnreadableWorkbook(f"the zip is damaged: {type(error).__name__}: {error}") from None
    with archive:
        members = archive.infolist()
        if len(members) > LIMITS.members:
            raise UnreadableWorkbook(f"the zip has {len(members)} members; the limit is {LIMITS.members}")
        names = {m.filename.lower() for m in members}
        if "xl/workbook.xml" not in names:
            raise UnreadableWorkbook("not a workbook: the zip holds no spreadsheet (it has no xl/workbook.xml)")
        declared = sum(m.file_size for m in members)
        if declared > LIMITS.expanded_bytes:
            raise UnreadableWorkbook(_too_big(declared))
        for member in members:
            if member.file_size > LIMITS.ratio_from and member.file_size > LIMITS.ratio * max(member.compress_size, 1):
                raise UnreadableWorkbook(
                    f"zip member {member.filename!r} would expand {member.file_size / max(member.compress_size, 1):.0f}"
                    f" times (limit {LIMITS.ratio:.0f}): a possible zip bomb"
                )
        expanded = 0
        for member in members:
            seen = 0
            try:
                with archive.open(member) as stream:
                    while chunk := stream.read(2**20):
                        seen += len(chunk)
                        expanded += len(chunk)
                        if seen > member.file_size or expanded > LIMITS.expanded_bytes:
                            raise UnreadableWorkbook(
                                f"zip member {member.filename!r} expands beyond its declared size: a possible zip bomb"
                            )
            except _ZIP_FAULTS as error:
                raise UnreadableWorkbook(f"the zip is damaged at {member.filename!r}: {error}") from None
    return [
        f"contains a macro part ({m.filename}); it was not run and is not audited"
        for m in members
        if m.filename.lower().rsplit("/", 1)[-1] in MACRO_PARTS
    ]


#: What a damaged zip raises in the standard library: bad headers or streams, odd versions or names, encryption.
_ZIP_FAULTS = (
    zipfile.BadZipFile, zlib.error, EOFError, ValueError, NotImplementedError, OSError, UnicodeError, RuntimeError,
)


def _too_big(size: int) -> str:
    return f"the zip expands to {size / 2**20:.0f} MB; the limit is {LIMITS.expanded_bytes / 2**20:.0f} MB"

"""The texts every surface shares, the one list of sources, and the direction of the imports."""

from __future__ import annotations

import ast
import re
from pathlib import Path

import pytest

from notchwise.addin import CAUTION, SERIES_WARNING

REPOSITORY = Path(__file__).resolve().parent.parent
README = (REPOSITORY / "README.md").read_text(encoding="utf-8")
SOURCES = (REPOSITORY / "SOURCES.md").read_text(encoding="utf-8")


@pytest.mark.parametrize("text", [CAUTION, SERIES_WARNING], ids=["caution", "series warning"])
def test_readme_carries_the_shared_texts_verbatim(text):
    assert text in README


def test_the_workbook_cautions_carry_the_shared_texts():
    from notchwise.workbooks.cases import CAUTIONS

    assert SERIES_WARNING in CAUTIONS
    assert any("competent person" in line for line in CAUTIONS)


def test_readme_points_to_the_one_list_of_sources():
    assert "[SOURCES.md](SOURCES.md)" in README


def _references(path: Path):
    """Text of each numbered reference (``.. [n] ...``) of a module's docstrings."""
    text = path.read_text(encoding="utf-8")
    return re.findall(r"^\s*\.\. \[\d+\] (.+)", text, re.MULTILINE)


def _first_name(reference: str) -> str:
    """The standard's number (``C37.112-1996``) or the first author's surname of a reference."""
    standard = re.match(r"(?:IEC|IEEE|NFPA|ISO)[A-Za-z/ ]*?\s([A-Z]*\d[\w.-]*\d)", reference)
    return standard.group(1) if standard else re.findall(r"[A-Z][a-z]{2,}", reference)[0]


@pytest.mark.parametrize("path", sorted((REPOSITORY / "formulas").glob("*.py")), ids=lambda p: p.name)
def test_every_reference_of_the_core_is_in_the_list_of_sources(path):
    missing = [ref for ref in _references(path) if not ref.startswith("See the module")
               and _first_name(ref) not in SOURCES
               and "heat-transfer text" not in ref]  # vague in resistors.py; SOURCES.md says what it stands for
    assert missing == []


# -- dependencies run one way: command line -> workbook -> add-in -> core --------------------------

LAYERS = {
    "formulas": {"notchwise.addin", "notchwise.workbooks"},
    "addin": {"notchwise.workbooks"},
}
COMMAND_LINE = {f"notchwise.workbooks.{name}" for name in ("cli", "demo", "diagram", "audit", "freeze")}
WORKBOOK = ("schema.py", "cases.py", "writer.py", "build_reference.py", "demo_cases.py", "palette.py")


def _imports(path: Path) -> set:
    names = set()
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.Import):
            names.update(alias.name for alias in node.names)
        elif isinstance(node, ast.ImportFrom) and node.module and node.level == 0:
            names.add(node.module)
    return names


def _reaches(names: set, forbidden: set) -> set:
    return {name for name in names for bad in forbidden if name == bad or name.startswith(bad + ".")}


@pytest.mark.parametrize("folder", sorted(LAYERS))
def test_lower_layers_import_no_higher_one(folder):
    offenders = {path.name: _reaches(_imports(path), LAYERS[folder]) for path in (REPOSITORY / folder).glob("*.py")}
    assert {name: bad for name, bad in offenders.items() if bad} == {}


def test_the_workbook_imports_no_command():
    offenders = {name: _reaches(_imports(REPOSITORY / "workbooks" / name), COMMAND_LINE) for name in WORKBOOK}
    assert {name: bad for name, bad in offenders.items() if bad} == {}
    assert _reaches(_imports(REPOSITORY / "workbooks" / "schema.py"), {"notchwise"}) == set()  # a plain description

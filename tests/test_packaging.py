"""Notchwise installs one top-level import name, ``notchwise``, and nothing generic.

PyPI carries a widely used package named ``formulas``; a user's environment
must be able to hold both.
"""

import re
import subprocess
import sys
import textwrap
import zipfile
from importlib import metadata
from pathlib import Path

REPOSITORY = Path(__file__).resolve().parent.parent
FOLDERS = ("formulas", "addin", "workbooks")


def test_installed_distribution_names_one_top_level_package():
    assert metadata.distribution("notchwise").read_text("top_level.txt").split() == ["notchwise"]


def test_the_wheel_holds_only_the_notchwise_package(tmp_path):
    subprocess.run([sys.executable, "-m", "pip", "wheel", "--quiet", "--no-deps", "-w", str(tmp_path), str(REPOSITORY)],
                   check=True, capture_output=True)
    (wheel,) = tmp_path.glob("notchwise-*.whl")
    tops = {name.split("/")[0] for name in zipfile.ZipFile(wheel).namelist()}
    assert {top for top in tops if not top.endswith(".dist-info")} == {"notchwise"}
    names = zipfile.ZipFile(wheel).namelist()
    for folder in FOLDERS:
        assert f"notchwise/{folder}/__init__.py" in names


def test_a_package_named_formulas_beside_notchwise_imports_too(tmp_path):
    other = tmp_path / "formulas"
    other.mkdir()
    (other / "__init__.py").write_text("IDENTITY = 'the other formulas'\n")
    code = textwrap.dedent("""
        import formulas, notchwise.formulas.grading
        print(formulas.IDENTITY, notchwise.formulas.grading.__name__)
    """)
    out = subprocess.run([sys.executable, "-c", code], cwd=tmp_path, capture_output=True, text=True, check=True).stdout
    assert out.split() == ["the", "other", "formulas", "notchwise.formulas.grading"]


def test_no_module_imports_the_folders_by_their_bare_names():
    bare = re.compile(rf"^\s*(from|import)\s+({'|'.join(FOLDERS)})\b", re.MULTILINE)
    offenders = [str(path.relative_to(REPOSITORY)) for folder in (*FOLDERS, "tests")
                 for path in (REPOSITORY / folder).rglob("*.py")
                 if path != Path(__file__).resolve() and bare.search(path.read_text(encoding="utf-8"))]
    assert offenders == []

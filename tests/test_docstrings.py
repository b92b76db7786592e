"""Every public core function documents every parameter with its unit, and its examples run.

The rule (DEVELOPERS.md, STYLE.md): a numpydoc Parameters section names every parameter of the
signature, and each description ends with the unit in brackets, ``[-]`` for a dimensionless one.
"""

from __future__ import annotations

import doctest
import importlib
import inspect
import pkgutil
import re

import numpy as np
import pytest

import notchwise.formulas

MODULES = [importlib.import_module(f"notchwise.formulas.{info.name}")
           for info in pkgutil.iter_modules(notchwise.formulas.__path__)]
UNIT_AT_END = re.compile(r"\[[^\[\]]+\]\.?$")



def _public_functions():
    for module in MODULES:
        for name in getattr(module, "__all__", ()):
            item = getattr(module, name)
            if inspect.isfunction(item):
                yield f"{module.__name__.rsplit('.', 1)[1]}.{name}", item


def parameter_descriptions(doc: str) -> dict:
    """Parameter name -> description text of a numpydoc Parameters section."""
    lines = inspect.cleandoc(doc or "").splitlines()
    try:
        start = next(k for k in range(len(lines) - 1)
                     if lines[k].strip() == "Parameters" and set(lines[k + 1].strip()) == {"-"})
    except StopIteration:
        return {}
    found, names = {}, []
    for k in range(start + 2, len(lines)):
        line = lines[k]
        if k + 1 < len(lines) and line.strip() and set(lines[k + 1].strip()) == {"-"}:
            break  # the next section
        if line and not line[0].isspace():
            names = [n.strip() for n in line.split(":")[0].split(",")]
            for n in names:
                found[n.lstrip("*")] = ""
        elif line.strip():
            for n in names:
                found[n.lstrip("*")] = (found[n.lstrip("*")] + " " + line.strip()).strip()
    return found


def unit_gaps(function) -> set:
    """``parameter (what is wrong)`` for every parameter not documented with a unit at the end."""
    documented = parameter_descriptions(function.__doc__)
    gaps = set()
    for name in inspect.signature(function).parameters:
        if name not in documented:
            gaps.add(f"{name} (not documented)")
        elif not UNIT_AT_END.search(documented[name]):
            gaps.add(f"{name} (no [unit] at the end)")
    return gaps


def all_gaps() -> set:
    return {f"{where}: {gap}" for where, function in _public_functions() for gap in unit_gaps(function)}


def test_the_parser_reads_numpydoc_parameters():
    def sample(a, b, c):
        """Summary.

        Parameters
        ----------
        a, b : float
            Two lengths,
            on two lines. [m]
        c : int
            A count.

        Returns
        -------
        float
            Area. [m²]
        """

    assert parameter_descriptions(sample.__doc__) == {"a": "Two lengths, on two lines. [m]",
                                                      "b": "Two lengths, on two lines. [m]", "c": "A count."}
    assert unit_gaps(sample) == {"c (no [unit] at the end)"}


def test_every_public_core_function_is_found():
    names = {where for where, _ in _public_functions()}
    assert len(names) > 20 and "relays.operate_time_s" in names and "dc_motor.steady_speed_rpm" in names


def test_every_parameter_of_every_public_core_function_has_its_unit():
    gaps = all_gaps()
    assert sorted(gaps) == []


# -- Examples (doctests) of the core -----------------------------------------------------------------

@pytest.mark.parametrize("module", MODULES, ids=lambda m: m.__name__.rsplit(".", 1)[1])
def test_the_examples_of_the_core_run(module):
    with np.printoptions(precision=6, suppress=True, legacy=False):
        result = doctest.testmod(module, optionflags=doctest.NORMALIZE_WHITESPACE | doctest.ELLIPSIS, verbose=False)
    assert result.failed == 0

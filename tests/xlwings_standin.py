"""Load xlwings' Windows-only UDF machinery on any machine, for contract tests.

``xlwings.udfs`` (the code behind Excel's "Import Functions") and
``xlwings._xlwindows`` (the Excel engine whose converters turn COM values into
Python ones) import the pywin32 modules at import time. Here those modules are
stand-ins, so the real xlwings decorators, VBA writer and converters run on
Linux exactly as they are written; nothing that touches COM is called.
"""

from __future__ import annotations

import contextlib
import ctypes
import importlib
import sys
from unittest import mock

WINDOWS_MODULES = (
    "pythoncom",
    "pywintypes",
    "win32api",
    "win32con",
    "win32event",
    "win32gui",
    "win32process",
    "win32timezone",
    "win32com",
    "win32com.client",
    "win32com.client.gencache",
    "win32com.server",
    "win32com.server.dispatcher",
    "win32com.server.policy",
    "win32com.server.util",
)

#: The integer Excel passes for an argument left out of a call (xlwings.udfs.call_udf).
EXCEL_MISSING = -2147352572


class _TimeType:
    """Stand-in for pywintypes.TimeType, which xlwings lists among date types."""


@contextlib.contextmanager
def real_xlwings(addin_modules=("notchwise.addin.cells", "notchwise.addin.udfs")):
    """Within the block, ``xlwings.func/arg/ret`` are the real Windows decorators.

    Yields ``(udfs_module, xlwings_udfs, conversion)``: our ``notchwise.addin.udfs``
    freshly imported under those decorators, ``xlwings.udfs`` and
    ``xlwings.conversion`` with an Excel engine registered.
    """
    import xlwings

    saved_modules = dict(sys.modules)
    saved_ctypes = {name: getattr(ctypes, name, None) for name in ("windll", "oledll", "PyDLL")}
    saved_decorators = {name: getattr(xlwings, name) for name in ("func", "arg", "ret")}
    try:
        for name in WINDOWS_MODULES:
            sys.modules[name] = mock.MagicMock(name=name)
        sys.modules["pythoncom"].__file__ = "pythoncom.dll"
        sys.modules["pywintypes"].TimeType = _TimeType
        ctypes.windll, ctypes.oledll, ctypes.PyDLL = mock.MagicMock(), mock.MagicMock(), mock.MagicMock()
        xlwings_udfs = importlib.import_module("xlwings.udfs")
        windows = importlib.import_module("xlwings._xlwindows")
        from xlwings.main import Engine

        if "excel" not in xlwings.engines.engines_by_name:
            xlwings.engines.add(Engine(impl=windows.engine))
        xlwings.func, xlwings.arg, xlwings.ret = xlwings_udfs.xlfunc, xlwings_udfs.xlarg, xlwings_udfs.xlret
        for name in [m for m in sys.modules if m == "notchwise.addin" or m.startswith("notchwise.addin.")]:
            del sys.modules[name]
        udfs = importlib.import_module("notchwise.addin.udfs")
        yield udfs, xlwings_udfs, importlib.import_module("xlwings.conversion")
    finally:
        for name, value in saved_decorators.items():
            setattr(xlwings, name, value)
        for name, value in saved_ctypes.items():
            if value is None:
                with contextlib.suppress(AttributeError):
                    delattr(ctypes, name)
            else:
                setattr(ctypes, name, value)
        excel = xlwings.engines.engines_by_name.pop("excel", None)
        if excel in xlwings.engines.engines:
            xlwings.engines.engines.remove(excel)
        first_imported = {name: module for name, module in sys.modules.items() if name not in saved_modules}
        sys.modules.clear()
        sys.modules.update(saved_modules)
        # What was first imported within the block stays, but for the stand-ins and what was built on them:
        # numba loads parts of itself lazily and registers them once per process, so they cannot be imported twice.
        sys.modules.update({name: module for name, module in first_imported.items()
                            if name not in WINDOWS_MODULES and not name.startswith(("xlwings", "notchwise.addin"))})


def call_like_excel(conversion, func, raw_args):
    """Call a registered function as xlwings' ``call_udf`` does for plain values.

    Missing arguments become their Python default; every other value goes
    through ``conversion.read`` with the argument's options; the result goes
    through ``conversion.write``, giving what Excel receives.
    """
    info = func.__xlfunc__
    args = []
    for position, raw in enumerate(raw_args):
        arg_info = info["args"][min(position, len(info["args"]) - 1)]
        if isinstance(raw, int) and raw == EXCEL_MISSING:
            args.append(arg_info.get("optional", None))
        else:
            args.append(conversion.read(None, raw, arg_info["options"]))
    return conversion.write(func(*args), None, info["ret"]["options"])

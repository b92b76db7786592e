r"""Compilation of the integrators' inner loops to machine code, where the platform has it.

The step loops of the start and the braking stop
(:mod:`notchwise.formulas.notch_integrator`, :mod:`notchwise.formulas.braking`)
are plain-float Python written in the subset that numba [1]_ compiles: scalars,
tuples and one-dimensional or two-dimensional float arrays, no Python objects.
Where numba is installed, :func:`compiled` turns each such function into machine
code at its first call and caches that code on disk, in the user's cache
folder (:func:`cache_folder`; not beside the installed source, where it would
outlive an uninstall and shadow a later editable install), so later sessions
load it instead of compiling again; where it is not (numba publishes no wheel for macOS
on Intel processors), or where ``NUMBA_DISABLE_JIT=1`` is set, the very same
functions run as Python, slower but with the same results.

.. math:: \text{one source} \rightarrow \text{machine code (numba) or Python (no numba)}

References
----------
.. [1] S. K. Lam, A. Pitrou, S. Seibert, "Numba: a LLVM-based Python JIT
   compiler," *Proc. 2nd Workshop on the LLVM Compiler Infrastructure in
   HPC*, ACM, 2015, pp. 1-6.
"""

from __future__ import annotations

import contextlib
import os
import sys

try:
    import numba
    from numba import njit
except ImportError:  # no wheel for this platform: the functions run as Python
    njit = None

__all__ = ["COMPILED", "compiled", "cache_folder"]

#: True when :func:`compiled` produces machine code (numba installed and not disabled). [-]
COMPILED = njit is not None and os.environ.get("NUMBA_DISABLE_JIT", "0") in ("", "0")


def cache_folder() -> str:
    """The folder the compiled code is kept in: ``NUMBA_CACHE_DIR`` where the user set it, else the user's cache.

    Returns
    -------
    str
        ``%LOCALAPPDATA%\\notchwise`` on Windows, ``~/Library/Caches/notchwise`` on macOS,
        ``$XDG_CACHE_HOME/notchwise`` (``~/.cache/notchwise``) elsewhere. [-]

    Notes
    -----
    .. math:: \\text{folder} = \\text{user cache} / \\text{notchwise}
    """
    if os.environ.get("NUMBA_CACHE_DIR"):
        return os.environ["NUMBA_CACHE_DIR"]
    if sys.platform == "win32":
        base = os.environ.get("LOCALAPPDATA") or os.path.expanduser(os.path.join("~", "AppData", "Local"))
    elif sys.platform == "darwin":
        base = os.path.expanduser(os.path.join("~", "Library", "Caches"))
    else:
        base = os.environ.get("XDG_CACHE_HOME") or os.path.expanduser(os.path.join("~", ".cache"))
    return os.path.join(base, "notchwise")


@contextlib.contextmanager
def _caching_in(folder: str):
    """numba's cache folder set to ``folder`` while functions are decorated: it picks their folder then, once."""
    saved = numba.config.CACHE_DIR
    numba.config.CACHE_DIR = folder
    try:
        yield
    finally:
        numba.config.CACHE_DIR = saved


def compiled(function=None, *, allocates: bool = False):
    """``function`` compiled by numba (cached in :func:`cache_folder`), or ``function`` itself where numba is absent.

    Used bare (``@compiled``) for the helpers that create no array, which are then compiled without numba's
    reference counting of arrays: it cannot be pruned across their branches and calls, and measured, it made
    one evaluation of the start's right-hand side three times as slow (numba issue 2350, where the
    maintainers show the same option); ``@compiled(allocates=True)`` for the loops that create arrays.

    Parameters
    ----------
    function : callable
        A function of floats, ints, tuples and float arrays only. [-]
    allocates : bool, optional
        True when the function creates arrays (and so needs reference counting). [-]

    Returns
    -------
    callable
        The compiled function, called exactly as the original. [-]

    Notes
    -----
    .. math:: f_{compiled}(x) = f(x)

    Division by zero raises ``ZeroDivisionError`` in both forms (numba's Python error model).
    """
    if function is None:
        return lambda decorated: compiled(decorated, allocates=allocates)
    if njit is None:
        return function
    with _caching_in(cache_folder()):
        return njit(cache=True, nogil=True, _nrt=allocates)(function)

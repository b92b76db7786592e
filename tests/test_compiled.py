"""Tests of notchwise.formulas.compiled: the compiled loops and the same code run as Python agree.

The reference is the very source of the loops run by CPython (numba's ``NUMBA_DISABLE_JIT=1``, the path a
platform without numba takes), in a separate process; the physics of the loops is checked against
independent methods in tests/test_notch_integrator.py, tests/test_start_sim.py and tests/test_braking.py.
"""

from __future__ import annotations

import glob
import json
import os
import subprocess
import sys
import textwrap

import pytest

from notchwise.formulas import compiled, notch_integrator

#: A series start and a dynamic-braking stop of an invented hoist motor, printed as JSON.
CASE = textwrap.dedent("""
    import json
    import numpy as np
    from notchwise.formulas.dc_motor import SeriesMotor, magnetization_curve
    from notchwise.formulas.start_sim import simulate_start
    from notchwise.formulas.braking import simulate_stop
    from notchwise.formulas.compiled import COMPILED
    table = np.array([[0.0, 6.0], [40.0, 62.0], [80.0, 112.0], [120.0, 150.0], [160.0, 178.0], [220.0, 205.0],
                      [300.0, 228.0], [400.0, 246.0], [500.0, 258.0]])
    motor = SeriesMotor(0.062, magnetization_curve(table[:, 0], table[:, 1], 700.0))
    start = simulate_start(motor, 230.0, [0.2, 0.12, 0.08], 0.004, 6.5, [[0.0, 300.0], [900.0, 520.0]], 301.0,
                           brush_drop_v=2.0)
    stop = simulate_stop(motor, 230.0, 1.2, "dynamic", 0.004, 6.5, 150.0, 700.0)
    print(json.dumps(dict(compiled=COMPILED, peaks=start.i_peak_a.tolist(), dwells=start.dwell_s.tolist(),
                          i2t=start.i2t_a2s.tolist(), t_accel=start.t_accel_s, t_stop=stop.t_stop_s,
                          i_peak_stop=stop.i_peak_a)))
""")


def _run(disable_jit: bool) -> dict:
    environment = dict(os.environ, NUMBA_DISABLE_JIT="1" if disable_jit else "0")
    done = subprocess.run([sys.executable, "-c", CASE], capture_output=True, text=True, env=environment, timeout=600)
    assert done.returncode == 0, done.stderr
    return json.loads(done.stdout)


def test_the_loops_run_the_same_compiled_and_as_python():
    as_python = _run(disable_jit=True)
    assert not as_python["compiled"]
    machine = _run(disable_jit=False)
    assert machine["compiled"] == compiled.COMPILED
    for key in ("peaks", "dwells", "i2t", "t_accel", "t_stop", "i_peak_stop"):
        assert machine[key] == pytest.approx(as_python[key], rel=1e-9), key


@pytest.mark.skipif(not compiled.COMPILED, reason="numba is not installed here: the loops run as Python")
def test_the_step_loop_is_machine_code_where_numba_is_installed():
    # A compiled function keeps the signatures it was compiled for; a plain Python function has none.
    notch_integrator.piecewise_cubic(*notch_integrator.constant_flux(0.3).current_pieces, 10.0)
    assert notch_integrator.piecewise_cubic.signatures


@pytest.mark.skipif(not compiled.COMPILED, reason="numba is not installed here: nothing is compiled or cached")
def test_the_compiled_code_is_kept_in_the_users_cache_not_beside_the_installed_source():
    # Beside the source it would outlive an uninstall, and the folder left behind would shadow a later
    # editable install of the package (seen: the Quick start's two lines run one after the other).
    notch_integrator.piecewise_cubic(*notch_integrator.constant_flux(0.3).current_pieces, 10.0)
    index = "notch_integrator.piecewise_cubic-*.nbi"
    assert glob.glob(os.path.join(compiled.cache_folder(), "**", index), recursive=True)
    assert not glob.glob(os.path.join(os.path.dirname(notch_integrator.__file__), "__pycache__", index))


def test_a_function_compiles_or_stays_itself():
    def twice(x):
        return 2.0 * x

    assert compiled.compiled(twice)(1.5) == 3.0
    assert compiled.compiled(allocates=True)(twice)(2.0) == 4.0

"""The wheel carries the app's styles and the compiled simulator, and start-up does not
pull in the heavy modules."""
import json
import os
import subprocess
import sys
import zipfile
from pathlib import Path

import pytest

from tests.wheel import build_wheel, install_wheel

ROOT = Path(__file__).resolve().parents[2]


@pytest.fixture(scope="module")
def wheel(tmp_path_factory):
    """The wheel built from a copy of the sources, as ``pip install .`` builds it (with
    build isolation: the build step compiles the simulator into it, setup.py)."""
    result, out = build_wheel(tmp_path_factory.mktemp("wheel"))
    assert result.returncode == 0, result.stderr[-2000:]
    return next(out.glob("dimfit-*.whl"))


@pytest.mark.slow
def test_tcss_files_ship_in_the_wheel(wheel):
    names = set(zipfile.ZipFile(wheel).namelist())
    shipped = {n for n in names if n.startswith("tui/") and n.endswith(".tcss")}
    expected = {f"tui/{p.name}" for p in (ROOT / "tui").glob("*.tcss")}
    assert expected and shipped == expected
    # the console command is the tui layer's (tui -> compat -> loads; compat.cli has no app)
    with zipfile.ZipFile(wheel) as z:
        entry_points = z.read(next(n for n in z.namelist() if n.endswith(".dist-info/entry_points.txt"))).decode()
    assert "dimfit = tui.cli:main" in entry_points


@pytest.mark.slow
def test_an_installed_copy_runs_without_compiling(wheel, tmp_path):
    # The build compiled the simulator into the wheel (numba's cache beside kernel.py);
    # installed from it (as pip installs: new files, new times), the first check of the
    # demo finds everything compiled: numba saves nothing new to its cache (it would if
    # it compiled anything).  A fresh process, no NUMBA_CACHE_DIR (that would point
    # numba elsewhere), run outside the source tree so that the installed copy is used.
    names = zipfile.ZipFile(wheel).namelist()
    assert any(n.startswith("loads/__pycache__/kernel.run-") and n.endswith(".nbi") for n in names)
    site = tmp_path / "site"
    result = install_wheel(wheel, site)
    assert result.returncode == 0, result.stderr[-2000:]
    env = {k: v for k, v in os.environ.items() if k != "NUMBA_CACHE_DIR"} | {
        "PYTHONPATH": str(site), "NUMBA_DEBUG_CACHE": "1"}
    code = ("import sys, loads.simulation as s; assert s.__file__.startswith(sys.argv[1]), s.__file__; "
            "print('cached', s.integrator_cached()); from tui.cli import main; sys.exit(main(sys.argv[2:]))")
    demo = tmp_path / "demo.toml"
    run = subprocess.run([sys.executable, "-c", code, str(site), "demo", str(demo)], cwd=tmp_path, env=env,
                         capture_output=True, text=True, timeout=300)
    assert run.returncode in (0, 1), run.stderr[-2000:]      # the demo's verdict decides 0 or 1
    assert "cached True" in run.stdout
    assert "compiling the simulator" not in run.stderr
    saved = [ln for ln in (run.stdout + run.stderr).splitlines() if "[cache] data saved" in ln]
    assert "[cache] data loaded" in run.stdout + run.stderr     # the debug output is there to be read
    assert saved == [], saved[:5]


def test_starting_the_app_does_not_import_the_simulator_or_the_plots():
    code = ("import sys, json; import tui.app, tui.circuit_screen, tui.widgets, tui.modals; "
            "print(json.dumps(sorted(m for m in sys.modules if m.split('.')[0] in "
            "('plotext', 'textual_plotext', 'compat', 'loads'))))")
    result = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT, timeout=120)
    assert result.returncode == 0, result.stderr
    loaded = set(json.loads(result.stdout))
    for heavy in ("plotext", "textual_plotext", "compat.evaluate", "compat.sizing", "loads.simulation",
                  "loads.kernel", "tui.waveform_screen"):
        assert heavy not in loaded
    assert "compat.report" in loaded            # the check above can see loaded modules at all

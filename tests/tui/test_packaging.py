"""The app's styles ship in the wheel, and start-up does not pull in the heavy modules."""
import json
import shutil
import subprocess
import sys
import zipfile
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]


@pytest.mark.slow
def test_tcss_files_ship_in_the_wheel(tmp_path):
    source = tmp_path / "src"
    source.mkdir()
    for name in ("loads", "compat", "tui"):
        shutil.copytree(ROOT / name, source / name, ignore=shutil.ignore_patterns("__pycache__"))
    for name in ("pyproject.toml", "README.md", "LICENSE"):
        if (ROOT / name).exists():
            shutil.copy(ROOT / name, source / name)
    if not (source / "README.md").exists():      # pyproject names it; the copy needs one to build
        (source / "README.md").write_text("placeholder for the packaging test\n")
    out = tmp_path / "dist"
    # a copy, so that the build leaves no build/ or egg-info in the shared tree
    result = subprocess.run([sys.executable, "-m", "pip", "wheel", "--no-deps", "--quiet", "-w", str(out),
                             str(source)], capture_output=True, text=True, timeout=600)
    assert result.returncode == 0, result.stderr[-2000:]
    wheel = next(out.glob("dimfit-*.whl"))
    names = set(zipfile.ZipFile(wheel).namelist())
    shipped = {n for n in names if n.startswith("tui/") and n.endswith(".tcss")}
    expected = {f"tui/{p.name}" for p in (ROOT / "tui").glob("*.tcss")}
    assert expected and shipped == expected
    # the console command is the tui layer's (tui -> compat -> loads; compat.cli has no app)
    with zipfile.ZipFile(wheel) as z:
        entry_points = z.read(next(n for n in z.namelist() if n.endswith(".dist-info/entry_points.txt"))).decode()
    assert "dimfit = tui.cli:main" in entry_points


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

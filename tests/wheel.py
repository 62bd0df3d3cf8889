"""The wheel as ``pip install .`` builds it, from a copy of the sources, and an install
of it into a folder of its own: for the packaging test and the first-run row of
``tests.bench``.  The copy keeps the build's build/ and egg-info out of the shared
tree; the build runs with pip's build isolation, so setup.py compiles the simulator
into the wheel as it does for a user."""
from __future__ import annotations

import os
import shutil
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
# the settings that would move numba's cache elsewhere or skip the compile step
_ENV = {k: v for k, v in os.environ.items() if k not in ("NUMBA_CACHE_DIR", "DIMFIT_BUILD_COMPILE")}


def build_wheel(tmp: Path) -> tuple[subprocess.CompletedProcess, Path]:
    """Build the wheel into tmp/dist from a copy of the sources in tmp/src: (pip's
    result, the dist folder)."""
    source = tmp / "src"
    source.mkdir()
    for name in ("loads", "compat", "tui"):
        shutil.copytree(ROOT / name, source / name, ignore=shutil.ignore_patterns("__pycache__"))
    for name in ("pyproject.toml", "setup.py", "README.md", "LICENSE"):
        if (ROOT / name).exists():
            shutil.copy(ROOT / name, source / name)
    if not (source / "README.md").exists():      # pyproject names it; the copy needs one to build
        (source / "README.md").write_text("placeholder for the packaging test\n")
    out = tmp / "dist"
    result = subprocess.run([sys.executable, "-m", "pip", "wheel", "--no-deps", "--quiet", "-w", str(out),
                             str(source)], capture_output=True, text=True, timeout=900, env=_ENV)
    return result, out


def install_wheel(wheel: Path, site: Path) -> subprocess.CompletedProcess:
    """Install ``wheel`` without its dependencies (they are this environment's) into
    ``site``, as pip installs it (new files, new times)."""
    return subprocess.run([sys.executable, "-m", "pip", "install", "--no-deps", "--quiet", "--target", str(site),
                           str(wheel)], capture_output=True, text=True, timeout=300, env=_ENV)

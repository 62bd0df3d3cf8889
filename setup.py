"""Build step: compile the simulator into the package while it is built.

Everything about the package is in pyproject.toml; this file only adds one step to
``build_py``.  After the sources are copied into the build folder, a fresh Python runs
``loads.simulation.compile_ahead`` from there, so numba's cache of the compiled
integrator lands in ``loads/__pycache__`` beside ``kernel.py`` and ships in the wheel.
The first ``dimfit`` command after ``pip install .`` then loads it (about a second)
instead of compiling (15-60 s).  numba checks its cache against this machine's
processor, its own version and a hash of the source text, so a wheel taken to another
kind of machine still works: it compiles on first use, as an install without this
step does.

If the step fails (numba missing from a build without isolation, say) the build goes
on and says so: the package is whole without the cache.  Editable installs skip it
(the sources are used in place and compile on first use).  Set
DIMFIT_BUILD_COMPILE=0 to skip it on purpose.
"""
import glob
import os
import subprocess
import sys
import time

from setuptools import setup
from setuptools.command.build_py import build_py

_COMPILE = ("import sys; sys.path.insert(0, sys.argv[1]); "
            "from loads.simulation import compile_ahead; compile_ahead()")


class BuildPyCompiled(build_py):
    def run(self):
        super().run()
        if self.editable_mode or os.environ.get("DIMFIT_BUILD_COMPILE", "1") == "0":
            return
        env = {k: v for k, v in os.environ.items() if k != "NUMBA_CACHE_DIR"}   # the cache goes in the tree
        # a build folder kept from an earlier build may hold code compiled from earlier load
        # modules (numba's cache of kernel.py is keyed on kernel.py's text alone): start empty
        for old in glob.glob(os.path.join(self.build_lib, "loads", "__pycache__", "*.nb[ic]")):
            os.remove(old)
        t0 = time.perf_counter()
        print("dimfit: compiling the simulator into the package (15-60 s)", file=sys.stderr, flush=True)
        result = subprocess.run([sys.executable, "-c", _COMPILE, os.path.abspath(self.build_lib)], env=env,
                                cwd=self.build_lib, capture_output=True, text=True)
        if result.returncode != 0:
            last = (result.stderr.strip().splitlines() or ["no message"])[-1]
            print(f"dimfit: warning: the simulator was not compiled into the package ({last}); "
                  "it will compile on first use", file=sys.stderr, flush=True)
            return
        print(f"dimfit: compiled the simulator ({time.perf_counter() - t0:.0f} s)", file=sys.stderr, flush=True)


setup(cmdclass={"build_py": BuildPyCompiled})

"""Test-wide settings.

Under CI (``CI=true``) hypothesis runs derandomized, so a submission's test run is
repeatable: the same examples every time (engineering choice; locally it explores
freely and keeps its example database)."""
import os

from hypothesis import settings

# the ``ngspice_exe`` fixture (skip without ngspice; fail when CI=true), for every test
pytest_plugins = ("tests.ngspice",)

settings.register_profile("ci", derandomize=True, database=None)
if os.environ.get("CI", "").lower() == "true":
    settings.load_profile("ci")

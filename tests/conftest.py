"""Test-wide settings.

Under CI (``CI=true``) hypothesis runs derandomized, so a submission's test run is
repeatable: the same examples every time (engineering choice; locally it explores
freely and keeps its example database)."""
import os

from hypothesis import settings

settings.register_profile("ci", derandomize=True, database=None)
if os.environ.get("CI", "").lower() == "true":
    settings.load_profile("ci")

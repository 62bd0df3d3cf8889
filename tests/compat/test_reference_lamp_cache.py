"""The reference filament lamp's SVM curve kept on disk (compat.reference_lamp) is the
curve the simulation gives, and an edit to a module that shapes it is never served
from a stale file."""
import numpy as np
import pytest

from compat import reference_lamp as rl

# an uncommon voltage, so no other test's in-process cache entry is reused
V, F, P = 227.0, 50.0, 25.0


@pytest.fixture
def cache_dir(tmp_path, monkeypatch):
    monkeypatch.setattr(rl, "CACHE_DIR", tmp_path)
    rl.filament_svm_curve.cache_clear()
    yield tmp_path
    rl.filament_svm_curve.cache_clear()


@pytest.mark.regression
def test_disk_cache_returns_the_simulated_curve(cache_dir):
    # regression (our own output): the kept curve must equal a fresh simulation
    # bit for bit (rtol=0, atol=0: it is the same numbers written and read back)
    first = rl.filament_svm_curve(V, F, P)
    files = list(cache_dir.glob("reference_lamp-*.npy"))
    assert len(files) == 1 and ".tmp" not in files[0].name
    rl.filament_svm_curve.cache_clear()
    second = rl.filament_svm_curve(V, F, P)           # from the file
    fresh = rl.simulated_svm_curve(V, F, P)
    for a, b, c in zip(first, second, fresh):
        np.testing.assert_allclose(b, c, rtol=0, atol=0)
        np.testing.assert_allclose(a, c, rtol=0, atol=0)


@pytest.mark.regression
def test_stale_or_damaged_file_is_not_used(cache_dir, monkeypatch):
    rl.filament_svm_curve(V, F, P)
    path = rl._cache_file(V, F, P)
    # a file written under another source digest (an edited model) must not be read:
    # plant a wrong curve under the current name, then change the digest
    np.save(path, np.zeros((2, len(rl._ANGLES_DEG))))
    monkeypatch.setattr(rl, "_source_digest", lambda: "0123456789abcdef")
    rl.filament_svm_curve.cache_clear()
    light, svm = rl.filament_svm_curve(V, F, P)
    assert np.max(svm) > 0.1            # simulated again, not the planted zeros
    # a damaged file (wrong shape) is simulated over, not trusted
    np.save(rl._cache_file(V, F, P), np.zeros(3))
    rl.filament_svm_curve.cache_clear()
    light2, svm2 = rl.filament_svm_curve(V, F, P)
    np.testing.assert_allclose(svm2, svm, rtol=0, atol=0)   # same simulation, same numbers

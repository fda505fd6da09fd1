"""Test-session settings shared by every test file."""
import atexit
import os
import shutil
import tempfile

import pytest

# The suite writes its on-disk tables (selector/cache.py) to a directory of its own, so a
# test that patches a model can never leave a table in the user's cache directory.
os.environ["SELECTOR_CACHE_DIR"] = tempfile.mkdtemp(prefix="selector-test-cache-")
# removed when the session ends (a run writes up to about 2 GB of tables there; left behind,
# the directories of many runs filled the disk)
atexit.register(shutil.rmtree, os.environ["SELECTOR_CACHE_DIR"], ignore_errors=True)


def pytest_collection_modifyitems(config, items):
    """A test whose name says ``calibration`` carries the ``calibration`` marker too, so
    ``pytest -m calibration`` lists every in-sample check and ``-m "not calibration"`` the rest
    (pyproject.toml: markers)."""
    for item in items:
        if "calibration" in item.name and "calibration" not in item.keywords:
            item.add_marker(pytest.mark.calibration)

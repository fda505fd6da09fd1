"""Test-session settings shared by every test file."""
import os
import tempfile

# The suite writes its on-disk tables (selector/cache.py) to a directory of its own, so a
# test that patches a model can never leave a table in the user's cache directory.
os.environ["SELECTOR_CACHE_DIR"] = tempfile.mkdtemp(prefix="selector-test-cache-")

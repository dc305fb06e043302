"""Test-wide settings: the derivation cache lives in a fresh folder for each test session.

The suite must neither read stale entries from the user's cache folder nor fill it.
"""

from __future__ import annotations

import atexit
import os
import shutil
import tempfile

if "DUALIZE_CACHE_DIR" not in os.environ:
    _FOLDER = tempfile.mkdtemp(prefix="dualize-test-cache-")
    os.environ["DUALIZE_CACHE_DIR"] = _FOLDER
    atexit.register(shutil.rmtree, _FOLDER, ignore_errors=True)

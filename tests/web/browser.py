"""Find a real Chromium and its driver for the browser tests, or say loudly why there is none.

``.ci/run`` installs Debian's ``chromium`` and ``chromium-driver`` when they are missing and
sets ``CUTPLAN_NO_BROWSER=1`` only when they cannot be installed; on CI without that flag a
missing browser is a failure, not a skip.
"""

import os
import shutil
from pathlib import Path

CHROMIUM_NAMES = ("chromium", "chromium-browser", "google-chrome")
DRIVER_PLACES = ("chromedriver", "/usr/lib/chromium/chromedriver", "/usr/bin/chromedriver")
HEADLESS_FLAGS = ("--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
                  "--disable-background-networking", "--disable-component-update", "--disable-sync",
                  "--disable-dev-shm-usage", "--window-size=1400,1000")


def find_browser():
    """(chromium path, chromedriver path), or (None, reason)."""
    chromium = os.environ.get("CUTPLAN_CHROMIUM") or next(filter(None, map(shutil.which, CHROMIUM_NAMES)), None)
    driver = os.environ.get("CUTPLAN_CHROMEDRIVER") or next(
        (p for p in (shutil.which(d) or d for d in DRIVER_PLACES) if Path(p).is_file()), None)
    if not chromium or not Path(chromium).is_file():
        return None, "no Chromium found (apt-get install chromium)"
    if not driver:
        return None, "no chromedriver found (apt-get install chromium-driver)"
    return chromium, driver


def must_have_browser():
    """True on CI unless .ci/run said the browser could not be installed."""
    return bool(os.environ.get("CI")) and not os.environ.get("CUTPLAN_NO_BROWSER")


def skip_or_fail(reason):
    """Fail on CI (where .ci/run installs the browser), else skip loudly; never returns."""
    import pytest

    if must_have_browser():
        pytest.fail(f"REAL-BROWSER TESTS CANNOT RUN: {reason}; .ci/run should have installed Chromium")
    # tests/conftest.py repeats this reason in red in the terminal summary
    pytest.skip(f"REAL-BROWSER TESTS SKIPPED: {reason}; the page was NOT tested in a browser")

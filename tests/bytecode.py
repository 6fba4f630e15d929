"""Compile the run's bytecode once, in the pytest-xdist controller, for every worker to read.

Each worker imports every test module (assertion-rewritten by pytest) and, through the doctests,
every module of the package.  On a fresh checkout none of that is compiled yet, and the workers
start at the same moment, so each would compile all of it (about 3 CPU seconds a worker on this
suite, nearly half of collecting it).  When bytecode may be written (``.ci/run`` allows it for
the test run), the controller compiles it in a thread while the workers start up: the package's
modules as Python does (``compileall``) and the test modules as pytest's assertion rewriting
does, with pytest's own functions and cache file names, so a worker finds the rewritten module
already cached, exactly as on a second run.  A file a worker reaches first it compiles itself,
as it would anyway.  Nothing here changes what is tested or how an assertion failure reads.
"""

from __future__ import annotations

import compileall
import fnmatch
import sys
import threading
from pathlib import Path

from _pytest.assertion import rewrite

__all__ = ["start_warming", "rewritten_modules"]


def _patterns(config):
    """Names of the files whose asserts pytest rewrites: its test files and conftest.py files."""
    return (*config.getini("python_files"), "conftest.py")


def rewritten_modules(config, folder):
    """The files under ``folder`` whose asserts pytest rewrites, in the order the workers collect them."""
    patterns = _patterns(config)
    return sorted((p for p in Path(folder).rglob("*.py") if any(fnmatch.fnmatch(p.name, pat) for pat in patterns)),
                  key=lambda p: p.parts)


class _Rewritten:
    """``rx`` for compileall: leave out the files pytest rewrites (their plain bytecode is never read)."""

    def __init__(self, patterns):
        self.patterns = patterns

    def search(self, path):
        return any(fnmatch.fnmatch(Path(path).name, pat) for pat in self.patterns)


def _rewrite(config, path):
    """Cache ``path`` rewritten, as pytest's import hook would, unless a current cache is there."""
    pyc = rewrite.get_cache_dir(path) / (path.name[:-3] + rewrite.PYC_TAIL)
    if rewrite._read_pyc(path, pyc) is not None or not rewrite.try_makedirs(pyc.parent):
        return
    source_hash, code = rewrite._rewrite_test(path, config)
    rewrite._write_pyc(config.stash[rewrite.assertstate_key], code, source_hash, pyc)


def _warm(config, package, tests):
    try:
        compileall.compile_dir(str(package), quiet=2)
        for path in rewritten_modules(config, tests):
            _rewrite(config, path)
        compileall.compile_dir(str(tests), quiet=2, rx=_Rewritten(_patterns(config)))  # the tests' helpers
    except Exception:  # noqa: BLE001 - another pytest's internals: the workers then compile as they always did
        return


def start_warming(config, package, tests):
    """A started thread compiling ``package`` and ``tests`` (folders) for the workers, or None when
    this process may not write bytecode (``PYTHONDONTWRITEBYTECODE``) or runs no workers
    (or asserts are not rewritten: ``--assert=plain``)."""
    if (sys.dont_write_bytecode or not config.pluginmanager.hasplugin("dsession")
            or config.getoption("assertmode") != "rewrite"):
        return None
    thread = threading.Thread(target=_warm, args=(config, package, tests), name="warm-bytecode", daemon=True)
    thread.start()
    return thread

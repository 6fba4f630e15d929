"""The controller's warm-up (tests/bytecode.py) caches each test module exactly as pytest's own
import hook reads it: the oracle is pytest's reader of its cache (``_read_pyc``), which accepts
only a complete cache of the current source, and its rewriting (the asserts' ``@py_assert``
temporaries), which must be in the cached code."""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest
from _pytest.assertion import rewrite

from tests import bytecode

HERE = Path(__file__).resolve().parent

INTERNALS = ("_read_pyc", "_rewrite_test", "_write_pyc", "assertstate_key", "get_cache_dir", "PYC_TAIL",
             "try_makedirs")
"""The private names of pytest's assertion rewriter that the warm-up uses (pytest 7.4 to 9.2 have them)."""

# a pytest without them: the warm-up stands aside (tests/bytecode.py) and the workers compile as usual
pytestmark = pytest.mark.skipif(not all(hasattr(rewrite, name) for name in INTERNALS),
                                reason="this pytest's assertion rewriter has other internals; no warm-up")


def _names(code):
    out = set(code.co_names) | set(code.co_varnames)
    for const in code.co_consts:
        if hasattr(const, "co_names"):
            out |= _names(const)
    return out


def test_a_warmed_module_is_read_by_pytest_rewritten(pytestconfig, tmp_path):
    module = tmp_path / "test_sample.py"
    shutil.copyfile(Path(__file__), module)
    pyc = rewrite.get_cache_dir(module) / (module.name[:-3] + rewrite.PYC_TAIL)
    assert rewrite._read_pyc(module, pyc) is None  # nothing cached yet
    bytecode._warm(pytestconfig, tmp_path / "no-package", tmp_path)
    code = rewrite._read_pyc(module, pyc)
    assert code is not None and any(name.startswith("@py_assert") for name in _names(code))
    module.write_text(module.read_text(encoding="utf-8") + "\n# changed\n", encoding="utf-8")
    assert rewrite._read_pyc(module, pyc) is None  # a changed source is compiled afresh, as always


def test_the_warmed_modules_are_the_test_files_and_conftests(pytestconfig):
    found = {p.relative_to(HERE).as_posix() for p in bytecode.rewritten_modules(pytestconfig, HERE)}
    assert {"conftest.py", "test_bytecode.py", "web/conftest.py", "web/test_browser.py"} <= found
    assert not {"bytecode.py", "pdf_text.py", "web/browser.py"} & found  # helpers: plain bytecode

"""The package's Python files as syntax trees, parsed once per test process and shared by the
tests that read the source (:mod:`tests.test_imports`, :mod:`tests.test_one_home`): parsing
every module is the larger part of what those tests cost.  The trees are only read, never changed."""

from __future__ import annotations

import ast
import functools
from pathlib import Path

PACKAGE = Path(__file__).resolve().parent.parent / "cutplan"


@functools.cache
def tree(path: Path) -> ast.Module:
    """The syntax tree of the Python file ``path``, parsed once per test process."""
    return ast.parse(Path(path).read_text(encoding="utf-8"))

"""Read a design file's bytes safely and parse its TOML: every failure is one DesignError line.

The file is read by :func:`cutplan.folder.read_checked`: a regular file (a named pipe would block
forever, ``/dev/zero`` never ends) of at most :data:`MAX_FILE_BYTES`. A UTF-8 byte-order mark is
accepted.
"""

from __future__ import annotations

import tomllib
from pathlib import Path

from cutplan.design.contract import MAX_FILE_BYTES, DesignError, DesignErrors
from cutplan.folder import FileRefused, read_checked

__all__ = ["BOM", "read_bytes_checked", "parse_toml_text", "read_design_file"]

BOM = "\ufeff"


def _refuse(path, allowed):
    raise DesignErrors([DesignError(path, "(file)", None, allowed)])


def read_bytes_checked(path, limit=MAX_FILE_BYTES, what="a design file"):
    """The bytes of a regular file of at most ``limit`` bytes, or DesignErrors (one line)."""
    try:
        return read_checked(path, limit, what)
    except FileRefused as exc:
        _refuse(Path(path), exc.allowed)


def parse_toml_text(path, raw):
    """TOML from bytes: UTF-8 (with or without a byte-order mark), not empty, well formed."""
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError:
        _refuse(path, "is not UTF-8 text (is it a design file?)")
    if text.startswith(BOM):
        text = text[1:]
    if not text.strip():
        _refuse(path, "is empty; `cutplan new chime` writes a starter design")
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        _refuse(path, f"is not valid TOML ({str(exc).splitlines()[0]})")
    except RecursionError:
        _refuse(path, "is not a design: its brackets nest too deep")


def read_design_file(path):
    """Raw TOML of a design file, or DesignErrors with one line that says what is wrong."""
    return parse_toml_text(path, read_bytes_checked(path))

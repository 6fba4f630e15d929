"""Text a design or a command line hands us: printable, and safe as a file name.

Titles and set names end up in file names (templates, WAV previews), in SVG and PDF text, in CSV
cells and on the terminal. Control characters (escape codes, newlines), Unicode format
characters (right-to-left marks, zero-width joiners) and names a shell or file system treats
specially are refused here, once, so that no output has to guess.

>>> unprintable("porch\\x1b[31m")
'\\\\x1b'
>>> shown("bad\\x1b[2Jname")
'bad\\\\x1b[2Jname'
>>> unsafe_name("-rf")
'must not start with "-" or "."'
"""

from __future__ import annotations

import unicodedata

__all__ = ["escaped", "unprintable", "shown", "unsafe_name"]

_BAD_CATEGORIES = {"Cc", "Cf", "Cs", "Co", "Cn", "Zl", "Zp"}
_FILE_CHARS = '/\\<>:"|?*'
_RESERVED = {"con", "prn", "aux", "nul", *(f"com{i}" for i in range(1, 10)), *(f"lpt{i}" for i in range(1, 10))}


def _bad(ch):
    return unicodedata.category(ch) in _BAD_CATEGORIES


def escaped(ch):
    """A visible stand-in for one character: ``\\x1b``, ``\\u202e``."""
    code = ord(ch)
    return f"\\x{code:02x}" if code < 0x100 else f"\\u{code:04x}" if code < 0x10000 else f"\\U{code:08x}"


def unprintable(text):
    """The first control or format character of ``text``, escaped, or None when there is none."""
    for ch in text:
        if _bad(ch):
            return escaped(ch)
    return None


def shown(text):
    """``text`` with every control or format character escaped: safe to print on a terminal."""
    text = str(text)
    if not any(_bad(ch) for ch in text):
        return text
    return "".join(escaped(ch) if _bad(ch) else ch for ch in text)


def unsafe_name(name):
    """Why ``name`` cannot be part of a file name, or None when it can."""
    if any(c in name for c in _FILE_CHARS):
        return 'must not contain / \\ < > : " | ? *'
    if name[:1] in ("-", "."):
        return 'must not start with "-" or "."'
    if name[-1:] in (" ", "."):
        return "must not end with a space or a dot"
    if name.split(".")[0].strip().lower() in _RESERVED:
        return "is a reserved device name on some systems"
    return None

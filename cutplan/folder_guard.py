"""What a run may replace in an output folder, one run at a time (the guard of :mod:`cutplan.folder`).

:func:`inspect` walks an existing folder without following symbolic links and sorts what it
holds into cutplan's own files and the user's things, or gives the one-line reason the folder
must not be replaced: a file system mounted inside it, a special file (pipe, socket, device), a
user's file or link where cutplan would write, or, in a folder cutplan did not write (no
manifest), anything but plain files cutplan would write.  :func:`locked` holds a lock file
beside the folder while a run writes it; :func:`remove_tree` deletes a temporary folder without
following links or crossing into another file system.
"""

from __future__ import annotations

import contextlib
import json
import os
import stat
import time
from pathlib import Path

__all__ = [
    "MANIFEST", "LOCK_WAIT", "read_manifest", "Contents", "inspect", "pid_alive", "remove_tree", "locked"
]

MANIFEST = ".cutplan-files.json"
"""Name of the manifest inside a written folder."""
LOCK_WAIT = 120.0
"""Seconds a run waits for another run writing the same folder before it gives up [s]."""


def read_manifest(folder):
    """Relative names cutplan wrote into ``folder`` last time, or None when it has no manifest."""
    try:
        data = json.loads((Path(folder) / MANIFEST).read_text(encoding="utf-8"))
        if not isinstance(data, dict) or data.get("written_by") != "cutplan":
            return None
        return {str(n) for n in data.get("files", []) if isinstance(n, str)}
    except (OSError, ValueError, AttributeError):
        return None


class Contents:
    """An existing folder sorted: the user's folders (mode), links (target) and files to keep."""

    def __init__(self):
        self.dirs, self.links, self.files = {}, {}, []


def inspect(target, new_names):
    """Sort the folder ``target`` (a real folder) for a forced replacement by ``new_names``.

    Returns (:class:`Contents` to keep, None) or (None, the one-line reason to refuse).
    """
    target = Path(target)
    ours = read_manifest(target)
    listed = ours is not None
    ours = (ours or set()) | {MANIFEST}
    needed_dirs = {str(Path(*Path(n).parts[:k])) for n in new_names for k in range(1, len(Path(n).parts))}
    device = os.lstat(target).st_dev
    keep = Contents()
    for root, dirs, files in os.walk(target, followlinks=False):
        for name in sorted(dirs) + sorted(files):
            full = os.path.join(root, name)
            rel = os.path.relpath(full, target)
            st = os.lstat(full)
            if stat.S_ISDIR(st.st_mode):
                if st.st_dev != device or os.path.ismount(full):
                    return None, f"{full}: another file system is mounted here; cutplan will not replace its folder"
                if not listed and rel not in needed_dirs:
                    return None, _not_ours(target, rel)
                keep.dirs[rel] = stat.S_IMODE(st.st_mode)
            elif stat.S_ISLNK(st.st_mode):
                if not listed or rel in new_names or rel in needed_dirs:
                    return None, _not_ours(target, rel)
                keep.links[rel] = os.readlink(full)
            elif stat.S_ISREG(st.st_mode):
                if rel in ours or (not listed and rel in new_names):
                    continue
                if not listed or rel in new_names or rel in needed_dirs:
                    return None, _not_ours(target, rel)
                keep.files.append(rel)
            else:
                return None, f"{full}: a special file (pipe, socket or device); cutplan will not replace its folder"
        dirs[:] = [d for d in dirs if os.path.isdir(os.path.join(root, d))
                   and not os.path.islink(os.path.join(root, d))]
    return keep, None


def _not_ours(target, rel):
    return (f"{target}: holds {rel}, which cutplan did not write; --force replaces only a packet "
            "cutplan wrote (or plain files of its own), so give an empty or new folder")


def pid_alive(pid):
    """Whether process ``pid`` runs on this machine (a temporary's owner)."""
    if pid <= 0:
        return False
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except OSError:
        return True
    return True


def remove_tree(path):
    """Delete the folder ``path``: links are removed, never followed; another file system mounted
    inside is left alone (its mount point stays)."""
    path = Path(path)
    try:
        top = os.lstat(path)
    except FileNotFoundError:
        return
    if not stat.S_ISDIR(top.st_mode):
        path.unlink(missing_ok=True)
        return
    for root, dirs, files in os.walk(path, topdown=False, followlinks=False):
        for name in files + dirs:
            full = os.path.join(root, name)
            with contextlib.suppress(OSError):
                st = os.lstat(full)
                if stat.S_ISDIR(st.st_mode):
                    if st.st_dev == top.st_dev and not os.path.ismount(full):
                        os.rmdir(full)
                else:
                    os.unlink(full)
    with contextlib.suppress(OSError):
        os.rmdir(path)


@contextlib.contextmanager
def locked(parent, name, wait=None):
    """Hold the lock file ``.NAME.cutplan-lock`` in ``parent`` while the block runs.

    A second run waits up to ``wait`` seconds, then stops with OSError (EBUSY).  The file is
    removed on release; a waiter that locked a removed file tries again.
    """
    try:
        import fcntl
    except ImportError:  # no advisory locks here: runs are not serialised
        yield
        return
    path = Path(parent) / f".{name}.cutplan-lock"
    give_up = time.monotonic() + (LOCK_WAIT if wait is None else wait)
    while True:
        fd = os.open(path, os.O_RDWR | os.O_CREAT, 0o600)
        try:
            while True:
                try:
                    fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
                    break
                except BlockingIOError:
                    if time.monotonic() > give_up:
                        raise OSError(16, "another cutplan run is writing this folder; try again when it ends") from None
                    time.sleep(0.05)
            try:
                same = os.fstat(fd).st_ino == os.stat(path).st_ino
            except FileNotFoundError:
                same = False
            if same:
                break
        except BaseException:
            os.close(fd)
            raise
        os.close(fd)
    try:
        yield
    finally:
        with contextlib.suppress(OSError):
            os.unlink(path)
        os.close(fd)

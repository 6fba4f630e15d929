"""Write an output folder whole: all of this run's files, or the previous folder untouched.

The files go into a hidden temporary folder beside the target, which is then swapped in with
one rename (an atomic exchange where the system offers it). So an interrupted run leaves the
previous packet as it was, and a reader never sees a folder mixing two runs.

A small manifest (:data:`MANIFEST`) lists what cutplan wrote. With ``force``, a later run
replaces exactly those files, including any it no longer writes (a 5-chime plan re-planned as 3
chimes loses the two old templates), and keeps every other file, which is the user's own.
Files are created with the usual permissions (0666 less the umask), like any other program's.
A full disk or read-only folder becomes one :class:`FolderError` line.
"""

from __future__ import annotations

import ctypes
import ctypes.util
import errno
import json
import os
import shutil
import tempfile
from pathlib import Path

MANIFEST = ".cutplan-files.json"
"""Name of the manifest inside a written folder."""
_TEMP_TAG = ".cutplan-"
_RENAME_EXCHANGE = 2


class FolderError(OSError):
    """The folder cannot be written; str() is one line naming it and saying why."""


def _umask():
    mask = os.umask(0o022)
    os.umask(mask)
    return mask


def _why(exc):
    reasons = {errno.ENOSPC: "the disk is full", errno.EROFS: "the file system is read-only",
               errno.EACCES: "permission denied", errno.EPERM: "permission denied",
               errno.EDQUOT: "the disk quota is exceeded"}
    return reasons.get(exc.errno, exc.strerror or str(exc))


def _exchange(a, b):
    """Swap two paths atomically (Linux renameat2); False where the system cannot."""
    try:
        libc = ctypes.CDLL(ctypes.util.find_library("c") or None, use_errno=True)
        fn = libc.renameat2
    except (OSError, AttributeError):
        return False
    at_fdcwd = -100
    if fn(at_fdcwd, os.fsencode(a), at_fdcwd, os.fsencode(b), _RENAME_EXCHANGE) == 0:
        return True
    err = ctypes.get_errno()
    if err in (errno.ENOSYS, errno.EINVAL, errno.ENOTSUP):
        return False
    raise OSError(err, os.strerror(err), str(b))


def read_manifest(folder):
    """Relative names cutplan wrote into ``folder`` last time (empty if none recorded)."""
    try:
        data = json.loads((Path(folder) / MANIFEST).read_text(encoding="utf-8"))
        return {str(n) for n in data.get("files", []) if isinstance(n, str)}
    except (OSError, ValueError, AttributeError):
        return set()


def _existing_files(folder):
    out = []
    for root, _dirs, files in os.walk(folder):
        for name in files:
            out.append(os.path.relpath(os.path.join(root, name), folder))
    return out


def _safe_relative(name):
    path = Path(name)
    if path.is_absolute() or ".." in path.parts or not path.parts:
        raise ValueError(f"not a relative file name inside the folder: {name!r}")
    return path


def write_bytes(path, payload):
    """Create ``path`` with ``payload`` (mode 0666 less the umask); the writer every file goes through."""
    with open(path, "xb") as fh:
        fh.write(payload)
        fh.flush()
        os.fsync(fh.fileno())


def _clean_stale(target):
    """Remove temporary folders an interrupted earlier run left beside ``target``."""
    for old in target.parent.glob(f".{target.name}{_TEMP_TAG}*"):
        shutil.rmtree(old, ignore_errors=True)


def check_target(target, force):
    """None when ``target`` may be written, else the one-line reason it may not."""
    target = Path(target)
    if target.exists() and not target.is_dir():
        return f"{target}: the output must be a folder, and this is a file"
    here, full = Path.cwd().resolve(), target.resolve()
    if full == here or full in here.parents:
        return (f"{target}: the output folder holds the current folder; give a folder of its own, "
                "such as -o packet, so that it can be swapped in whole")
    if target.is_dir() and not force and any(p.name != MANIFEST for p in target.iterdir()):
        return f"{target}: the folder is not empty; use --force to replace what cutplan wrote there"
    return None


def write_folder(target, files, force=False):
    """Write ``files`` ({relative name: bytes or text}) as the folder ``target``, whole.

    Returns the list of names written. Raises :class:`FolderError` (one line) when the folder
    cannot be written; the previous folder is then left exactly as it was.
    """
    problem = check_target(target, force)
    if problem:
        raise FolderError(problem)
    shown_target, target = target, Path(target).resolve()
    names = {str(_safe_relative(n)): d for n, d in files.items()}
    parent = target.parent
    tmp = None
    try:
        parent.mkdir(parents=True, exist_ok=True)
        _clean_stale(target)
        tmp = Path(tempfile.mkdtemp(prefix=f".{target.name}{_TEMP_TAG}", dir=parent))
        os.chmod(tmp, (os.stat(target).st_mode & 0o7777) if target.is_dir() else 0o777 & ~_umask())
        if target.is_dir():
            _keep_user_files(target, tmp, set(names))
        for name, data in names.items():
            dest = tmp / name
            dest.parent.mkdir(parents=True, exist_ok=True)
            write_bytes(dest, data.encode("utf-8") if isinstance(data, str) else bytes(data))
        manifest = json.dumps({"written_by": "cutplan", "files": sorted(names)}, indent=1) + "\n"
        write_bytes(tmp / MANIFEST, manifest.encode("utf-8"))
        _swap_in(tmp, target)
        tmp = None
    except OSError as exc:
        raise FolderError(f"{shown_target}: cannot write the folder ({_why(exc)}); nothing was changed") from None
    finally:
        if tmp is not None:
            shutil.rmtree(tmp, ignore_errors=True)
    return sorted(names)


def _keep_user_files(target, tmp, new_names):
    """Hard-link (or copy) into ``tmp`` every file of ``target`` that cutplan did not write."""
    ours = read_manifest(target) | {MANIFEST}
    if not (target / MANIFEST).exists():
        ours |= new_names  # a folder from before manifests: only same-named files are ours
    for rel in _existing_files(target):
        if rel in ours or rel in new_names:
            continue
        src, dest = target / rel, tmp / rel
        dest.parent.mkdir(parents=True, exist_ok=True)
        try:
            os.link(src, dest, follow_symlinks=False)
        except OSError:
            shutil.copy2(src, dest)


def _swap_in(tmp, target):
    if not target.exists():
        os.rename(tmp, target)
        return
    if _exchange(tmp, target):
        shutil.rmtree(tmp, ignore_errors=True)  # tmp now holds the previous folder
        return
    old = Path(tempfile.mkdtemp(prefix=f".{target.name}{_TEMP_TAG}old-", dir=target.parent))
    os.rmdir(old)
    os.rename(target, old)
    os.rename(tmp, target)
    shutil.rmtree(old, ignore_errors=True)


def write_file_whole(path, data, force=False):
    """One file written completely or not at all (temporary file beside it, then rename),
    with the usual permissions. Raises :class:`FolderError` (one line)."""
    path = Path(path)
    if path.exists() and not force:
        raise FolderError(f"{path}: already exists; use --force to overwrite it")
    if path.is_dir():
        raise FolderError(f"{path}: is a folder; give a file name")
    payload = data.encode("utf-8") if isinstance(data, str) else bytes(data)
    tmp = None
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        fd, tmp = tempfile.mkstemp(prefix=f".{path.name}{_TEMP_TAG}", dir=path.parent)
        os.close(fd)
        os.unlink(tmp)
        write_bytes(tmp, payload)
        os.replace(tmp, path)
        tmp = None
    except OSError as exc:
        raise FolderError(f"{path}: cannot write the file ({_why(exc)}); nothing was changed") from None
    finally:
        if tmp is not None:
            Path(tmp).unlink(missing_ok=True)

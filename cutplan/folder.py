"""Write an output folder whole: all of this run's files, or the previous folder untouched.

The files go into a hidden temporary folder beside the target, which is then swapped in with
one rename (an atomic exchange where the system offers it). So an interrupted run leaves the
previous packet as it was, and a reader never sees a folder mixing two runs.

A small manifest (:data:`MANIFEST`) lists what cutplan wrote. With ``force``, a later run
replaces exactly those files, including any it no longer writes (a 5-chime plan re-planned as 3
chimes loses the two old templates), and keeps every other thing, which is the user's own:
files (hard-linked: contents, modes and owners stay), folders with their modes, empty folders
and symbolic links (kept as links, never followed).  What may be replaced, and what is refused
with one line, is decided by :mod:`cutplan.folder_guard`; so is the lock that lets one run at a
time write a folder.  A run clears only temporaries whose run is no longer alive; where the
system has no atomic exchange, a previous folder set aside by a run that died is put back.
Files are created with the usual permissions (0666 less the umask), like any other program's.
A full disk or read-only folder becomes one :class:`FolderError` line.

Input files (a design, a material table) are read whole the same careful way, by
:func:`read_checked`: a regular file of bounded size, or one :class:`FileRefused` line.
"""

from __future__ import annotations

import ctypes
import ctypes.util
import errno
import json
import os
import shutil
import stat
import tempfile
from pathlib import Path

from cutplan import folder_guard
from cutplan.folder_guard import MANIFEST, inspect, locked, pid_alive, remove_tree

__all__ = ["FolderError", "FileRefused", "read_checked", "read_manifest", "write_bytes", "check_target", "write_folder",
           "write_file_whole"]

_TEMP_TAG = ".cutplan-"
_RENAME_EXCHANGE = 2


class FolderError(OSError):
    """The folder cannot be written; str() is one line naming it and saying why."""


class FileRefused(ValueError):
    """An input file that cannot be read as one: ``allowed`` says why, in the words of an error line."""

    def __init__(self, path, allowed):
        super().__init__(f"{path}: {allowed}")
        self.path, self.allowed = path, allowed


def read_checked(path, limit, what):
    """The bytes of a regular file of at most ``limit`` bytes (``what`` it should be, e.g. "a design
    file"), or :class:`FileRefused`. Checked before it is read (a named pipe would block forever,
    ``/dev/zero`` never ends); then at most that many bytes are read, whatever the file does meanwhile."""
    path = Path(path)
    try:
        info = os.stat(path)
    except FileNotFoundError:
        raise FileRefused(path, "does not exist") from None
    except OSError as exc:
        raise FileRefused(path, f"cannot be read ({exc.strerror})") from None
    if stat.S_ISDIR(info.st_mode):
        raise FileRefused(path, f"is a folder, not {what}")
    if not stat.S_ISREG(info.st_mode):
        raise FileRefused(path, f"is not a regular file (a pipe or device?); give {what}")
    if info.st_size > limit:
        raise FileRefused(path, f"is over {limit} bytes; {what} is a few kB")
    try:
        with open(path, "rb") as fh:
            raw = fh.read(limit + 1)
    except OSError as exc:
        raise FileRefused(path, f"cannot be read ({exc.strerror})") from None
    if len(raw) > limit:
        raise FileRefused(path, f"is over {limit} bytes; {what} is a few kB")
    return raw


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
    return folder_guard.read_manifest(folder) or set()


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


def _temp_owner(path, target):
    """Process id in a temporary's name (``.NAME.cutplan-[old-]PID-xxxx``), or 0 for an older name."""
    rest = path.name[len(f".{target.name}{_TEMP_TAG}"):]
    if rest.startswith("old-"):
        rest = rest[4:]
    head = rest.split("-", 1)[0]
    return int(head) if head.isdigit() else 0


def _recover(target):
    """Put back a previous folder that a run which died set aside; clear dead runs' temporaries.

    Called under the folder's lock.  A set-aside folder (``old-``) is the only copy of the user's
    files when the target is missing, so it is renamed back, never deleted.
    """
    leftovers = [p for p in sorted(target.parent.glob(f".{target.name}{_TEMP_TAG}*"))
                 if not p.name.endswith("lock") and not pid_alive(_temp_owner(p, target))]
    for old in [p for p in leftovers if p.name.startswith(f".{target.name}{_TEMP_TAG}old-")]:
        if not os.path.lexists(target):
            os.rename(old, target)
            leftovers.remove(old)
    for old in leftovers:
        if old.name.startswith(f".{target.name}{_TEMP_TAG}old-") and not _kept_in(old, target):
            continue  # it may hold the only copy of a user's file: leave it
        remove_tree(old)


def _kept_in(old, target):
    """Whether every user file of the set-aside folder ``old`` is the same file in ``target``."""
    ours = read_manifest(old) | {MANIFEST}
    for root, _dirs, names in os.walk(old, followlinks=False):
        for name in names:
            full = os.path.join(root, name)
            rel = os.path.relpath(full, old)
            if rel in ours or not os.path.isfile(full) or os.path.islink(full):
                continue
            try:
                if not os.path.samefile(full, target / rel):
                    return False
            except OSError:
                return False
    return True


def _pid_prefix(target, old=False):
    return f".{target.name}{_TEMP_TAG}{'old-' if old else ''}{os.getpid()}-"


def check_target(target, force, new_names=None):
    """None when ``target`` may be written, else the one-line reason it may not.

    ``new_names`` (the files a run will write), when given, also settles whether a forced run
    may replace what is there (see :func:`cutplan.folder_guard.inspect`).
    """
    target = Path(target)
    if target.is_symlink():
        return f"{target}: is a symbolic link; give the folder itself"
    if target.exists() and not target.is_dir():
        return f"{target}: the output must be a folder, and this is a file"
    here, full = Path.cwd().resolve(), target.resolve()
    if full == here or full in here.parents:
        return (f"{target}: the output folder holds the current folder; give a folder of its own, "
                "such as -o packet, so that it can be swapped in whole")
    if not target.is_dir():
        return None
    if not force and any(p.name != MANIFEST for p in target.iterdir()):
        return f"{target}: the folder is not empty; use --force to replace what cutplan wrote there"
    if os.path.ismount(target):
        return f"{target}: a file system is mounted here; give a folder inside it"
    if new_names is not None:
        return inspect(target, set(new_names))[1]
    return None


def write_folder(target, files, force=False):
    """Write ``files`` ({relative name: bytes or text}) as the folder ``target``, whole.

    Returns the list of names written. Raises :class:`FolderError` (one line) when the folder
    cannot be written; the previous folder is then left exactly as it was.
    """
    names = {str(_safe_relative(n)): d for n, d in files.items()}
    problem = check_target(target, force)
    if problem:
        raise FolderError(problem)
    shown_target, target = target, Path(os.path.abspath(target))
    parent = target.parent
    tmp = None
    try:
        parent.mkdir(parents=True, exist_ok=True)
        with locked(parent, target.name):
            _recover(target)
            problem = check_target(target, force, names)
            if problem:
                raise FolderError(problem)
            tmp = Path(tempfile.mkdtemp(prefix=_pid_prefix(target), dir=parent))
            keep = None
            if target.is_dir():
                keep, problem = inspect(target, set(names))
                if problem:
                    raise FolderError(problem)
                _keep_user_things(target, tmp, keep)
            for name, data in names.items():
                dest = tmp / name
                dest.parent.mkdir(parents=True, exist_ok=True)
                write_bytes(dest, data.encode("utf-8") if isinstance(data, str) else bytes(data))
            manifest = json.dumps({"written_by": "cutplan", "files": sorted(names)}, indent=1) + "\n"
            write_bytes(tmp / MANIFEST, manifest.encode("utf-8"))
            for rel, mode in sorted((keep.dirs if keep else {}).items(), key=lambda kv: -len(kv[0])):
                os.chmod(tmp / rel, mode)
            os.chmod(tmp, stat.S_IMODE(os.stat(target).st_mode) if target.is_dir() else 0o777 & ~_umask())
            _swap_in(tmp, target)
            tmp = None
    except FolderError:
        raise
    except OSError as exc:
        raise FolderError(f"{shown_target}: cannot write the folder ({_why(exc)}); nothing was changed") from None
    finally:
        if tmp is not None:
            remove_tree(tmp)
    return sorted(names)


def _keep_user_things(target, tmp, keep):
    """Recreate in ``tmp`` the user's folders and links; hard-link (or copy) the user's files."""
    for rel in sorted(keep.dirs):
        (tmp / rel).mkdir(parents=True, exist_ok=True)
    for rel, link in keep.links.items():
        os.symlink(link, tmp / rel)
    for rel in keep.files:
        src, dest = target / rel, tmp / rel
        dest.parent.mkdir(parents=True, exist_ok=True)
        try:
            os.link(src, dest, follow_symlinks=False)
        except OSError:
            shutil.copy2(src, dest, follow_symlinks=False)


def _swap_in(tmp, target):
    if not os.path.lexists(target):
        os.rename(tmp, target)
        return
    if _exchange(tmp, target):
        remove_tree(tmp)  # tmp now holds the previous folder; the user's files are linked in the new
        return
    # no atomic exchange: set the old folder aside, rename the new one in, put the old back on failure
    old = Path(tempfile.mkdtemp(prefix=_pid_prefix(target, old=True), dir=target.parent))
    os.rmdir(old)
    os.rename(target, old)
    try:
        os.rename(tmp, target)
    except BaseException:
        os.rename(old, target)
        raise
    remove_tree(old)


def write_file_whole(path, data, force=False):
    """One file written completely or not at all (temporary file beside it, then rename),
    with the usual permissions, or the replaced file's own. Raises :class:`FolderError` (one line)."""
    path = Path(path)
    if path.exists() and not force:
        raise FolderError(f"{path}: already exists; use --force to overwrite it")
    if path.is_dir():
        raise FolderError(f"{path}: is a folder; give a file name")
    payload = data.encode("utf-8") if isinstance(data, str) else bytes(data)
    tmp = None
    made = [q for q in [path.parent, *path.parent.parents] if not os.path.lexists(q)]  # folders this call creates
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        fd, tmp = tempfile.mkstemp(prefix=f".{path.name}{_TEMP_TAG}", dir=path.parent)
        os.close(fd)
        os.unlink(tmp)
        write_bytes(tmp, payload)
        if path.is_file() and not path.is_symlink():
            os.chmod(tmp, stat.S_IMODE(os.stat(path).st_mode))  # a private 0600 file stays private
        os.replace(tmp, path)
        tmp = None
    except OSError as exc:
        if tmp is not None:
            Path(tmp).unlink(missing_ok=True)
            tmp = None
        for folder in made:  # innermost first: leave no empty folder behind
            try:
                os.rmdir(folder)
            except OSError:
                break
        raise FolderError(f"{path}: cannot write the file ({_why(exc)}); nothing was changed") from None
    finally:
        if tmp is not None:
            Path(tmp).unlink(missing_ok=True)

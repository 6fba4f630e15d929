"""`--force` never destroys what cutplan did not write; one run at a time writes a folder; a run
that died between the two renames of the non-atomic replacement loses nothing.

Every check compares the folder before and after (names, bytes, modes, link targets, empty
folders): the oracle is the user's own folder as the test made it.  Scenarios are our own demos
(garden chimes)."""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
import textwrap
from pathlib import Path

import pytest
from click.testing import CliRunner

from cutplan import folder, folder_guard
from cutplan.cli import cli

CHIMES = '''title = "Garden chimes"
[[set]]
name = "garden"
kind = "chime"
notes = {notes}
section = {{ stock = "al-1.000x0.065" }}
[stock]
lengths = [{{ length = "8 ft", count = 3 }}]
'''
ROOT = Path(__file__).resolve().parents[1]


def _design(where, notes=("D5", "E5", "F#5")):
    path = Path(where) / "garden.toml"
    path.write_text(CHIMES.format(notes=list(notes)).replace("'", '"'), encoding="utf-8")
    return path


def _run(*args):
    return CliRunner().invoke(cli, [str(a) for a in args])


def _state(root):
    """Everything a user could lose: each entry's kind, mode, bytes or link target."""
    out = {}
    for dirpath, dirs, files in os.walk(root, followlinks=False):
        for name in dirs + files:
            full = os.path.join(dirpath, name)
            rel = os.path.relpath(full, root)
            st = os.lstat(full)
            if os.path.islink(full):
                out[rel] = ("link", os.readlink(full))
            elif os.path.isdir(full):
                out[rel] = ("dir", st.st_mode & 0o7777)
            else:
                out[rel] = ("file", st.st_mode & 0o7777, Path(full).read_bytes(), st.st_ino)
    return out


def _home_like(tmp_path):
    home = tmp_path / "home"
    (home / "empty").mkdir(parents=True)
    (home / "private").mkdir()
    (home / "private" / "key.txt").write_text("mine")
    os.chmod(home / "private", 0o700)
    (home / "plan.csv").write_text("my own spreadsheet\n")
    elsewhere = tmp_path / "elsewhere"
    elsewhere.mkdir()
    (elsewhere / "photo.txt").write_text("not to be touched")
    (home / "pictures").symlink_to(elsewhere)
    return home, elsewhere


def _one_error_line(result):
    assert result.exit_code == 2, result.output
    lines = [ln for ln in result.output.splitlines() if ln.strip()]
    assert len(lines) == 1 and lines[0].startswith("error: ") and "Traceback" not in result.output
    return lines[0]


def test_force_over_a_folder_of_the_users_own_things_refuses_and_changes_nothing(tmp_path):
    home, elsewhere = _home_like(tmp_path)
    before, outside = _state(home), _state(elsewhere)
    line = _one_error_line(_run("plan", _design(tmp_path), "-o", home, "--force"))
    assert "did not write" in line
    assert _state(home) == before and _state(elsewhere) == outside
    assert (home.stat().st_mode & 0o777) == (tmp_path / "home").stat().st_mode & 0o777


def test_force_into_the_designs_own_folder_is_refused(tmp_path):
    design = _design(tmp_path)
    before = _state(tmp_path)
    _one_error_line(_run("plan", design, "-o", tmp_path, "--force"))
    assert _state(tmp_path) == before


def test_force_over_a_packet_keeps_the_users_folders_links_files_and_modes(tmp_path):
    out = tmp_path / "packet"
    assert _run("plan", _design(tmp_path), "-o", out).exit_code == 0
    (out / "empty").mkdir()
    (out / "private").mkdir()
    (out / "private" / "notes.txt").write_text("tube from the yard")
    os.chmod(out / "private", 0o700)
    (out / "secret.txt").write_text("s")
    os.chmod(out / "secret.txt", 0o600)
    (tmp_path / "elsewhere").mkdir()
    (tmp_path / "elsewhere" / "keep.txt").write_text("k")
    (out / "shop").symlink_to(tmp_path / "elsewhere")
    os.chmod(out, 0o750)
    mine = {k: v for k, v in _state(out).items() if k.split(os.sep)[0] in {"empty", "private", "secret.txt", "shop"}}
    assert _run("plan", _design(tmp_path, ("C5", "G5")), "-o", out, "--force").exit_code == 0
    after = _state(out)
    assert {k: after.get(k) for k in mine} == mine  # same bytes, modes, link targets and inodes
    assert out.stat().st_mode & 0o777 == 0o750
    assert (tmp_path / "elsewhere" / "keep.txt").read_text() == "k"
    assert "C5" in (out / "plan.csv").read_text()


def test_a_users_link_where_cutplan_writes_a_file_is_refused(tmp_path):
    out = tmp_path / "packet"
    assert _run("plan", _design(tmp_path), "-o", out).exit_code == 0
    (out / "plan.csv").unlink()
    (tmp_path / "mine.csv").write_text("mine")
    (out / "plan.csv").symlink_to(tmp_path / "mine.csv")
    before = _state(out)
    _one_error_line(_run("plan", _design(tmp_path), "-o", out, "--force"))
    assert _state(out) == before and (tmp_path / "mine.csv").read_text() == "mine"


def test_an_output_given_as_a_symbolic_link_is_refused(tmp_path):
    real = tmp_path / "real"
    real.mkdir()
    (tmp_path / "link").symlink_to(real)
    line = _one_error_line(_run("plan", _design(tmp_path), "-o", tmp_path / "link", "--force"))
    assert "symbolic link" in line and list(real.iterdir()) == []


def _mount_tmpfs(where):
    if sys.platform != "linux" or os.geteuid() != 0 or shutil.which("mount") is None:
        pytest.skip("mounting a file system needs root on Linux (CI runs as root)")
    done = subprocess.run(["mount", "-t", "tmpfs", "-o", "size=1m", "tmpfs", str(where)],
                          capture_output=True, timeout=20)
    if done.returncode != 0:
        pytest.skip(f"this machine does not allow a tmpfs mount here: {done.stderr.decode(errors='replace').strip()}")


def test_a_file_system_mounted_inside_the_packet_is_never_crossed(tmp_path):
    out = tmp_path / "packet"
    assert _run("plan", _design(tmp_path), "-o", out).exit_code == 0
    (out / "stick").mkdir()
    _mount_tmpfs(out / "stick")
    try:
        (out / "stick" / "on-the-device.txt").write_text("only copy")
        before = _state(out)
        line = _one_error_line(_run("plan", _design(tmp_path), "-o", out, "--force"))
        assert "mounted" in line
        assert _state(out) == before
        assert (out / "stick" / "on-the-device.txt").read_text() == "only copy"
    finally:
        subprocess.run(["umount", str(out / "stick")], capture_output=True, timeout=20)


def test_a_private_file_replaced_with_force_stays_private(tmp_path):
    path = tmp_path / "al.toml"
    path.write_text("x = 1\n")
    os.chmod(path, 0o600)
    folder.write_file_whole(path, "x = 2\n", force=True)
    assert path.read_text() == "x = 2\n" and path.stat().st_mode & 0o777 == 0o600


def test_a_folder_set_aside_by_a_run_that_died_is_put_back_not_deleted(tmp_path):
    out = tmp_path / "packet"
    assert _run("plan", _design(tmp_path), "-o", out).exit_code == 0
    (out / "mine.txt").write_text("only copy")
    # a run on a system without atomic exchange was killed between its two renames
    os.rename(out, tmp_path / ".packet.cutplan-old-999999999-abcd")
    (tmp_path / ".packet.cutplan-999999999-efgh").mkdir()
    assert _run("plan", _design(tmp_path, ("C5",)), "-o", out, "--force").exit_code == 0
    assert (out / "mine.txt").read_text() == "only copy" and "C5" in (out / "plan.csv").read_text()
    assert sorted(p.name for p in tmp_path.iterdir() if p.name.startswith(".packet")) == []


def test_without_atomic_exchange_a_failing_second_rename_restores_the_old_folder(tmp_path, monkeypatch):
    out = tmp_path / "packet"
    assert _run("plan", _design(tmp_path), "-o", out).exit_code == 0
    (out / "mine.txt").write_text("only copy")
    before = _state(out)
    monkeypatch.setattr(folder, "_exchange", lambda a, b: False)
    real, calls = os.rename, []

    def rename(a, b):
        calls.append(b)
        if len(calls) == 2:
            raise OSError(5, "Input/output error")
        real(a, b)

    monkeypatch.setattr(folder.os, "rename", rename)
    with pytest.raises(folder.FolderError):
        folder.write_folder(out, {"plan.csv": "new"}, force=True)
    monkeypatch.setattr(folder.os, "rename", real)
    assert {k: v[:3] for k, v in _state(out).items()} == {k: v[:3] for k, v in before.items()}


def test_a_live_runs_temporaries_are_left_alone(tmp_path):
    sleeper = subprocess.Popen([sys.executable, "-c", "import time; time.sleep(30)"])
    try:
        theirs = tmp_path / f".packet.cutplan-{sleeper.pid}-abcd"
        theirs.mkdir()
        (theirs / "plan.csv").write_text("being written")
        assert _run("plan", _design(tmp_path), "-o", tmp_path / "packet").exit_code == 0
        assert (theirs / "plan.csv").read_text() == "being written"
    finally:
        sleeper.kill()
        sleeper.wait(timeout=20)


def test_a_second_run_waits_for_the_lock_and_gives_up_with_one_line(tmp_path, monkeypatch):
    monkeypatch.setattr(folder_guard, "LOCK_WAIT", 0.3)
    with folder_guard.locked(tmp_path, "packet"):
        with pytest.raises(folder.FolderError, match="another cutplan run"):
            folder.write_folder(tmp_path / "packet", {"plan.csv": "x"})
    assert not (tmp_path / "packet").exists()
    folder.write_folder(tmp_path / "packet", {"plan.csv": "x"})
    assert not [p for p in tmp_path.iterdir() if p.name.startswith(".packet")]


WRITER = textwrap.dedent('''
    import sys
    from pathlib import Path
    from cutplan.folder import write_folder
    out, tag = Path(sys.argv[1]), sys.argv[2]
    for k in range(20):
        files = {"plan.csv": f"{tag} {k}", f"templates/{tag}-{k % 3}.svg": tag}
        write_folder(out, files, force=True)
        assert (out / "mine.txt").read_text() == "only copy", "the user's file is gone"
        text = (out / "plan.csv").read_text().split()
        assert sorted(p.name for p in (out / "templates").iterdir()) == [f"{text[0]}-{int(text[1]) % 3}.svg"]
''')


def test_twenty_concurrent_pairs_into_one_folder_lose_nothing(tmp_path):
    out = tmp_path / "packet"
    folder.write_folder(out, {"plan.csv": "start 0"})
    (out / "mine.txt").write_text("only copy")
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    runs = [subprocess.Popen([sys.executable, "-c", WRITER, str(out), tag], env=env, stderr=subprocess.PIPE)
            for tag in ("a", "b")]
    for run in runs:
        _, err = run.communicate(timeout=240)
        assert run.returncode == 0, err.decode(errors="replace")
    assert (out / "mine.txt").read_text() == "only copy"
    assert sorted(p.name for p in tmp_path.iterdir() if p.name.startswith(".packet")) == []


def test_a_file_that_cannot_be_written_leaves_no_new_folder_behind(tmp_path, monkeypatch):
    def full(path, payload):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(folder, "write_bytes", full)
    with pytest.raises(folder.FolderError, match="disk is full"):
        folder.write_file_whole(tmp_path / "new" / "deeper" / "al.toml", "x = 1\n")
    assert list(tmp_path.iterdir()) == []

"""Fault injection for the output layer (enumerator/cli/output.py): full disk, read-only folder, special
files, names the file system refuses, outputs that are inputs, file modes, and a writer killed mid-write.

What is expected comes from POSIX semantics (rename(2) replaces a directory entry atomically, open(2)
applies the umask to a new file's mode, a FIFO or character device is written in place; the Linux
man-pages) and from the project's promise that a command writes whole files or nothing and reports a
failure as one line with exit status 2 (README, "Exit status and errors"; common practice for
command-line tools).  A full disk is simulated by making ``os.write`` or ``os.fsync`` fail with ENOSPC
(no tiny tmpfs is available to the suite), and for real through /dev/full where it exists.
"""

from __future__ import annotations

import errno
import json
import os
import signal
import stat
import subprocess
import sys
import threading
import time
from pathlib import Path

import pytest
from _cli import cli  # noqa: E402  (tests/ is on sys.path under pytest)

import enumerator.cli.output as output
from enumerator.cli.output import TEMP_PREFIX, write_bytes, write_files, write_text
from enumerator.errors import InputError

POSIX = pytest.mark.skipif(sys.platform == "win32", reason="POSIX file semantics")


def _temps(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.rglob(f"{TEMP_PREFIX}*"))


def _one_line(err: str) -> str:
    lines = err.strip().splitlines()
    assert len(lines) == 1, err
    return lines[0]


# --------------------------------------------------------------------------- full disk


def _enospc_after(monkeypatch, calls: int = 0, name: str = "write") -> None:
    """Make os.write (or os.fsync) fail with ENOSPC after ``calls`` successful calls."""
    real = getattr(os, name)
    count = {"n": 0}

    def failing(*args):
        count["n"] += 1
        if count["n"] > calls:
            raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))
        return real(*args)

    monkeypatch.setattr(os, name, failing)


@POSIX
@pytest.mark.parametrize("call", ["write", "fsync"])
def test_full_disk_leaves_the_old_file_and_no_temporary(tmp_path, monkeypatch, call):
    target = tmp_path / "out.json"
    target.write_text("old\n")
    _enospc_after(monkeypatch, 0, call)
    with pytest.raises(InputError) as info:
        write_text(target, "new\n" * 1000, inputs=())
    monkeypatch.undo()
    assert "the disk is full" in info.value.line() and "out.json" in info.value.line()
    assert target.read_text() == "old\n" and _temps(tmp_path) == []


@POSIX
def test_full_disk_in_a_multi_file_write_writes_none_of_them(tmp_path, monkeypatch):
    # all or nothing: the second of three files fails, so no file appears and the new folder goes again
    folder = tmp_path / "report"
    _enospc_after(monkeypatch, 1)
    files = [(folder / f"t{k}.csv", f"table {k}\n") for k in range(3)]
    with pytest.raises(InputError):
        write_files(files, inputs=(), folder=folder)
    monkeypatch.undo()
    assert not folder.exists() and _temps(tmp_path) == []


@POSIX
def test_full_disk_in_an_existing_folder_keeps_every_old_file(tmp_path, monkeypatch):
    for k in range(3):
        (tmp_path / f"t{k}.csv").write_text(f"old {k}\n")
    _enospc_after(monkeypatch, 2)
    with pytest.raises(InputError):
        write_files([(tmp_path / f"t{k}.csv", f"new {k}\n") for k in range(3)], inputs=(), folder=tmp_path)
    monkeypatch.undo()
    assert [(tmp_path / f"t{k}.csv").read_text() for k in range(3)] == [f"old {k}\n" for k in range(3)]
    assert _temps(tmp_path) == []


@POSIX
def test_report_on_a_full_disk_writes_no_table_and_no_page(tmp_path, monkeypatch):
    job = tmp_path / "job.toml"
    job.write_text('title = "t"\n[[complex]]\nformula = "Ma4b2"\n[[complex]]\nformula = "Ma3b3"\n')
    _enospc_after(monkeypatch, 3)  # a few files get through before the disk is full
    code, _, err = cli(["report", str(job), "--out", str(tmp_path / "si")])
    monkeypatch.undo()
    assert code == 2 and "the disk is full" in _one_line(err)
    assert not (tmp_path / "si").exists() and _temps(tmp_path) == []


@POSIX
@pytest.mark.skipif(not os.path.exists("/dev/full"), reason="/dev/full is Linux's always-full device")
def test_dev_full_through_the_command_line():
    code, out, err = cli(["isomers", "Ma4b2", "--out", "/dev/full"])
    assert code == 2 and out == ""
    assert _one_line(err) == (
        "isosieve: error: cannot write '/dev/full': the disk is full; free some space or choose another --out"
    )
    assert stat.S_ISCHR(os.stat("/dev/full").st_mode)


# --------------------------------------------------------------------------- read-only, odd names


@POSIX
def test_read_only_file_system(tmp_path, monkeypatch):
    real_open = os.open

    def read_only(path, flags, *args, **kwargs):
        if flags & os.O_CREAT and str(path).startswith(str(tmp_path)):
            raise OSError(errno.EROFS, os.strerror(errno.EROFS), str(path))
        return real_open(path, flags, *args, **kwargs)

    monkeypatch.setattr(os, "open", read_only)
    code, _, err = cli(["isomers", "Ma4b2", "--out", str(tmp_path / "x.txt")])
    monkeypatch.undo()
    assert code == 2 and "the file system is read-only" in _one_line(err)
    assert list(tmp_path.iterdir()) == []


@POSIX
@pytest.mark.skipif(hasattr(os, "geteuid") and os.geteuid() == 0, reason="root writes into a 0555 folder anyway")
def test_read_only_folder(tmp_path):
    ro = tmp_path / "ro"
    ro.mkdir()
    ro.chmod(0o555)
    try:
        code, _, err = cli(["isomers", "Ma4b2", "--out", str(ro / "x.txt")])
        assert code == 2 and "permission denied" in _one_line(err)
        assert list(ro.iterdir()) == []
    finally:
        ro.chmod(0o755)


@POSIX
def test_path_through_a_file(tmp_path):
    (tmp_path / "afile").write_text("")
    code, _, err = cli(["isomers", "Ma4b2", "--out", str(tmp_path / "afile" / "x.json")])
    assert code == 2 and "is a file, not a folder" in _one_line(err)


@POSIX
def test_a_long_legal_name_is_not_pushed_over_the_limit_by_the_temporary_name(tmp_path):
    # 250 characters is legal (NAME_MAX is 255 on common Linux file systems; the Linux man-pages, limits.h);
    # the old temporary name '.<name>.<8 random>' was 260 characters and failed
    name = tmp_path / ("a" * 250)
    code, _, err = cli(["isomers", "Ma4b2", "--out", str(name)])
    assert code == 0, err
    assert name.read_text().startswith("Ma4b2 on OC-6") and _temps(tmp_path) == []
    code, _, err = cli(["isomers", "Ma4b2", "--out", str(tmp_path / ("b" * 300))])
    assert code == 2 and "the name is too long" in _one_line(err) and "more characters" in err


def test_a_name_with_nul_and_an_empty_name_are_refused(tmp_path):
    for bad in ("a\0b", ""):
        with pytest.raises(InputError) as info:
            write_text(bad, "x", inputs=())
        assert len(info.value.line().splitlines()) == 1
    job = tmp_path / "job.toml"
    job.write_text('[[complex]]\nformula = "Ma4b2"\n[[output]]\nformat = "csv"\nfile = "a\\u0000b.csv"\n')
    code, _, err = cli(["job", str(job), "--write"])
    assert code == 2 and "holds a NUL character" in _one_line(err)


@pytest.mark.parametrize("name", [".", "sub/", "sub/."])
def test_job_output_that_names_a_folder(tmp_path, name):
    job = tmp_path / "job.toml"
    job.write_text(f'[[complex]]\nformula = "Ma4b2"\n[[output]]\nformat = "csv"\nfile = "{name}"\n')
    code, _, err = cli(["job", str(job), "--write"])
    assert code == 2 and "does not name a file" in _one_line(err)
    assert job.read_text().startswith("[[complex]]")


def test_out_naming_a_folder_is_refused(tmp_path):
    with pytest.raises(InputError) as info:
        write_text(tmp_path, "x", inputs=())
    assert "it is a folder" in info.value.line()


# --------------------------------------------------------------------------- outputs that are inputs


def test_a_job_never_overwrites_itself(tmp_path):
    job = tmp_path / "job.toml"
    text = '[[complex]]\nformula = "Ma4b2"\n[[output]]\nformat = "json"\nfile = "job.toml"\n'
    job.write_text(text)
    code, _, err = cli(["job", str(job), "--write"])
    assert code == 2 and "one of this command's input files" in _one_line(err)
    code, _, err = cli(["job", str(job), "--out", str(job)])
    assert code == 2 and "one of this command's input files" in _one_line(err)
    assert job.read_text() == text


def test_batch_and_rule_files_are_inputs(tmp_path):
    screen = tmp_path / "screen.txt"
    screen.write_text("Ma4b2\n")
    code, _, err = cli(["batch", str(screen), "--out", str(screen)])
    assert code == 2 and "input files" in _one_line(err) and screen.read_text() == "Ma4b2\n"
    rules = tmp_path / "mine"
    (rules / "geometries").mkdir(parents=True)
    geo = rules / "geometries" / "q.toml"
    geo.write_text('symbol = "XQ-2"\nname = "pair"\nsites = [[0, 0, 1], [1, 0, 0]]\n')
    before = geo.read_text()
    code, _, err = cli(["--rules", str(rules), "isomers", "Ma6", "--out", str(geo)])
    assert code == 2 and "input files" in _one_line(err) and geo.read_text() == before
    # a hard link to an input is the input too
    os.link(screen, tmp_path / "alias.txt")
    code, _, err = cli(["batch", str(screen), "--out", str(tmp_path / "alias.txt")])
    assert code == 2 and "input files" in _one_line(err)


def test_two_outputs_with_one_name(tmp_path):
    job = tmp_path / "job.toml"
    job.write_text(
        '[[complex]]\nformula = "Ma4b2"\n[[output]]\nformat = "json"\nfile = "x.json"\n'
        '[[output]]\nformat = "csv"\nfile = "./x.json"\n'
    )
    code, _, err = cli(["job", str(job), "--write"])  # refused when the job is read
    assert code == 2 and "is the file of [[output]] #1" in _one_line(err) and not (tmp_path / "x.json").exists()
    # and by the output layer itself, whatever calls it
    with pytest.raises(InputError, match="name the same file"):
        write_files([(tmp_path / "x.json", "a"), (tmp_path / "." / "x.json", "b")], inputs=())
    assert not (tmp_path / "x.json").exists()


# --------------------------------------------------------------------------- special files


@POSIX
def test_dev_null_stays_a_device():
    before = os.stat(os.devnull)
    code, out, err = cli(["isomers", "Ma4b2", "--json", "--out", os.devnull])
    after = os.stat(os.devnull)
    assert code == 0 and out == "" and err == ""
    assert stat.S_ISCHR(after.st_mode) and after.st_ino == before.st_ino


@POSIX
def test_a_fifo_is_written_through(tmp_path):
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    got: list[bytes] = []
    reader = threading.Thread(target=lambda: got.append(fifo.read_bytes()))
    reader.start()
    code, _, err = cli(["isomers", "Ma4b2", "--json", "--out", str(fifo)])
    reader.join(timeout=30)
    assert code == 0, err
    assert json.loads(got[0])["stereoisomers"] == 2  # [Ma4b2] cis/trans (from memory)
    assert stat.S_ISFIFO(os.lstat(fifo).st_mode)


@POSIX
def test_a_symlink_is_followed_and_kept(tmp_path):
    real = tmp_path / "real.json"
    real.write_text("old\n")
    link = tmp_path / "link.json"
    link.symlink_to(real.name)
    code, _, err = cli(["isomers", "Ma4b2", "--json", "--out", str(link)])
    assert code == 0, err
    assert link.is_symlink() and os.readlink(link) == "real.json"
    assert json.loads(real.read_text())["formula"] == "Ma4b2"
    dangling = tmp_path / "dangling.json"
    dangling.symlink_to("made.json")
    assert cli(["isomers", "Ma4b2", "--out", str(dangling)])[0] == 0
    assert dangling.is_symlink() and (tmp_path / "made.json").read_text().startswith("Ma4b2")


def test_dash_is_standard_output():
    code, out, _ = cli(["isomers", "Ma4b2", "--json", "--out", "-"])
    assert code == 0 and json.loads(out)["formula"] == "Ma4b2"


# --------------------------------------------------------------------------- modes


@POSIX
@pytest.mark.parametrize("mask", [0o022, 0o027, 0o077])
def test_a_new_file_gets_the_umask_mode(tmp_path, mask):
    old = os.umask(mask)
    try:
        write_text(tmp_path / "new.txt", "x", inputs=())
    finally:
        os.umask(old)
    assert stat.S_IMODE(os.stat(tmp_path / "new.txt").st_mode) == 0o666 & ~mask


@POSIX
@pytest.mark.parametrize("mode", [0o644, 0o600, 0o664, 0o444])
def test_a_replaced_file_keeps_its_mode(tmp_path, mode):
    target = tmp_path / "kept.txt"
    target.write_text("old")
    target.chmod(mode)
    old = os.umask(0o077)
    try:
        write_bytes(target, b"new", inputs=())
    finally:
        os.umask(old)
    assert target.read_bytes() == b"new" and stat.S_IMODE(os.stat(target).st_mode) == mode


# --------------------------------------------------------------------------- killed mid-write

_SLOW_WRITER = """
import os, sys, time
import enumerator.cli.output as out
real = out._write_all
def slow(fd, data):
    os.write(fd, data[:10])
    print("writing", flush=True)
    time.sleep(120)
    real(fd, data[10:])
out._write_all = slow
files = [(os.path.join(sys.argv[1], f"f{k}.txt"), "x" * 1000) for k in range(int(sys.argv[2]))]
out.write_files(files, inputs=(), folder=sys.argv[1])
"""


@POSIX
@pytest.mark.parametrize("how,files", [("SIGKILL", 1), ("SIGKILL", 3), ("SIGTERM", 1)])
def test_a_killed_writer_leaves_no_temporary_file(tmp_path, how, files):
    folder = tmp_path / "out"
    folder.mkdir()
    (folder / "f0.txt").write_text("old\n")
    env = dict(os.environ, PYTHONPATH=os.pathsep.join([str(Path(__file__).resolve().parent.parent)] + sys.path))
    p = subprocess.Popen([sys.executable, "-c", _SLOW_WRITER, str(folder), str(files)], stdout=subprocess.PIPE, env=env)
    try:
        assert p.stdout is not None and p.stdout.readline().strip() == b"writing"
        assert _temps(folder), "the writer should be in the middle of a temporary file"
        p.send_signal(getattr(signal, how))
        p.wait(timeout=30)
    finally:
        if p.poll() is None:
            p.kill()
            p.wait()
    deadline = time.monotonic() + 10
    while _temps(folder) and time.monotonic() < deadline:  # the watchdog cleans up just after the kill
        time.sleep(0.05)
    assert _temps(folder) == []
    assert (folder / "f0.txt").read_text() == "old\n"


def test_the_watchdog_is_not_kept_open_by_forked_children():
    # a process pool's forked worker must not hold the pipe, or the helper would outlive this process
    w = output._Watchdog()
    w.fd, w.pid = 99999, 1
    w.after_fork_in_child()
    assert w.fd is None and w.pid is None


@POSIX
def test_a_failing_watchdog_pipe_never_removes_the_files_being_staged(tmp_path, monkeypatch):
    # Once the pipe fails the writer stops registering but keeps the pipe open: closing it would tell a live
    # helper that this process is gone, and it would remove the staged files before they are renamed.
    dog = output._Watchdog()
    monkeypatch.setattr(output, "_WATCHDOG", dog)
    real = output._PIPE_WRITE
    sent = {"n": 0}

    def pipe_write(fd, data):
        sent["n"] += 1
        if sent["n"] > 1:
            raise OSError(errno.EPIPE, os.strerror(errno.EPIPE))
        return real(fd, data)

    monkeypatch.setattr(output, "_PIPE_WRITE", pipe_write)
    files = [(tmp_path / f"f{k}.txt", f"{k}\n") for k in range(3)]
    try:
        write_files(files, inputs=())
    finally:
        dog._forget()
    assert [p.read_text() for p, _ in files] == ["0\n", "1\n", "2\n"]
    assert dog.broken and _temps(tmp_path) == []

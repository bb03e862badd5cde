"""Writing what a command produces: whole files or nothing, never over an input, never a special file.

Every file the command line writes goes through this module (``--out``,
``--plot``, the folders of ``report`` and ``structures``, a job's
``[[output]]`` files).  What it promises:

* **Whole or nothing.**  An ordinary file is written to a temporary file
  beside it (a short name of its own, ``.isosieve-<pid>-<random>.tmp``, so a
  long target name never pushes it over the file system's name limit),
  flushed to disk (``fsync``) and renamed over the target.  Several files
  (:func:`write_files`) are all staged first and renamed into place only when
  every one was written, so a full disk leaves the old files as they were.
  A folder the command had to create is removed again when nothing could be
  written into it.
* **No temporary file left behind.**  On an error, Ctrl-C or SIGTERM the
  temporary files are removed; against SIGKILL (which no process can catch)
  a small watchdog process, forked once and holding the other end of a pipe,
  removes the temporary files still registered when the pipe closes without
  the writer having renamed them.  Linux's ``O_TMPFILE`` would avoid named
  temporary files altogether, but linking such a file into place needs
  ``/proc`` (``linkat``) and fails in some sandboxes (``EXDEV``), so the
  named file with a watchdog is the one path, and the one tested.
* **Special files are written through, not replaced.**  ``-`` is standard
  output; a character device (``/dev/null``, ``/dev/stdout``, a terminal) or
  a FIFO is opened and written in place; a symbolic link is followed and its
  target replaced; a folder, a block device or a socket is refused.
* **File modes follow the umask.**  A new file gets ``0666`` less the umask
  (the kernel applies it when the file is created); a replaced file keeps its
  mode (and, for root, its owner).
* **Never over an input.**  A target that is one of the command's input files
  (the job or batch file, a rule file of ``--rules DIR``) is refused, as is a
  target named twice in one command.
* **One line on failure.**  Every :class:`OSError` becomes an
  :class:`~enumerator.errors.InputError` (exit status 2) naming the file, the
  reason (disk full, read-only, permission, name too long, not a folder ...)
  and a fix.

>>> import tempfile, pathlib
>>> folder = pathlib.Path(tempfile.mkdtemp())
>>> write_text(folder / "a.txt", "hello\\n")
>>> (folder / "a.txt").read_text()
'hello\\n'
>>> write_text(folder / "a.txt", "again\\n", inputs=[folder / "a.txt"])  # doctest: +ELLIPSIS
Traceback (most recent call last):
...
enumerator.errors.InputError: cannot write '.../a.txt': it is one of this command's input files; choose another name
"""

from __future__ import annotations

import contextlib
import errno
import os
import stat
import warnings
from collections.abc import Iterable, Sequence
from pathlib import Path

import click

from enumerator.errors import InputError, shorten
from enumerator.frozen import frozen_dataclass

__all__ = [
    "STDOUT",
    "Target",
    "resolve_target",
    "write_bytes",
    "write_text",
    "write_files",
    "emit",
    "register_inputs",
    "command_inputs",
    "TEMP_PREFIX",
]

#: The name that means standard output.
STDOUT = "-"
#: How every temporary file of this module begins (a hidden file beside its target).
TEMP_PREFIX = ".isosieve-"
#: Bytes handed to one ``os.write`` call.
_CHUNK = 1 << 20
#: The watchdog's pipe is written with the ``os.write`` of import time, so that a test injecting faults into
#: ``os.write`` (a full disk) fails the data, not the bookkeeping.
_PIPE_WRITE = os.write

#: errno -> (what went wrong, how to fix it); '{opt}' is the option or key that named the file.
_REASONS: dict[int, tuple[str, str]] = {
    errno.ENOSPC: ("the disk is full", "free some space or choose another {opt}"),
    errno.EDQUOT: ("the disk quota is used up", "free some space or choose another {opt}"),
    errno.EROFS: ("the file system is read-only", "choose a writable place for {opt}"),
    errno.EACCES: ("permission denied", "choose a folder you can write to for {opt}"),
    errno.EPERM: ("operation not permitted", "choose a folder you can write to for {opt}"),
    errno.ENAMETOOLONG: ("the name is too long for the file system", "choose a shorter name for {opt}"),
    errno.ENOTDIR: ("a part of the path is a file, not a folder", "check the path given to {opt}"),
    errno.EISDIR: ("it is a folder", "name a file for {opt}"),
    errno.ENOENT: ("its folder does not exist", "create it first or choose another {opt}"),
    errno.ELOOP: ("the path loops through symbolic links", "check the path given to {opt}"),
    errno.EXDEV: ("the file could not be moved into place across file systems", "write to another folder"),
}


def _label(path: str | os.PathLike[str]) -> str:
    """The path as a message shows it (long names shortened, control characters escaped later)."""
    return shorten(os.fsdecode(path), 120)


def _failure(path: str | os.PathLike[str], exc: OSError, option: str) -> InputError:
    what, fix = _REASONS.get(exc.errno or 0, (exc.strerror or type(exc).__name__, "check the path given to {opt}"))
    if exc.errno == errno.ENOENT:
        parent = Path(os.fsdecode(path)).parent
        return InputError(f"folder '{_label(parent)}' does not exist", fix.format(opt=option))
    return InputError(f"cannot write '{_label(path)}': {what}", fix.format(opt=option))


# --------------------------------------------------------------------------- the watchdog (SIGKILL)


class _Watchdog:
    """A forked helper that removes registered temporary files once this process is gone.

    The writer sends ``b'+' + path + b'\\0'`` before creating a temporary
    file and ``b'-' + path + b'\\0'`` once it has been renamed or removed.
    When the pipe closes (this process exited, however it died), the helper
    removes what is still registered and exits.  It ignores SIGINT, SIGTERM
    and SIGHUP and leaves the process group (``setsid``), so neither Ctrl-C
    nor a signal sent to the group takes it away before it has cleaned up.
    Forked children of this process (a process pool) close their copy of the
    pipe at once, so only this process holds it open.
    """

    def __init__(self) -> None:
        self.fd: int | None = None
        self.pid: int | None = None
        self.broken = False

    def send(self, message: bytes) -> None:
        if self.broken or (self.fd is None and not self._start()):
            return
        assert self.fd is not None
        try:
            _PIPE_WRITE(self.fd, message)
        except OSError:
            # The helper is gone, or the pipe failed: stop registering (the in-process clean-up still runs) but
            # keep the pipe open, since closing it would make a live helper remove the files staged so far.
            self.broken = True

    def _forget(self) -> None:
        if self.fd is not None:
            with contextlib.suppress(OSError):
                os.close(self.fd)
        self.fd = None

    def _start(self) -> bool:
        if self.pid == -1 or not hasattr(os, "fork"):
            return False
        read_end, write_end = os.pipe()
        try:
            with warnings.catch_warnings():  # Python 3.12+ warns about fork in a threaded process; the helper
                warnings.simplefilter("ignore", DeprecationWarning)  # only reads a pipe and unlinks files
                pid = os.fork()
        except OSError:
            os.close(read_end)
            os.close(write_end)
            self.pid = -1
            return False
        if pid == 0:  # pragma: no cover - runs in the helper process
            os.close(write_end)
            _watch(read_end)
        os.close(read_end)
        self.fd, self.pid = write_end, pid
        return True

    def after_fork_in_child(self) -> None:
        """A forked child (a worker) must not keep the pipe open: the helper would outlive this process."""
        self._forget()
        self.pid = None
        self.broken = False


def _watch(read_end: int) -> None:  # pragma: no cover - runs in the helper process
    """The helper's loop: collect registrations until the pipe closes, then remove what is left."""
    import signal

    try:
        for sig in (signal.SIGINT, signal.SIGTERM, signal.SIGHUP):
            signal.signal(sig, signal.SIG_IGN)
        os.setsid()
        devnull = os.open(os.devnull, os.O_RDWR)
        for fd in (0, 1, 2):
            os.dup2(devnull, fd)
        os.closerange(3, read_end)
        os.closerange(read_end + 1, 4096)
        pending: set[bytes] = set()
        buffer = b""
        while True:
            chunk = os.read(read_end, 65536)
            if not chunk:
                break
            buffer += chunk
            *messages, buffer = buffer.split(b"\0")
            for m in messages:
                if m[:1] == b"+":
                    pending.add(m[1:])
                elif m[:1] == b"-":
                    pending.discard(m[1:])
        for path in pending:
            with contextlib.suppress(OSError):
                os.unlink(path)
    finally:
        os._exit(0)


_WATCHDOG = _Watchdog()
if hasattr(os, "register_at_fork"):
    os.register_at_fork(after_in_child=_WATCHDOG.after_fork_in_child)


# --------------------------------------------------------------------------- targets


@frozen_dataclass
class Target:
    """Where one output goes.

    ``kind`` is ``'stdout'``, ``'new'`` (no file there yet), ``'file'`` (an
    ordinary file, replaced whole) or ``'stream'`` (a character device or a
    FIFO, written through).  ``path`` is what was given, ``real`` the file
    actually written (a symbolic link followed); ``mode`` and ``owner`` are
    those of a file being replaced.
    """

    path: str
    real: str
    kind: str
    mode: int | None = None
    owner: tuple[int, int] | None = None


def _same_file(a: str, b: str) -> bool:
    if os.path.realpath(a) == os.path.realpath(b):
        return True
    try:
        return os.path.samefile(a, b)
    except OSError:
        return False


def resolve_target(
    path: str | os.PathLike[str], inputs: Iterable[str | os.PathLike[str]] = (), option: str = "--out"
) -> Target:
    """Decide how a file will be written, refusing what must not be written.

    Parameters
    ----------
    path : str or os.PathLike
        The name given (``-`` for standard output).
    inputs : iterable of str or os.PathLike
        The command's input files; the target may not be one of them.
    option : str
        The option or key that named the file, for the message.

    Returns
    -------
    Target

    Raises
    ------
    InputError
        A name with a NUL character or an empty name, one of the inputs, a folder, a block device or a socket,
        a path through a file, a missing folder.
    """
    text = os.fsdecode(path)
    if text == STDOUT:
        return Target(text, text, "stdout")
    if not text or "\0" in text:
        what = "an empty name" if not text else "a name with a NUL character"
        raise InputError(f"{option} got {what}", f"give a file name to {option}")
    real = os.path.realpath(text)
    for other in inputs:
        if _same_file(text, os.fsdecode(other)):
            raise InputError(
                f"cannot write '{_label(text)}': it is one of this command's input files", "choose another name"
            )
    try:
        st = os.stat(real)
    except FileNotFoundError:
        if not os.path.isdir(os.path.dirname(real) or "."):
            parent = os.path.dirname(text) or "."
            if os.path.exists(parent) and not os.path.isdir(parent):
                raise InputError(
                    f"cannot write '{_label(text)}': '{_label(parent)}' is a file, not a folder",
                    f"check the path given to {option}",
                ) from None
            raise InputError(
                f"folder '{_label(parent)}' does not exist", f"create it first or choose another {option}"
            ) from None
        return Target(text, real, "new")
    except OSError as exc:
        raise _failure(text, exc, option) from None
    if stat.S_ISREG(st.st_mode):
        return Target(text, real, "file", stat.S_IMODE(st.st_mode) & 0o777, (st.st_uid, st.st_gid))
    if stat.S_ISCHR(st.st_mode) or stat.S_ISFIFO(st.st_mode):
        return Target(text, real, "stream")
    kind = "a folder" if stat.S_ISDIR(st.st_mode) else "a block device" if stat.S_ISBLK(st.st_mode) else "a socket"
    raise InputError(f"cannot write '{_label(text)}': it is {kind}", f"name a file for {option}")


# --------------------------------------------------------------------------- writing


def _write_all(fd: int, data: bytes) -> None:
    view = memoryview(data)
    while view:
        n = os.write(fd, view[:_CHUNK])
        view = view[n:]


def _stage(target: Target, data: bytes) -> str:
    """Write ``data`` to a new temporary file beside the target; its name."""
    import secrets  # here: it pulls in hashlib, which a command printing to the terminal never needs

    folder = os.path.dirname(target.real) or "."
    for _ in range(16):
        tmp = os.path.join(folder, f"{TEMP_PREFIX}{os.getpid()}-{secrets.token_hex(4)}.tmp")
        _WATCHDOG.send(b"+" + os.fsencode(tmp) + b"\0")
        try:
            fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_CLOEXEC", 0), 0o666)
        except FileExistsError:
            _WATCHDOG.send(b"-" + os.fsencode(tmp) + b"\0")
            continue
        except BaseException:
            _WATCHDOG.send(b"-" + os.fsencode(tmp) + b"\0")
            raise
        try:
            try:
                _write_all(fd, data)
                if target.mode is not None:
                    os.fchmod(fd, target.mode)
                    if target.owner is not None and hasattr(os, "geteuid") and os.geteuid() == 0:
                        with contextlib.suppress(OSError):
                            os.fchown(fd, *target.owner)
                os.fsync(fd)
            finally:
                os.close(fd)
        except BaseException:
            _discard(tmp)
            raise
        return tmp
    raise OSError(errno.EEXIST, "no free temporary name", folder)


def _discard(tmp: str) -> None:
    with contextlib.suppress(OSError):
        os.unlink(tmp)
    _WATCHDOG.send(b"-" + os.fsencode(tmp) + b"\0")


def _sync_folder(folder: str) -> None:
    """Make a rename durable (best effort: not every system can open a folder)."""
    try:
        fd = os.open(folder or ".", os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)


def _stream(target: Target, data: bytes) -> None:
    if target.kind == "stdout":
        out = click.get_binary_stream("stdout")
        out.write(data)
        out.flush()
        return
    fd = os.open(target.real, os.O_WRONLY | getattr(os, "O_CLOEXEC", 0))
    try:
        _write_all(fd, data)
    finally:
        os.close(fd)


def _as_bytes(data: bytes | str) -> bytes:
    return data.encode("utf-8") if isinstance(data, str) else data


def write_files(
    files: Sequence[tuple[str | os.PathLike[str], bytes | str]],
    *,
    inputs: Iterable[str | os.PathLike[str]] | None = None,
    option: str = "--out",
    folder: str | os.PathLike[str] | None = None,
) -> None:
    """Write several files all or nothing: every one staged first, then all renamed into place.

    Parameters
    ----------
    files : sequence of (path, bytes or str)
        Each file and its content (text is written as UTF-8, newlines as given).
    inputs : iterable of paths, optional
        The command's input files (default: those of the running command, :func:`command_inputs`).
    option : str
        The option or key that named the files, for messages.
    folder : path, optional
        A folder to create first (with its parents) when it is missing; removed again if nothing could be
        written.

    Raises
    ------
    InputError
        A target that may not be written (:func:`resolve_target`), a name given twice, or a write that failed
        (disk full, read-only, permission ...); nothing was written then.
    """
    ins = tuple(command_inputs() if inputs is None else inputs)
    made = _make_folder(folder, option) if folder is not None else []
    staged: list[tuple[Target, str]] = []
    try:
        targets = [resolve_target(p, ins, option) for p, _ in files]
        _refuse_twice(targets)
        streams = []
        for target, (_, data) in zip(targets, files):
            if target.kind in ("new", "file"):
                try:
                    staged.append((target, _stage(target, _as_bytes(data))))
                except OSError as exc:
                    raise _failure(target.path, exc, option) from None
            else:
                streams.append((target, _as_bytes(data)))
        _commit(staged, option)
        staged = []
        for target, data in streams:
            try:
                _stream(target, data)
            except OSError as exc:
                raise _failure(target.path, exc, option) from None
    except BaseException:
        for _, tmp in staged:
            _discard(tmp)
        for d in reversed(made):
            with contextlib.suppress(OSError):
                os.rmdir(d)
        raise


def _refuse_twice(targets: list[Target]) -> None:
    seen: dict[str, str] = {}
    for t in targets:
        if t.kind in ("stdout", "stream"):
            continue
        if t.real in seen:
            raise InputError(
                f"'{_label(seen[t.real])}' and '{_label(t.path)}' name the same file", "give each output its own name"
            )
        seen[t.real] = t.path


def _commit(staged: list[tuple[Target, str]], option: str) -> None:
    """Rename every staged file over its target (renames only: no data is written now)."""
    done: list[str] = []
    for k, (target, tmp) in enumerate(staged):
        try:
            os.replace(tmp, target.real)
        except OSError as exc:
            for _, left in staged[k:]:
                _discard(left)
            err = _failure(target.path, exc, option)
            if done:
                written = ", ".join(_label(p) for p in done[:5]) + (
                    f" and {len(done) - 5} more" if len(done) > 5 else ""
                )
                raise InputError(f"{err.what} (already in place: {written})", err.fix) from None
            raise err from None
        _WATCHDOG.send(b"-" + os.fsencode(tmp) + b"\0")
        done.append(target.path)
    for folder in sorted({os.path.dirname(t.real) for t, _ in staged}):
        _sync_folder(folder)


def _make_folder(folder: str | os.PathLike[str], option: str) -> list[str]:
    """Create the folder and any missing parents; the ones created, outermost first."""
    text = os.fsdecode(folder)
    if "\0" in text or not text:
        raise InputError(
            f"{option} got {'an empty name' if not text else 'a name with a NUL character'}", "give a folder"
        )
    missing: list[str] = []
    p = Path(text)
    while not p.exists() and not p.is_symlink():
        missing.append(str(p))
        if p.parent == p:
            break
        p = p.parent
    if p.exists() and not p.is_dir():
        raise InputError(
            f"cannot write into '{_label(text)}': '{_label(p)}' is a file, not a folder", f"check {option}"
        )
    made: list[str] = []
    try:
        for d in reversed(missing):
            os.mkdir(d)
            made.append(d)
    except OSError as exc:
        for d in reversed(made):
            with contextlib.suppress(OSError):
                os.rmdir(d)
        raise _failure(text, exc, option) from None
    return made


def write_bytes(
    path: str | os.PathLike[str],
    data: bytes,
    *,
    inputs: Iterable[str | os.PathLike[str]] | None = None,
    option: str = "--out",
) -> None:
    """Write one whole file or nothing (see the module docstring).

    Parameters
    ----------
    path : str or os.PathLike
        The file; ``-`` for standard output.
    data : bytes
    inputs : iterable of paths, optional
        The command's input files (default: those of the running command).
    option : str
        The option or key that named the file, for messages.

    Raises
    ------
    InputError
        As :func:`write_files`.
    """
    write_files([(path, data)], inputs=inputs, option=option)


def write_text(
    path: str | os.PathLike[str],
    text: str,
    *,
    inputs: Iterable[str | os.PathLike[str]] | None = None,
    option: str = "--out",
) -> None:
    """Write one whole text file (UTF-8) or nothing.

    Parameters
    ----------
    path : str or os.PathLike
    text : str
    inputs : iterable of paths, optional
    option : str

    Raises
    ------
    InputError
        As :func:`write_files`.
    """
    write_files([(path, text.encode("utf-8"))], inputs=inputs, option=option)


def emit(text: str, out: str | None, *, inputs: Iterable[str | os.PathLike[str]] | None = None) -> None:
    """Print to standard output, or write the whole text to ``--out``.

    Parameters
    ----------
    text : str
    out : str, optional
        The file of ``--out``; standard output when None or ``-`` (an empty name is refused).
    inputs : iterable of paths, optional
        The command's input files (default: those of the running command).

    Raises
    ------
    InputError
        As :func:`write_files`.
    """
    if out is not None and out != STDOUT:
        write_text(out, text, inputs=inputs)
    else:
        click.echo(text, nl=False)


# --------------------------------------------------------------------------- inputs of the running command


def register_inputs(ctx: click.Context, *paths: str | os.PathLike[str]) -> None:
    """Record files the running command reads, so that no output may replace them.

    Parameters
    ----------
    ctx : click.Context
        The command's context (the list is kept on the root context's ``obj``).
    *paths : str or os.PathLike
    """
    root = ctx.find_root()
    root.ensure_object(dict)
    root.obj.setdefault("inputs", []).extend(os.fsdecode(p) for p in paths)


def command_inputs(ctx: click.Context | None = None) -> tuple[str, ...]:
    """The input files of the running command: those registered and every rule file of ``--rules DIR``.

    Parameters
    ----------
    ctx : click.Context, optional
        Default: the current click context (none outside a command: no inputs).

    Returns
    -------
    tuple of str
    """
    ctx = ctx or click.get_current_context(silent=True)
    if ctx is None:
        return ()
    obj = ctx.find_root().obj or {}
    out = list(obj.get("inputs", ()))
    folders = [Path(f) for f in obj.get("rules", ()) if os.path.isdir(f)]
    if folders:
        from enumerator.rules.ruleset import file_stamps

        with contextlib.suppress(OSError):
            out += [f for f, _, _ in file_stamps(folders)]
    return tuple(out)

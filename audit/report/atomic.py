"""Outputs that appear complete or not at all.

A writer never opens its final file name.  It writes a temporary file beside
it (``.<name>.<pid>.tmp``, in the same folder so that the rename cannot cross
file systems), flushes and fsyncs it, and only then ``os.replace``-s it onto
the final name — an atomic step on POSIX and Windows.  An interruption
(Ctrl-C, SIGTERM), a full disk or a bug therefore leaves the previous file
untouched, and the temporary is removed on the way out.

:class:`StagedFiles` extends this to a set of files renamed together; the
renames run with SIGINT and SIGTERM held back, so an interruption
that arrives while they run takes effect just after the set is complete.

:func:`folder_lock` keeps two runs from writing into one folder at once.
"""

from __future__ import annotations

import contextlib
import os
import re
import signal
import threading
from pathlib import Path

from ..errors import InputError

__all__ = ["StagedFiles", "write_file", "folder_lock", "remove_stale_temporaries", "LOCK_NAME"]

#: the lock file left in an output folder; empty, harmless, reused by the next run
LOCK_NAME = ".vpaudit.lock"

_HELD_SIGNALS = tuple(s for s in (getattr(signal, "SIGINT", None), getattr(signal, "SIGTERM", None))
                      if s is not None)


def temporary_name(final: Path) -> Path:
    """The temporary beside ``final`` that this process writes first."""
    return final.with_name(f".{final.name}.{os.getpid()}.tmp")


@contextlib.contextmanager
def _signals_held():
    """Hold SIGINT and SIGTERM back for a few system calls.

    Their Python handlers are swapped for one that only notes the signal;
    once the block ends the previous handlers are back and the first signal
    noted is passed on to its own (so Ctrl-C raises ``KeyboardInterrupt``
    just after the block).  Python runs signal handlers in the main thread
    only, so in any other thread there is nothing to hold back.
    (``pthread_sigmask`` would not do: the kernel hands a process signal to
    any thread that does not block it.)
    """
    if threading.current_thread() is not threading.main_thread():
        yield
        return
    noted: list[tuple[int, object]] = []
    previous = {}
    for sig in _HELD_SIGNALS:
        handler = signal.getsignal(sig)
        if handler is not None:  # None: installed outside Python, not ours to swap
            previous[sig] = handler
            signal.signal(sig, lambda signum, frame: noted.append((signum, frame)))
    try:
        yield
    finally:
        for sig, handler in previous.items():
            signal.signal(sig, handler)
        if noted:
            signum, frame = noted[0]
            handler = previous[signum]
            if callable(handler):
                handler(signum, frame)
            elif handler == signal.SIG_DFL:
                signal.raise_signal(signum)


def _fsync_folder(folder: Path) -> None:
    # the renames themselves are durable only once the folder entry is synced;
    # POSIX only: Windows cannot open a folder as a file
    if not hasattr(os, "O_DIRECTORY"):
        return
    fd = os.open(folder, os.O_RDONLY | os.O_DIRECTORY)
    try:
        os.fsync(fd)
    finally:
        os.close(fd)


def _unwritable(final: Path, exc: OSError) -> InputError:
    return InputError(f"cannot write this output ({exc.strerror or exc}); the previous file, if any, is "
                      "unchanged", file=str(final), hint="free some space or choose another --out folder")


class StagedFiles:
    """Files written to temporaries, renamed onto their final names together.

    Use as a context manager: leaving the block normally renames every staged
    file (:meth:`commit`); leaving it by any exception — ``KeyboardInterrupt``
    included — removes the temporaries and leaves the final names as they
    were (:meth:`discard`).

    Examples
    --------
    >>> with StagedFiles() as staged:                       # doctest: +SKIP
    ...     staged.write(Path("out/findings.json"), b"{}")
    ...     staged.write(Path("out/report.pdf"), pdf_bytes)
    """

    def __init__(self) -> None:
        self._staged: list[tuple[Path, Path]] = []

    def write(self, final: str | Path, data: bytes) -> None:
        """Write ``data`` to the temporary of ``final`` and sync it to disk.

        Raises
        ------
        InputError
            The temporary cannot be written (full disk, no permission).
        """
        final = Path(final)
        tmp = temporary_name(final)
        # registered before it exists, so an interruption inside open() or
        # write() still gets the temporary removed
        self._staged.append((tmp, final))
        try:
            with open(tmp, "wb") as fh:
                fh.write(data)
                fh.flush()
                os.fsync(fh.fileno())
        except OSError as exc:
            raise _unwritable(final, exc) from None

    def commit(self) -> list[Path]:
        """Rename every temporary onto its final name; return the final names.

        Renames within one folder fail only if the folder is changed under
        us (removed, made read-only); the files renamed before such a failure
        stay, the rest are left to :meth:`discard`.
        """
        finals = []
        with _signals_held():
            for tmp, final in self._staged:
                try:
                    os.replace(tmp, final)
                except OSError as exc:
                    raise _unwritable(final, exc) from None
                finals.append(final)
            self._staged.clear()
        for folder in dict.fromkeys(f.parent for f in finals):
            _fsync_folder(folder)
        return finals

    def discard(self) -> None:
        """Remove the temporaries; the final names are not touched."""
        with _signals_held():
            for tmp, _ in self._staged:
                tmp.unlink(missing_ok=True)
            self._staged.clear()

    def __enter__(self) -> "StagedFiles":
        return self

    def __exit__(self, exc_type, exc, tb) -> None:
        if exc_type is None:
            try:
                self.commit()
            except BaseException:
                self.discard()
                raise
        else:
            self.discard()


def write_file(path: str | Path, data: bytes) -> None:
    """Replace ``path`` by ``data`` atomically: readers see the old or the new file."""
    with StagedFiles() as staged:
        staged.write(path, data)


def remove_stale_temporaries(folder: Path, names) -> list[Path]:
    """Remove temporaries of ``names`` that a killed run left in ``folder``.

    Call it only while holding :func:`folder_lock`: then no other run is
    writing there, so every such temporary belongs to a dead process (one
    stopped by SIGKILL or a power cut, which no handler can catch).
    """
    pattern = re.compile(r"^\.(%s)\.\d+\.tmp$" % "|".join(re.escape(n) for n in names))
    removed = []
    for entry in Path(folder).iterdir():
        if pattern.match(entry.name) and entry.is_file():
            entry.unlink(missing_ok=True)
            removed.append(entry)
    return removed


def _try_lock(fd: int) -> bool:
    """Take an exclusive lock on the open file ``fd`` without waiting."""
    try:
        import fcntl
    except ImportError:  # Windows
        import msvcrt

        try:
            msvcrt.locking(fd, msvcrt.LK_NBLCK, 1)
        except OSError:
            return False
        return True
    try:
        fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
    except BlockingIOError:
        return False
    return True


@contextlib.contextmanager
def folder_lock(folder: str | Path):
    """Hold the exclusive write lock of an output folder for the block.

    The lock is an operating-system lock (``flock``) on ``.vpaudit.lock`` in
    the folder.  The kernel releases it when the holder closes the file or
    dies in any way, so the lock file a killed run leaves behind never blocks
    the next run.  The file itself stays (removing it would let a third run
    lock a new file while a second still holds the old one).

    Raises
    ------
    InputError
        Another live process holds the lock, or the lock file cannot be opened.
    """
    folder = Path(folder)
    lock_path = folder / LOCK_NAME
    try:
        fd = os.open(lock_path, os.O_RDWR | os.O_CREAT, 0o644)
    except OSError as exc:
        raise InputError(f"cannot open the lock file ({exc.strerror})", file=str(lock_path),
                         hint="choose another --out folder") from None
    try:
        if not _try_lock(fd):
            raise InputError(f"another vpaudit run is writing into {folder}",
                             hint="wait for it or choose another --out")
        yield lock_path
    finally:
        # closing the descriptor releases the lock
        os.close(fd)

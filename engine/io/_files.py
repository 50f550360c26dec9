"""Checks on the file itself before any parsing: exists, readable, known type, not empty, not binary.

Every function here opens the file read-only (``"rb"``); nothing in ``engine.io`` ever writes to
a user's file.
"""

from __future__ import annotations

import contextlib
import hashlib
import stat
from pathlib import Path
from typing import Iterator

from ..errors import FileProblem, TwofoldError

__all__ = [
    "SUPPORTED_EXTENSIONS",
    "TEXT_KINDS",
    "SHEET_KINDS",
    "HEAD_BYTES",
    "check_path",
    "check_regular",
    "read_head",
    "file_checksum",
    "one_line",
    "wrap_unexpected",
    "available_memory",
    "check_memory",
    "TEXT_MEMORY_FACTOR",
    "amount",
]

SUPPORTED_EXTENSIONS: tuple[str, ...] = (".csv", ".tsv", ".txt", ".xlsx", ".xls", ".ods")
TEXT_KINDS: tuple[str, ...] = ("csv", "tsv", "txt")
SHEET_KINDS: tuple[str, ...] = ("xlsx", "xls", "ods")
HEAD_BYTES = 64 * 1024  # the sample that format detection looks at
# Memory a text file needs while it is read, as a multiple of its size: the peak measured by
# tests/benchmarks/bench_io.py was 0.7 to 2.5 times the file (tracemalloc), so twice the size
# refuses only files that could not fit.
TEXT_MEMORY_FACTOR = 2.0


def one_line(text: object, limit: int = 160) -> str:
    """``text`` squeezed onto one line and cut to ``limit`` characters."""
    flat = " ".join(str(text).split())
    return flat if len(flat) <= limit else flat[: limit - 3] + "..."


def check_path(path: str | Path) -> tuple[Path, str]:
    """Return the path and its kind ("csv", "xlsx", ...) or raise :class:`FileProblem`.

    The kind comes from the extension (case ignored). Missing files, folders and unknown
    extensions are refused here, before anything is opened.
    """
    try:
        path = Path(path)
    except TypeError as error:
        raise FileProblem(f"'{one_line(path)}' is not a file name.") from error
    extension = path.suffix.lower()
    if extension not in SUPPORTED_EXTENSIONS:
        shown = f"'{path.suffix}'" if path.suffix else "no extension"
        raise FileProblem(
            f"{path.name} has {shown}; Twofold reads {', '.join(SUPPORTED_EXTENSIONS)} files.")
    if not path.exists():
        raise FileProblem(f"{path.name} was not found (looked in {path.parent}).")
    check_regular(path)
    return path, extension[1:]


def check_regular(path: Path) -> None:
    """Refuse a folder, a named pipe, a device or a socket: only a regular file can be read
    without waiting forever on whatever writes to it (the window and the command share this)."""
    try:
        mode = path.stat().st_mode
    except FileNotFoundError as error:
        raise FileProblem(f"{path.name} was not found (looked in {path.parent}).") from error
    except OSError as error:
        raise _open_failure(path, error) from error
    if stat.S_ISDIR(mode):
        raise FileProblem(f"{path.name} is a folder, not a file.")
    if not stat.S_ISREG(mode):
        what = ("a named pipe" if stat.S_ISFIFO(mode) else "a socket" if stat.S_ISSOCK(mode)
                else "a device" if stat.S_ISCHR(mode) or stat.S_ISBLK(mode) else "not a regular file")
        raise FileProblem(f"{path.name} is {what}, not a saved file; save the data to a file and open that.")


def available_memory() -> int | None:
    """Bytes of memory the system can still give out (Linux ``MemAvailable``); None elsewhere."""
    try:
        with open("/proc/meminfo", encoding="ascii") as handle:
            for line in handle:
                if line.startswith("MemAvailable:"):
                    return int(line.split()[1]) * 1024
    except (OSError, ValueError, IndexError):
        return None
    return None


def check_memory(path: Path, size: int, factor: float, free: int | None) -> None:
    """Refuse a file whose reading needs more memory than is free, before it is read."""
    need = size * factor
    if free is not None and need > free:
        raise FileProblem(
            f"{path.name} is {amount(size)}; reading it needs about {amount(need)} of memory "
            f"and {amount(free)} are free. Close other programs, or split the file.")


def amount(size: float) -> str:
    """Bytes in words a user reads: "0.7 MB", "830 MB", "7.3 GB", "550 TB"."""
    if size >= 1e12:
        return f"{size / 1e12:,.1f} TB" if size < 1e13 else f"{size / 1e12:,.0f} TB"
    if size >= 1e9:
        return f"{size / 1e9:.1f} GB"
    megabytes = max(size / 1e6, 0.1)
    return f"{megabytes:.0f} MB" if megabytes >= 10 else f"{megabytes:.1f} MB"


def _open_failure(path: Path, error: OSError) -> FileProblem:
    if isinstance(error, PermissionError):
        return FileProblem(
            f"{path.name} cannot be opened: permission denied (it may be locked by another "
            "program or need different access rights).")
    return FileProblem(f"{path.name} cannot be opened: {one_line(error.strerror or error)}.")


def read_head(path: Path, size: int = HEAD_BYTES) -> tuple[bytes, int]:
    """The first ``size`` bytes of the file and its total size, read-only."""
    try:
        with open(path, "rb") as handle:
            head = handle.read(size)
            handle.seek(0, 2)
            total = handle.tell()
    except OSError as error:
        raise _open_failure(path, error) from error
    return head, total


def file_checksum(path: str | Path) -> str:
    """SHA-256 of the file's bytes as a hex string (the file is opened read-only).

    Kept out of :func:`engine.io.read_table` so that loading a large file does not pay for
    hashing it; the report cites the checksum so a reader can tell which file was analysed.

    Parameters
    ----------
    path : str or pathlib.Path
        The file.

    Returns
    -------
    str
        64 lowercase hexadecimal digits.

    Notes
    -----
    The file is read in 1 MiB blocks, so memory use does not grow with its size.

    References
    ----------
    FIPS PUB 180-4, Secure Hash Standard (SHS), NIST, 2015.
    """
    path = Path(path)
    if not path.exists():
        raise FileProblem(f"{path.name} was not found (looked in {path.parent}).")
    check_regular(path)
    digest = hashlib.sha256()
    try:
        with open(path, "rb") as handle:
            for block in iter(lambda: handle.read(1 << 20), b""):
                digest.update(block)
    except OSError as error:
        raise _open_failure(path, error) from error
    return digest.hexdigest()


@contextlib.contextmanager
def wrap_unexpected(name: str, what: str, kind: type[TwofoldError] = FileProblem) -> Iterator[None]:
    """Let our own errors through; turn any other exception into ``kind`` naming the file."""
    try:
        yield
    except TwofoldError:
        raise
    except MemoryError as error:
        raise kind(f"{name} is too large to {what} in the memory available.") from error
    except (KeyboardInterrupt, SystemExit, GeneratorExit):
        raise
    except BaseException as error:  # a parser's own error, a Rust panic too: one line, never a traceback
        detail = one_line(error) or type(error).__name__
        raise kind(f"{name} could not be {what}: {detail}") from error

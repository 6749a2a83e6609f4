"""Reading the text files a user names (scenario files, library files): every way the file
can be unreadable -- missing, a directory, a device, no permission, not UTF-8 -- is a
LossLaneError naming what the file is for and its path (and the line of a bad byte)."""

from __future__ import annotations

import os
import stat
from pathlib import Path

from losslane.errors import LossLaneError

#: the largest user text file read (a scenario or library is a few kB; this refuses a
#: mistaken multi-gigabyte path before reading it into memory)
MAX_BYTES = 64 * 1024 * 1024


def check_readable(path: str | os.PathLike, what: str) -> Path:
    """``path`` if it names an existing regular file; else a LossLaneError saying what it
    is instead (missing, a directory, a device or pipe, not accessible)."""
    p = Path(path)
    shown = f"{what} {str(p)!r}"
    if str(path) == "":
        raise LossLaneError(f"{what} '': empty file name")
    if "\x00" in str(path):
        raise LossLaneError(f"{shown}: a file name cannot hold a NUL character")
    try:
        st = p.stat()
    except FileNotFoundError:
        raise LossLaneError(f"{shown} does not exist") from None
    except NotADirectoryError:
        raise LossLaneError(f"{shown} does not exist (a part of the path is a file)") from None
    except PermissionError:
        raise LossLaneError(f"{shown}: permission denied") from None
    except OSError as exc:
        raise LossLaneError(f"{shown} cannot be opened: {exc.strerror or exc}") from None
    if stat.S_ISDIR(st.st_mode):
        raise LossLaneError(f"{shown} is a directory, not a file")
    if not stat.S_ISREG(st.st_mode):
        raise LossLaneError(
            f"{shown} is not a regular file (a device, pipe or socket); give a file name"
        )
    if st.st_size > MAX_BYTES:
        raise LossLaneError(
            f"{shown} is {st.st_size / 2**20:.0f} MiB; a text input is at most "
            f"{MAX_BYTES // 2**20} MiB"
        )
    return p


def read_bytes(path: str | os.PathLike, what: str) -> bytes:
    """The contents of the regular file ``path`` (see ``check_readable``)."""
    p = check_readable(path, what)
    try:
        return p.read_bytes()
    except PermissionError:
        raise LossLaneError(f"{what} {str(p)!r}: permission denied") from None
    except OSError as exc:
        raise LossLaneError(f"{what} {str(p)!r} cannot be read: {exc.strerror or exc}") from None


def decode_utf8(data: bytes, what: str, path: str | os.PathLike) -> str:
    """``data`` decoded as UTF-8; a LossLaneError naming the file, the line and the byte."""
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError as exc:
        line = data.count(b"\n", 0, exc.start) + 1
        raise LossLaneError(
            f"{what} {str(path)!r}: line {line}: byte 0x{data[exc.start]:02x} is not valid "
            "UTF-8; save the file as UTF-8 text"
        ) from None


def read_text(path: str | os.PathLike, what: str) -> str:
    """The UTF-8 text of the file ``path``; ``what`` names it in messages ("scenario
    file", "library file")."""
    return decode_utf8(read_bytes(path, what), what, path)


__all__ = ["MAX_BYTES", "check_readable", "decode_utf8", "read_bytes", "read_text"]

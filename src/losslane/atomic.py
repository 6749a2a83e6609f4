"""Writing output files atomically: each file is written to a temporary name in its target
directory (the same file system) and moved into place with ``os.replace``, so a failure
never leaves a half-written file, and a reader never sees one. The one helper every writer
uses (Touchstone files, charts, pages, tables)."""

from __future__ import annotations

import os
import secrets
from collections.abc import Callable
from pathlib import Path

from losslane.errors import LossLaneError


def write_atomic(path: str | os.PathLike, write: Callable[[Path], None]) -> Path:
    """Call ``write(tmp)`` to produce the file at a temporary path beside ``path``, then
    move it into place; on any failure the temporary file is removed. The directory must
    exist. The temporary file is created with the process's umask (not mkstemp's 0600)."""
    p = Path(path)
    directory = p.parent if str(p.parent) else Path(".")
    if not directory.is_dir():
        raise LossLaneError(f"'{p}': directory '{directory}' does not exist")
    tmp = directory / f".{p.name}.{os.getpid()}.{secrets.token_hex(4)}.tmp"
    try:
        write(tmp)
        os.replace(tmp, p)
    except BaseException:
        if tmp.exists():
            tmp.unlink()
        raise
    return p


def write_text(path: str | os.PathLike, text: str, encoding: str = "utf-8") -> Path:
    """Write ``text`` to ``path`` atomically (newlines as given)."""

    def write(tmp: Path) -> None:
        with open(tmp, "x", encoding=encoding, errors="replace", newline="\n") as fh:
            fh.write(text)

    return write_atomic(path, write)


__all__ = ["write_atomic", "write_text"]

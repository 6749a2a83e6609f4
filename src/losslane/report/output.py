"""Where outputs may go: the one rule for every output path, checked before any work.

The rule (README, "Where files go"): losslane creates at most one directory -- the one a
build's ``--out`` names (or its default ``./<name>``); every directory above it, and the
directory of every other output file (``--plot``), must already exist. A missing parent is
more often a typo than a wish, and a typo should not grow a tree of folders. An output
location that exists as the wrong type (a file where a directory is wanted, a directory
where a file is wanted), an empty name, or a place that cannot be written (no permission,
a read-only or virtual file system) is refused up front with the option named.

File stems derived from a scenario's ``name`` are made safe here too: characters other
than letters and digits become dashes, and a stem longer than ``MAX_STEM`` characters is
cut (file systems hold 255 bytes per name; the longest suffix and the staging names need
the rest).
"""

from __future__ import annotations

import os
import re
import secrets
import shutil
import tempfile
from collections.abc import Callable
from pathlib import Path

from losslane.errors import LossLaneError

#: the longest file stem taken from a scenario name (a 255-byte file name holds it with
#: the longest output suffix and the temporary names used while writing)
MAX_STEM = 120


def file_stem(name: str) -> tuple[str, bool]:
    """A file stem from ``name`` (letters and digits, dashes between words, lower case,
    at most ``MAX_STEM`` characters) and whether it was cut to fit."""
    s = re.sub(r"[^a-z0-9]+", "-", name.strip().lower(), flags=re.ASCII).strip("-")
    s = s or "channel"
    if len(s) <= MAX_STEM:
        return s, False
    return s[:MAX_STEM].rstrip("-"), True


def _probe(directory: Path, key: str, shown: str) -> None:
    """Create and remove a file in ``directory``: the only test that a file can be written
    there (permission bits do not tell about read-only mounts or virtual file systems)."""
    probe = directory / f".losslane-probe-{os.getpid()}-{secrets.token_hex(4)}"
    try:
        probe.touch(exist_ok=False)
    except OSError as exc:
        raise LossLaneError(
            f"{key} {shown}: cannot write in {str(directory)!r} "
            f"({exc.strerror or exc}); choose a writable location"
        ) from None
    try:
        probe.unlink()
    except OSError:
        pass


def _existing_directory(directory: Path, key: str, shown: str, what: str) -> None:
    if not directory.exists():
        raise LossLaneError(
            f"{key} {shown}: the {what} {str(directory)!r} does not exist; create it first "
            "(losslane creates no directory but a build's output directory)"
        )
    if not directory.is_dir():
        raise LossLaneError(f"{key} {shown}: {str(directory)!r} is not a directory")


def _nonempty(path: str | os.PathLike, key: str) -> Path:
    if str(path).strip() == "":
        raise LossLaneError(f"{key} '': an empty name; give a path (. for this directory)")
    if "\x00" in str(path):
        raise LossLaneError(f"{key} {str(path)!r}: a path cannot hold a NUL character")
    return Path(path)


#: the picture formats every chart can be written in (by the name's suffix)
PICTURE_FORMATS = (".png", ".svg", ".pdf")


def check_output_file(
    path: str | os.PathLike, key: str, suffixes: tuple[str, ...] | None = PICTURE_FORMATS
) -> Path:
    """``path`` for a file to be written: not empty, ending in one of ``suffixes`` (None:
    any), not an existing directory, in an existing directory that can be written. ``key``
    names the option (``--plot``)."""
    p = _nonempty(path, key)
    shown = repr(str(p))
    if suffixes is not None and p.suffix.lower() not in suffixes:
        raise LossLaneError(
            f"{key} {shown}: unknown picture format; use a name ending in " + ", ".join(suffixes)
        )
    if p.is_dir():
        raise LossLaneError(f"{key} {shown} is an existing directory; give a file name")
    parent = p.parent if str(p.parent) else Path(".")
    _existing_directory(parent, key, shown, "folder")
    _probe(parent, key, shown)
    return p


def check_output_dir(path: str | os.PathLike, key: str = "--out") -> Path:
    """``path`` for a build's output directory: not empty, not an existing file, its parent
    an existing directory; the directory itself (or, if it does not exist yet, its parent)
    must be writable."""
    p = _nonempty(path, key)
    shown = repr(str(p))
    if p.exists() and not p.is_dir():
        raise LossLaneError(f"{key} {shown} is an existing file, not a directory; choose a name")
    parent = p.resolve().parent
    _existing_directory(parent, key, shown, "parent directory")
    # the build is staged beside the directory and then moved into it: both must work
    _probe(parent, key, shown)
    if p.is_dir():
        _probe(p, key, shown)
    return p


def check_targets(directory: Path, names: list[str], key: str = "--out") -> None:
    """Refuse to replace anything but a file: ``directory / name`` for each of ``names``
    must be absent or a regular file (checked before the first file is moved in)."""
    for name in names:
        target = directory / name
        if target.exists() and not target.is_file():
            raise LossLaneError(
                f"{key} {str(directory)!r}: {str(target)!r} exists and is not a file "
                f"(a directory?); it would be replaced by the output file {name!r}; move it "
                "or choose another directory"
            )


def write_staged(
    out: Path | str, write: Callable[[Path], list[Path]], key: str = "--out"
) -> list[Path]:
    """Call ``write(stage)`` to make files in a staging directory beside ``out``, then move
    them into ``out`` (checked by ``check_output_dir``; created if missing); returns their
    final paths. On any failure the staging directory is removed and ``out`` is left as it
    was (no name is moved in while one of them would replace a directory)."""
    out = check_output_dir(out, key)
    stage = Path(tempfile.mkdtemp(prefix=".losslane-stage-", dir=out.resolve().parent))
    try:
        made = write(stage)
        check_targets(out, [p.name for p in made], key)
        out.mkdir(exist_ok=True)
        final = []
        for p in made:
            target = out / p.name
            p.replace(target)
            final.append(target)
        return final
    finally:
        shutil.rmtree(stage, ignore_errors=True)


__all__ = [
    "MAX_STEM",
    "PICTURE_FORMATS",
    "check_output_dir",
    "check_output_file",
    "check_targets",
    "file_stem",
    "write_staged",
]

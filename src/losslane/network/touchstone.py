"""Touchstone files (IBIS Open Forum, Touchstone File Format Specification 1.x / 2.x),
read and written through scikit-rf.

* :func:`write_touchstone` writes a ``skrf.Network`` as version 1 or 2, in RI, MA or DB
  form, with a header stating the losslane version, the scenario, the port order and the
  reference impedance. Numbers are written with Python's shortest round-trip repr and
  frequencies in Hz, so reading the file back gives the same floats in RI form (MA and DB
  to a few units in the last place, from the polar conversion). DB form cannot hold
  |S| = 0 (its dB value is -inf, not a number a Touchstone reader accepts): such entries,
  and any below 1e-300, are written as 1e-300 (-6000 dB). The file is written to a
  temporary name in the target directory and moved into place with ``os.replace``, so an
  error never leaves a half-written file.
* :func:`read_touchstone` reads a file into a ``skrf.Network``; any failure is a
  LossLaneError naming the file.
"""

from __future__ import annotations

import io
import os
import warnings
from collections.abc import Iterable
from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np

from losslane.atomic import write_text
from losslane.errors import LossLaneError
from losslane.network.ports import DEFAULT_ORDER, check_order, describe_ports

if TYPE_CHECKING:
    import skrf

FORMS = ("ri", "ma", "db")
DB_FLOOR = 1e-300
"""Smallest magnitude written in DB form (-6000 dB); see the module docstring."""

_VERSIONS = {"1": "1.0", "1.0": "1.0", "2": "2.0", "2.0": "2.0", "2.1": "2.1"}


def _version(version: int | str) -> str:
    key = str(version).strip()
    if key not in _VERSIONS:
        raise LossLaneError(
            f"touchstone version = {version!r} is not supported; valid versions are 1 and 2"
        )
    return _VERSIONS[key]


def read_touchstone(path: str | os.PathLike) -> skrf.Network:
    """A Touchstone file (version 1 or 2) as a ``skrf.Network``.

    Reading checks (``touchstone_scan``, then the values scikit-rf read): finite numbers,
    reference impedances > 0, strictly increasing frequencies, rows that fit the port
    count, a version-2 ``[Number of Frequencies]`` that matches the rows, and every S
    entry of magnitude at most ``limits.MAX_S_MAGNITUDE``. A failure is a LossLaneError
    naming the file and, where it can, the line.
    """
    import skrf

    from losslane.network.touchstone_scan import scan_touchstone
    from losslane.userfiles import read_bytes

    p = Path(path)
    data = read_bytes(p, "touchstone file")
    # Touchstone is ASCII; Latin-1 reads any byte a comment may hold
    scan = scan_touchstone(data.decode("latin-1"), p)
    # scikit-rf parses the bytes already read (it takes the port count and the network's
    # name from the file object's name), so the file is read once
    stream = io.BytesIO(data)
    stream.name = str(p)
    try:
        # absurd values overflow in scikit-rf's conversions; _check_values names them
        with warnings.catch_warnings(), np.errstate(all="ignore"):
            warnings.simplefilter("ignore", RuntimeWarning)
            net = skrf.Network(stream)
    except Exception as exc:  # skrf raises many types on malformed files
        raise LossLaneError(
            f"touchstone file '{p}' could not be read as Touchstone 1.x/2.x: {exc}"
        ) from exc
    _check_values(net, p, scan)
    return net


def _check_values(net: skrf.Network, path: Path, scan) -> None:
    """The values scikit-rf read: S finite and bounded, references finite and > 0."""
    from losslane.limits import MAX_S_MAGNITUDE

    def where(i: int) -> str:
        line = scan.line_of(i) if scan is not None else None
        return f", line {line}" if line is not None else ""

    z0 = np.asarray(net.z0)
    bad_z = ~np.isfinite(z0) | ~(z0.real > 0)
    if np.any(bad_z):
        i = int(np.argwhere(bad_z)[0][0])
        raise LossLaneError(
            f"touchstone file '{path}'{where(i)}: reference impedance "
            f"{complex(z0[np.nonzero(bad_z)][0]):g} ohm: a reference impedance must be finite "
            "and > 0 ohm"
        )
    s = np.asarray(net.s)
    with np.errstate(invalid="ignore", over="ignore"):
        mag = np.abs(s)
    bad = ~np.isfinite(mag) | (mag > MAX_S_MAGNITUDE)
    if np.any(bad):
        i, a, b = (int(x) for x in np.argwhere(bad)[0])
        value = mag[i, a, b]
        what = (
            "is not finite (NaN or infinite after conversion to S)"
            if not np.isfinite(value)
            else f"has magnitude {value:.6g}, above the accepted {MAX_S_MAGNITUDE:g} "
            "(a passive model has |S| <= 1; Input limits)"
        )
        raise LossLaneError(
            f"touchstone file '{path}'{where(i)}: S{a + 1}{b + 1} at {float(net.f[i]):g} Hz {what}"
        )


def header_lines(
    network: skrf.Network,
    scenario: str | None = None,
    order: str = DEFAULT_ORDER,
    comments: Iterable[str] = (),
) -> list[str]:
    """The comment lines losslane puts at the top of every file it writes."""
    from losslane import __version__

    z0 = np.unique(np.asarray(network.z0).real)
    ref = (
        f"{z0[0]:g} ohm at every port"
        if z0.size == 1
        else "per port " + ", ".join(f"{z:g}" for z in np.asarray(network.z0)[0].real) + " ohm"
    )
    lines = [f"losslane {__version__}"]
    if scenario:
        lines.append(f"scenario: {scenario}")
    lines.append(f"ports: {describe_ports(network.nports, order)}")
    lines.append(f"reference impedance: {ref} (power waves)")
    lines.append("frequencies in Hz; parameters S")
    lines.extend(str(c) for c in comments)
    return [ln.replace("\r", " ").replace("\n", " ") for ln in lines]


def touchstone_text(
    network: skrf.Network,
    version: int | str = 1,
    form: str = "ri",
    comments: Iterable[str] = (),
    scenario: str | None = None,
    order: str = DEFAULT_ORDER,
) -> str:
    """The Touchstone file contents (what :func:`write_touchstone` writes)."""
    ver = _version(version)
    form = str(form).lower()
    if form not in FORMS:
        raise LossLaneError(f"touchstone form = {form!r} is not valid; use one of {FORMS}")
    check_order(order)
    net = network.copy()
    net.frequency.unit = "Hz"  # exact frequencies: no scaling by 1e9 and back
    z0 = np.asarray(net.z0)
    if np.any(z0.imag != 0) or np.any(z0.real <= 0):
        raise LossLaneError(
            f"network {network.name!r}: Touchstone needs real, positive reference impedances"
        )
    if ver == "1.0" and np.unique(z0.real).size > 1:
        raise LossLaneError(
            f"network {network.name!r} has different reference impedances per port "
            f"({np.unique(z0.real).tolist()} ohm); Touchstone version 1 holds a single one, "
            "use version 2"
        )
    if ver != "1.0" and np.any(z0 != z0[0]):
        raise LossLaneError(
            f"network {network.name!r}: its reference impedances vary with frequency, which "
            "Touchstone cannot hold"
        )
    if form == "db":
        s = net.s
        mag = np.abs(s)
        tiny = mag < DB_FLOOR
        if np.any(tiny):
            net.s = np.where(tiny, DB_FLOOR * np.exp(1j * np.angle(s)), s)
    net.comments = "\n".join(header_lines(network, scenario, order, comments))
    return net.write_touchstone(
        return_string=True, form=form, version=ver, skrf_comment=False, write_noise=False
    )


def write_touchstone(
    network: skrf.Network,
    path: str | os.PathLike,
    version: int | str = 1,
    form: str = "ri",
    comments: Iterable[str] = (),
    scenario: str | None = None,
    order: str = DEFAULT_ORDER,
) -> Path:
    """Write ``network`` to ``path`` as Touchstone ``version`` 1 or 2 in ``form``
    ('ri' | 'ma' | 'db'), atomically; returns the path.

    ``order`` names the 4-port numbering the network already has (it is described in the
    header, not applied: see :func:`losslane.network.cascade.build_network`). Version 1
    needs the extension ``.s<N>p`` (readers take the port count from it); version 2 also
    accepts ``.ts``.
    """
    p = Path(path)
    ext = p.suffix.lower()
    want = f".s{network.nports}p"
    ver = _version(version)
    if ext != want and not (ver != "1.0" and ext == ".ts"):
        also = " or .ts" if ver != "1.0" else ""
        raise LossLaneError(
            f"touchstone path '{p}': a {network.nports}-port file needs the extension {want}{also}"
        )
    text = touchstone_text(network, ver, form, comments, scenario, order)
    directory = p.parent if str(p.parent) else Path(".")
    if not directory.is_dir():
        raise LossLaneError(f"touchstone path '{p}': directory '{directory}' does not exist")
    write_text(p, text, encoding="ISO-8859-1")
    return p

"""Strict JSON (RFC 8259) for every JSON losslane prints or writes: no ``NaN``, no
``Infinity`` -- values a strict parser refuses.

A number that has no finite value becomes ``null``, and the object holding it says why in
a ``no_value`` entry: ``{"loss_db": null, "no_value": {"loss_db": "+inf: unbounded"}}``
(for a list, the reason names the entries: ``"entries 0, 3: +inf: unbounded"``). An
infinite loss is a legitimate answer (a DC block at 0 Hz, an open); NaN is not one and
is reported as "not a number" so that it can be traced.

``dumps`` is the one writer (``sanitize`` then ``json.dumps(..., allow_nan=False)``);
``non_finite`` lists where a document holds non-finite numbers, for tests that check a
producer gives none before the sanitiser hides them.
"""

from __future__ import annotations

import json
import math
import os
from collections.abc import Mapping
from typing import Any

#: the key of the reasons for the nulls of an object
NO_VALUE = "no_value"


def _reason(x: float) -> str:
    if math.isnan(x):
        return "not a number"
    return "+inf: unbounded" if x > 0 else "-inf: unbounded"


def _number(x: Any) -> Any:
    """numpy scalars as Python numbers (json cannot write them)."""
    if hasattr(x, "item") and not isinstance(x, (list, dict, str)):
        try:
            return x.item()
        except (TypeError, ValueError):
            return x
    return x


def _bad(x: Any) -> bool:
    return isinstance(x, float) and not math.isfinite(x)


def sanitize(obj: Any) -> Any:
    """A copy of ``obj`` (dicts, lists, tuples, numbers, text, numpy scalars and arrays)
    with every non-finite float replaced by None and the reason recorded in the
    enclosing object's ``no_value`` (see the module docstring)."""
    return _clean(obj)[0]


def _clean(obj: Any) -> tuple[Any, str | None]:
    """(clean copy, reason if ``obj`` itself is a non-finite number or a list holding
    some)."""
    obj = _number(obj)
    if hasattr(obj, "tolist"):  # numpy arrays
        obj = obj.tolist()
    if _bad(obj):
        return None, _reason(obj)
    if isinstance(obj, Mapping):
        out: dict = {}
        reasons: dict[str, str] = {}
        for k, v in obj.items():
            c, why = _clean(v)
            out[str(k)] = c
            if why is not None:
                reasons[str(k)] = why
        if reasons:
            given = out.get(NO_VALUE)
            merged = dict(given) if isinstance(given, Mapping) else {}
            merged.update(reasons)
            out[NO_VALUE] = merged
        return out, None
    if isinstance(obj, (list, tuple)):
        items = []
        bad: dict[str, list[int]] = {}
        for i, v in enumerate(obj):
            c, why = _clean(v)
            items.append(c)
            if why is not None:
                bad.setdefault(why, []).append(i)
        if not bad:
            return items, None
        parts = []
        for why, idx in bad.items():
            shown = ", ".join(str(i) for i in idx[:10]) + (", ..." if len(idx) > 10 else "")
            parts.append(f"{'entry' if len(idx) == 1 else 'entries'} {shown}: {why}")
        return items, "; ".join(parts)
    return obj, None


#: set this environment variable to 1 and ``dumps`` raises on NaN instead of writing null
#: (the test suite does: a NaN reaching an output is a bug to find, not to hide)
RAISE_ON_NAN = "LOSSLANE_JSON_RAISE_ON_NAN"


def dumps(obj: Any, indent: int | None = None) -> str:
    """``obj`` as strict JSON text (see ``sanitize``). With the environment variable
    ``RAISE_ON_NAN`` set to 1, a NaN anywhere in ``obj`` is a ValueError naming its path."""
    if os.environ.get(RAISE_ON_NAN) == "1":
        nans = [p for p in non_finite(obj) if p.endswith("= nan")]
        if nans:
            raise ValueError("NaN in a JSON output: " + "; ".join(nans[:5]))
    return json.dumps(sanitize(obj), indent=indent, allow_nan=False)


def non_finite(obj: Any, path: str = "$") -> list[str]:
    """The paths (``$.budget.checks[0].loss_db``) of the non-finite numbers in ``obj``."""
    obj = _number(obj)
    if hasattr(obj, "tolist"):
        obj = obj.tolist()
    if _bad(obj):
        return [f"{path} = {obj}"]
    out: list[str] = []
    if isinstance(obj, Mapping):
        for k, v in obj.items():
            out += non_finite(v, f"{path}.{k}")
    elif isinstance(obj, (list, tuple)):
        for i, v in enumerate(obj):
            out += non_finite(v, f"{path}[{i}]")
    return out


def loads(text: str) -> Any:
    """Parse ``text`` strictly: ``NaN``/``Infinity`` are errors (ValueError)."""

    def refuse(token: str) -> Any:
        raise ValueError(f"not strict JSON: {token}")

    return json.loads(text, parse_constant=refuse)


__all__ = ["NO_VALUE", "RAISE_ON_NAN", "dumps", "loads", "non_finite", "sanitize"]

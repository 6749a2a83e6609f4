"""What a build modelled each line, via and skewed segment with: the model used for every
[lines.*] section (closed form or field solver, and why), the derived geometry of every
via drawn from a stackup (barrel and stub lengths, impedances, pad capacitance, stub
notch), and the extra length of every skewed pair segment. Text for the terminal,
objects for ``--json``, lines for the report page."""

from __future__ import annotations

import numpy as np

from losslane.units import MIL

#: the frequency at which via impedances are quoted
QUOTE_HZ = 1e9


def lines_json(result) -> list[dict]:
    """One object per [lines.*] section used by the channel."""
    sc = result.scenario
    used = dict.fromkeys(s.line for s in sc.channel if s.type == "line")
    return [sc.line_models[n].to_json() for n in used if n in sc.line_models]


def _finite(x: float) -> float | None:
    return float(x) if np.isfinite(x) else None


def vias_json(result) -> list[dict]:
    """One object per via drawn from its drill geometry (lengths in m, impedances in ohm
    at 1 GHz, capacitances in F, each stub's quarter-wave frequency in Hz, None without
    that stub)."""
    out = []
    for blk in _unwrapped(result.blocks):
        g = getattr(blk, "geometry", None)
        if g is None:
            continue
        z = blk.impedances(QUOTE_HZ)
        item = {
            "name": blk.name,
            "stackup": g.stackup.name,
            "from": g.entry.name,
            "to": g.exit.name,
            "barrel_m": g.barrel_length,
            "stub_above_m": g.stub_above_length,
            "stub_below_m": g.stub_below_length,
            "backdrill": g.backdrill,
            "drill_m": g.drill,
            "antipad_m": g.antipad,
            "pad_m": g.pad,
            "pitch_m": g.pitch,
            "impedance_ohm": z.get("single"),
            "pad_capacitance_f": list(blk.pad_capacitance) if g.pad is not None else None,
            "stub_notch_hz": _finite(blk.stub_notch("below")),
            "stub_above_notch_hz": _finite(blk.stub_notch("above")),
        }
        if "odd" in z:
            item.update(
                z_even_ohm=z["even"],
                z_odd_ohm=z["odd"],
                z_diff_ohm=2 * z["odd"],
                antipad_shape=g.shape,
            )
        out.append(item)
    return out


def skews_json(result) -> list[dict]:
    """One object per skewed pair segment: the longer leg, its extra length (m) and the
    skew as given as a time (s), if it was."""
    return [
        {
            "name": b.name,
            "kind": b.kind,
            "longer_leg": b.longer,
            "extra_m": abs(b.extra),
            "skew_s": b.skew_time,
        }
        for b in result.blocks
        if hasattr(b, "extra")
    ]


def _unwrapped(blocks):
    for b in blocks:
        yield getattr(b, "block", b)


def models_text(result) -> str:
    """The lines, vias and skews of a build, one line each ("" when there is nothing to
    say beyond closed-form lines written with explicit heights)."""
    lines = lines_json(result)
    vias, skews = vias_json(result), skews_json(result)
    plain = all(m["layer"] is None and m["solver"] == "closed-form" for m in lines)
    if plain and not vias and not skews:
        return ""
    out = ["lines, vias and skew as modelled"]
    sc = result.scenario
    for m in lines:
        out.append("  line " + sc.line_models[m["name"]].text())
    for v in vias:
        parts = [
            f"  via {v['name']}: {v['from']} -> {v['to']}, barrel {v['barrel_m'] / MIL:.4g} mil",
            f"stub above {v['stub_above_m'] / MIL:.4g} mil",
            f"stub below {v['stub_below_m'] / MIL:.4g} mil"
            + (f" (back-drilled through {v['backdrill']})" if v["backdrill"] else ""),
        ]
        if v["impedance_ohm"] is not None:
            parts.append(f"coaxial barrel {v['impedance_ohm']:.1f} ohm")
        else:
            parts.append(
                f"pair barrels Z_diff {v['z_diff_ohm']:.1f} ohm (odd {v['z_odd_ohm']:.1f}, "
                f"even {v['z_even_ohm']:.1f} ohm per line, {v['antipad_shape']} antipad)"
            )
        if v["pad_capacitance_f"] is not None:
            a, b = v["pad_capacitance_f"]
            parts.append(f"pads {a * 1e15:.1f} / {b * 1e15:.1f} fF")
        notches = [
            f"{v[k] / 1e9:.3g} GHz ({side})"
            for k, side in (("stub_above_notch_hz", "above"), ("stub_notch_hz", "below"))
            if v[k] is not None
        ]
        if notches:
            parts.append("stub notch " + ", ".join(notches))
        out.append(", ".join(parts))
    for s in skews:
        t = "" if s["skew_s"] is None else f" ({s['skew_s'] * 1e12:.4g} ps)"
        out.append(
            f"  skew {s['name']}: leg {s['longer_leg']} longer by "
            f"{s['extra_m'] / MIL:.4g} mil{t}, an uncoupled line of that leg alone"
        )
    return "\n".join(out)


def models_lines(result) -> list[str]:
    """The same, as plain lines for the report page's header."""
    text = models_text(result)
    return [ln.strip() for ln in text.splitlines()[1:]] if text else []


__all__ = ["lines_json", "models_lines", "models_text", "skews_json", "vias_json"]

"""A picture of a field-solved cross-section: its materials as the solver meshed them, the
conductors, equipotential lines and electric field lines. Users check their geometry by
looking at it."""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np

from losslane.errors import LossLaneError
from losslane.report.charts import save_figure, user_text
from losslane.report.output import check_output_file
from losslane.units import MIL

_FORMATS = (".png", ".svg", ".pdf")
_COPPER = "#b87333"


@user_text
def plot_section(section, path: str | Path, key: str = "--plot") -> Path:
    """Draw ``section`` (a FieldSection) to ``path`` (.png, .svg or .pdf), written to a
    temporary name first and renamed, so a failure leaves no half-written file.

    The excitation shown is the signal conductor at 1 V for one conductor, the odd
    (differential) mode +1 V / -1 V for a pair, conductor 1 at 1 V otherwise.
    """
    from losslane.xsection.fieldsolve.section import FieldSection
    from losslane.xsection.fieldsolve.solve import fields, level_of

    path = Path(path)
    if path.suffix.lower() not in _FORMATS:
        raise LossLaneError(
            f"{key} {str(path)!r}: unknown picture format; use a name ending in "
            + ", ".join(_FORMATS)
        )
    if not isinstance(section, FieldSection):
        raise LossLaneError(f"{key} needs the field solver (--solver field)")
    check_output_file(path, key)

    import matplotlib

    matplotlib.use("Agg", force=False)
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.colors import ListedColormap
    from matplotlib.figure import Figure
    from matplotlib.patches import Patch, Polygon
    from matplotlib.tri import LinearTriInterpolator, Triangulation

    geom = section.geometry
    solved = fields(geom, level_of(section.accuracy))
    mesh = solved.mesh
    nv = mesh.p.shape[1]
    u = solved.potential[:nv]
    n = u.shape[1]
    if n == 2:
        phi, title_mode, vmin = u[:, 0] - u[:, 1], "odd mode, +1 V / -1 V", -1.0
    else:
        phi, title_mode, vmin = u[:, 0], "conductor 1 at 1 V", 0.0

    # the window: the structure and a margin of its size
    xs = [x for tr in geom.traces for x in tr.corners_x if math.isfinite(x)]
    span = max(max(xs) - min(xs), geom.stack_top)
    x0, x1 = min(xs) - 0.9 * span, max(xs) + 0.9 * span
    y0 = 0.0 if geom.plane_below else -0.6 * span
    top_struct = max([geom.stack_top] + [tr.top for tr in geom.traces])
    if geom.coating is not None:
        top_struct += geom.coating.thickness
    y1 = geom.stack_top if geom.plane_above else top_struct + 0.7 * span

    s = 1.0 / MIL
    tri = Triangulation(mesh.p[0] * s, mesh.p[1] * s, mesh.t.T)
    regions = geom.regions()
    palette = ["#dfe8d0", "#cfdcea", "#ead9c6", "#d9d2e9", "#e9e3c0", "#c8e3df"]
    colors = []
    for i, (name, _) in enumerate(regions):
        if name == "air":
            colors.append("#ffffff")
        elif name == "coating":
            colors.append("#8fc79a")
        else:
            colors.append(palette[i % len(palette)])

    fig = Figure(figsize=(9.0, 5.2), dpi=120)
    FigureCanvasAgg(fig)
    ax = fig.add_subplot(1, 1, 1)
    ax.tripcolor(
        tri,
        facecolors=geom_regions(solved),
        cmap=ListedColormap(colors),
        vmin=-0.5,
        vmax=len(colors) - 0.5,
        edgecolors="face",
        linewidth=0.3,
        shading="flat",
    )
    levels = np.linspace(vmin, 1.0, 21 if vmin < 0 else 11)[1:-1]
    ax.tricontour(tri, phi, levels=levels, colors="#3060a0", linewidths=0.7)

    # field lines: E = -grad(phi) on a regular grid, masked inside metal
    gx = np.linspace(x0 * s, x1 * s, 220)
    gy = np.linspace(y0 * s, y1 * s, 140)
    X, Y = np.meshgrid(gx, gy)
    ex, ey = LinearTriInterpolator(tri, phi).gradient(X, Y)
    ex, ey = -np.ma.filled(ex, np.nan), -np.ma.filled(ey, np.nan)
    ax.streamplot(
        gx,
        gy,
        ex,
        ey,
        density=1.1,
        color="#c04040",
        linewidth=0.5,
        arrowsize=0.6,
        broken_streamlines=True,
    )

    for tr in geom.traces:
        xl, xr, tl, trr = (max(min(v, x1), x0) for v in tr.corners_x)
        if tr.thickness > 0:
            pts = [(xl, tr.y), (xr, tr.y), (trr, tr.top), (tl, tr.top)]
            ax.add_patch(
                Polygon(
                    np.array(pts) * s,
                    closed=True,
                    facecolor=_COPPER,
                    edgecolor="#6b3e12",
                    linewidth=0.8,
                    zorder=5,
                )
            )
        else:
            ax.plot([xl * s, xr * s], [tr.y * s, tr.y * s], color=_COPPER, linewidth=2.5, zorder=5)
    bar = 0.04 * (y1 - y0) * s
    if geom.plane_below:
        ax.add_patch(
            Polygon(
                [(x0 * s, 0), (x1 * s, 0), (x1 * s, -bar), (x0 * s, -bar)],
                facecolor=_COPPER,
                edgecolor="none",
                zorder=5,
            )
        )
    if geom.plane_above:
        yt = geom.stack_top * s
        ax.add_patch(
            Polygon(
                [(x0 * s, yt), (x1 * s, yt), (x1 * s, yt + bar), (x0 * s, yt + bar)],
                facecolor=_COPPER,
                edgecolor="none",
                zorder=5,
            )
        )
    for yf in geom.interfaces[1:-1]:
        ax.axhline(yf * s, color="#808080", linewidth=0.5, linestyle=":")

    ax.set_xlim(x0 * s, x1 * s)
    ax.set_ylim(
        y0 * s - (bar if geom.plane_below else 0), y1 * s + (bar if geom.plane_above else 0)
    )
    ax.set_aspect("equal")
    ax.set_xlabel("x [mil]")
    ax.set_ylabel("y [mil]")
    handles = []
    present = set(np.unique(solved.grid.region).tolist())
    for i, ((name, diel), col) in enumerate(zip(regions, colors, strict=True)):
        if i not in present:
            continue
        label = name if diel is None else f"{name}: Dk {diel.dk:g}, Df {diel.df:g}"
        handles.append(Patch(facecolor=col, edgecolor="#808080", label=label))
    handles.append(Patch(facecolor=_COPPER, label="conductors"))
    ax.legend(handles=handles, loc="upper right", fontsize=7, framealpha=0.9)
    summary = _summary(section)
    ax.set_title(
        f"{section.kind} - field solver ({section.accuracy}); {title_mode}\n{summary}", fontsize=9
    )
    fig.tight_layout()

    return save_figure(fig, path)


def geom_regions(solved) -> np.ndarray:
    """Region index of every triangle of the mesh of ``solved`` (a ``solve.Fields``)."""
    return solved.grid.region.astype(float)


def _summary(section) -> str:
    from losslane.report.line import line_json
    from losslane.xsection.fieldsolve.geometry import F_REF

    props = line_json(section.line_values(np.array([F_REF])), section.solver_report())
    at = f"at {F_REF / 1e9:g} GHz"
    est = props["field_solver"]["error_estimate"].get("z0")
    err = "" if est is None else f"  (estimated discretisation error {100 * est:.2g} %)"
    if "z_diff_ohm" in props:
        return (
            f"Z_diff {props['z_diff_ohm'][0]:.2f} ohm, Z_common {props['z_common_ohm'][0]:.2f}"
            f" ohm, eps_eff odd {props['eps_eff_odd'][0]:.3f} {at}{err}"
        )
    if "z0_ohm" in props:
        return f"Z0 {props['z0_ohm'][0]:.2f} ohm, eps_eff {props['eps_eff'][0]:.3f} {at}{err}"
    return f"{section.n_conductors} conductors"

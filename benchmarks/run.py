"""Run every benchmark module in this directory and print one table (``make bench``).

Convention for benchmark modules (add your own as ``benchmarks/bench_<topic>.py``):

* the module defines ``run() -> list[Row]`` and does its imports of losslane inside
  ``run`` (or at module level; either is fine, the runner imports each module once);
* a row is a tuple ``(name, measured, target, unit)``: ``name`` a short description,
  ``measured`` the figure (a median over repeats, so one slow run on a shared machine does
  not decide it), ``target`` the goal in the same unit or ``None`` for a figure with no
  goal, ``unit`` e.g. ``"ms"``, ``"s"`` or ``"x"`` (a ratio);
* lower is better: a row passes when ``measured <= target``. Express a "higher is better"
  goal as its reciprocal or as a ratio that should stay below a bound;
* ``run`` must not print, must finish in well under a minute, and must not depend on
  other benchmark modules (shared helpers live in ``benchkit.py``, which is not one).

Usage: ``python benchmarks/run.py [NAME ...]`` runs all modules, or only those whose file
name contains one of the NAMEs. The exit code is 0 even when a target is missed: speed
goals are reported, not enforced (a loaded shared machine would make them flaky); the
table's last column says which rows missed.
"""

from __future__ import annotations

import importlib.util
import sys
import time
import traceback
from pathlib import Path

HERE = Path(__file__).resolve().parent
SRC = HERE.parent / "src"

Row = tuple[str, float, float | None, str]


def _load(path: Path):
    spec = importlib.util.spec_from_file_location(path.stem, path)
    module = importlib.util.module_from_spec(spec)
    assert spec.loader is not None
    spec.loader.exec_module(module)
    return module


def _fmt(value: float | None) -> str:
    if value is None:
        return "-"
    return f"{value:.3g}" if abs(value) < 1e4 else f"{value:.4g}"


def main(argv: list[str]) -> int:
    # run from a source checkout without installing: prefer this tree's src/
    if SRC.is_dir() and str(SRC) not in sys.path:
        sys.path.insert(0, str(SRC))
    wanted = argv[1:]
    paths = sorted(HERE.glob("bench_*.py"))
    if wanted:
        paths = [p for p in paths if any(w in p.stem for w in wanted)]
    rows: list[tuple[str, Row]] = []
    failures = 0
    t0 = time.perf_counter()
    for path in paths:
        try:
            module = _load(path)
            for row in module.run():
                rows.append((path.stem.removeprefix("bench_"), tuple(row)))
        except Exception:  # report and go on with the other modules
            failures += 1
            print(f"{path.name}: failed\n{traceback.format_exc()}", file=sys.stderr)
    header = ("module", "benchmark", "measured", "target", "unit", "result")
    body = []
    for mod, (name, measured, target, unit) in rows:
        verdict = "" if target is None else ("ok" if measured <= target else "MISSED")
        body.append((mod, name, _fmt(measured), _fmt(target), unit, verdict))
    widths = [max(len(r[i]) for r in [header, *body]) for i in range(len(header))]
    for r in [header, tuple("-" * w for w in widths), *body]:
        cells = [r[0].ljust(widths[0]), r[1].ljust(widths[1])]
        cells += [c.rjust(w) for c, w in zip(r[2:4], widths[2:4], strict=True)]
        cells += [r[4].ljust(widths[4]), r[5]]
        print("  ".join(cells).rstrip())
    print(
        f"\n{len(rows)} figures from {len(paths)} modules in {time.perf_counter() - t0:.1f} s"
        + (f"; {failures} module(s) failed" if failures else "")
    )
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))

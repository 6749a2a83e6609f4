"""Hostile input, property-based (issue 11): generated scenarios (valid, and valid ones with
one thing broken) -- plain channels, channels on stackups (lines on layers, drilled vias,
skew) and on group lines with crosstalk, with budgets (checks, bands, masks), [plots],
[time] and [compare] --, Touchstone texts (valid and corrupted), and the options of
``line``, ``build``, ``inspect``, ``extract``, ``fit`` and ``sweep`` (plans valid and
broken). Whatever the input:

* the exit code is 0 or 2 (a sweep: 1 when some of its cases failed, each error in its
  table) and nothing raises (a traceback fails the test);
* a refusal is one ``error:`` line naming the offending key -- a missing key as missing,
  a bad imported file by its path -- and leaves no file behind;
* a success prints strict JSON (RFC 8259: no NaN or Infinity) with no NaN hidden in it,
  writes only the files it lists, and its S-parameters are finite, passive (largest
  singular value <= 1 + 1e-9) and reciprocal (max |S - S^T| <= 1e-9) -- the IEEE
  370-2020 passivity and reciprocity criteria at a 1e-9 tolerance -- unless a file was
  accepted ``as_is`` (the outputs then say they carry no guarantee).

Excluded for now, and why: differential channels whose insertion loss exceeds 100 dB are
not held to the passivity/reciprocity bound (very lossy coupled pairs lose precision in
the modal path; that is being fixed separately), and the generated valid channels stay
well below it (lines of a few inches, sweeps to 40 GHz). Imported files in the valid
channels always hold a 0 Hz point (the DC extrapolation of files without one is not
exercised here). The field solver runs at its coarsest accuracy, and only where a line
needs it (a mask, two laminates, a group of traces) or asks for it; group channels get a
handful of examples (a solve per example).

Example counts are sized for ``make test`` (well under two minutes on two cores);
``make soak`` runs the same properties with twenty times as many random examples.
"""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

import numpy as np
from hostile_boards import group_scenario, stackup_scenario
from hostile_commands import (
    CommandCase,
    broken_sweep_case,
    extract_case,
    fit_case,
    inspect_case,
    sweep_case,
)
from hostile_common import check_network, finite_tree, no_nan_reason, run_cli, strict_json
from hostile_strategies import (
    Case,
    broken_scenario,
    line_options,
    toml_text,
    touchstone_case,
    valid_scenario,
)
from hypothesis import HealthCheck, event, given, note, settings
from hypothesis import strategies as st

from losslane.errors import LossLaneError
from losslane.network.touchstone import read_touchstone

settings.register_profile(
    "fast",
    deadline=None,
    suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow],
    derandomize=True,
)
settings.register_profile(
    "soak",
    deadline=None,
    suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow],
)
SOAK = os.environ.get("LOSSLANE_SOAK") == "1"
settings.load_profile("soak" if SOAK else "fast")


def examples(n: int) -> int:
    """``n`` examples in ``make test``; twenty times as many under ``make soak``."""
    return 20 * n if SOAK else n


#: a differential output beyond this insertion loss is not held to the 1e-9 bounds (see
#: the module docstring)
PAIR_LOSS_LIMIT_DB = 100.0


def _write_case(directory: Path, case: Case) -> Path:
    for name, content in case.files.items():
        p = directory / name
        if isinstance(content, bytes):
            p.write_bytes(content)
        else:  # TOML is UTF-8; Touchstone files are read as Latin-1
            p.write_text(content, encoding="utf-8" if name.endswith(".toml") else "latin-1")
    scenario = directory / "lane.toml"
    scenario.write_text(toml_text(case.doc), encoding="utf-8")
    return scenario


def _listing(directory: Path) -> set[Path]:
    return set(directory.rglob("*"))


def _check_success(out: str, out_dir: Path, case: Case) -> None:
    doc = strict_json(out)
    no_nan_reason(doc)
    assert finite_tree(doc)
    written = {Path(p).resolve() for p in doc["files"]}
    assert written == {p.resolve() for p in out_dir.iterdir()}  # only what it lists
    budget_json = [p for p in written if p.name.endswith("-budget.json")]
    assert len(budget_json) == 1
    no_nan_reason(strict_json(budget_json[0].read_text(encoding="utf-8")))
    net = read_touchstone(doc["touchstone"])
    s = np.asarray(net.s)
    assert net.nports == (case.nports or (4 if case.differential else 2))
    assert np.all(np.isfinite(s))
    if case.as_is:  # a file accepted as it is: the outputs say they carry no guarantee
        assert doc["guaranteed_passive_reciprocal"] is False
        return
    assert doc["guaranteed_passive_reciprocal"] is True
    if case.nports:  # a channel on group lines: the victim's own file too
        for p in written:
            if p.suffix.startswith(".s") and p.suffix.endswith("p"):
                check_network(np.asarray(read_touchstone(p).s), 1e-9)
    if case.differential:
        il = -20 * np.log10(np.maximum(np.abs(s[:, 2, 0]), 1e-300))
        if float(np.max(il)) > PAIR_LOSS_LIMIT_DB:
            note(f"differential loss {np.max(il):.1f} dB: passivity not asserted")
            return
    check_network(s, 1e-9)


def _run_build(case: Case, plots: bool = False) -> tuple[int, str, str, Path]:
    import contextlib
    import io

    d = Path(tempfile.mkdtemp(prefix="hostile-"))
    scenario = _write_case(d, case)
    note(scenario.read_text(encoding="utf-8"))
    out_dir = d / "out"
    argv = ["build", str(scenario), "--out", str(out_dir), "--json"]
    if not plots:
        argv.append("--no-plots")
    from losslane.cli import main

    stdout, stderr = io.StringIO(), io.StringIO()
    try:
        with contextlib.redirect_stdout(stdout), contextlib.redirect_stderr(stderr):
            rc = main(argv)
    except BaseException:
        _cleanup(d)  # a traceback fails the test; its scratch folder goes all the same
        raise
    return rc, stdout.getvalue(), stderr.getvalue(), d


def _cleanup(d: Path) -> None:
    import shutil

    shutil.rmtree(d, ignore_errors=True)


def _refusal(err: str) -> str:
    lines = [ln for ln in err.splitlines() if ln.startswith("error: ")]
    assert len(lines) == 1, err
    return lines[0]


@settings(max_examples=examples(40))
@given(valid_scenario())
def test_valid_scenarios_build_passive_reciprocal_strict_outputs(case):
    rc, out, err, d = _run_build(case)
    try:
        note(err)
        assert rc == 0, err
        _check_success(out, d / "out", case)
        assert [p.name for p in d.iterdir() if p.name.startswith(".")] == []
    finally:
        _cleanup(d)


@settings(max_examples=examples(6))
@given(st.one_of(valid_scenario(), valid_scenario(), stackup_scenario(), group_scenario()))
def test_valid_scenarios_with_charts(case):
    rc, out, err, d = _run_build(case, plots=True)
    try:
        assert rc == 0, err
        _check_success(out, d / "out", case)
    finally:
        _cleanup(d)


@settings(max_examples=examples(150))
@given(broken_scenario())
def test_broken_scenarios_are_refused_naming_the_key(case):
    note(f"{case.what}: {case.key}")
    rc, out, err, d = _run_build(case)
    event(f"{case.what}: exit {rc}")
    try:
        note(err)
        assert rc in (0, 2), err
        if rc == 0:  # the mutation happened to be valid: the outputs must be sound
            _check_success(out, d / "out", case)
            return
        msg = _refusal(err)
        assert out == ""
        assert not (d / "out").exists()
        assert [p.name for p in d.iterdir() if p.name.startswith(".")] == []
        _names_key(case, msg)
    finally:
        _cleanup(d)


def _names_key(case: Case, msg: str) -> None:
    """A refusal names the broken key (a missing one as missing), or one of the keys
    that refer to it."""
    if case.what == "missing":
        assert "missing" in msg and case.key in msg, msg
    else:
        assert any(k in msg for k in (case.key, *case.also)), msg


def _refused_or_sound(case: Case, plots: bool = False) -> None:
    """Build a (possibly broken) case: exit 0 with sound outputs, or exit 2 naming the
    key, with nothing written."""
    rc, out, err, d = _run_build(case, plots)
    event(f"{case.what}: exit {rc}")
    try:
        note(err)
        assert rc in (0, 2), err
        if rc == 0:
            _check_success(out, d / "out", case)
            assert [p.name for p in d.iterdir() if p.name.startswith(".")] == []
            return
        assert case.what != "valid", err
        msg = _refusal(err)
        assert out == ""
        assert not (d / "out").exists()
        assert [p.name for p in d.iterdir() if p.name.startswith(".")] == []
        _names_key(case, msg)
    finally:
        _cleanup(d)


@settings(max_examples=examples(40))
@given(stackup_scenario())
def test_valid_stackup_scenarios(case):
    _refused_or_sound(case)


@settings(max_examples=examples(120))
@given(broken_scenario(stackup_scenario()))
def test_broken_stackup_scenarios(case):
    note(f"{case.what}: {case.key}")
    _refused_or_sound(case)


@settings(max_examples=examples(5))
@given(group_scenario())
def test_valid_group_scenarios(case):
    _refused_or_sound(case)


@settings(max_examples=examples(12))
@given(broken_scenario(group_scenario()))
def test_broken_group_scenarios(case):
    note(f"{case.what}: {case.key}")
    _refused_or_sound(case)


@settings(max_examples=examples(200))
@given(touchstone_case())
def test_touchstone_texts_read_or_refused_naming_file_and_line(case):
    note(case.text)
    d = Path(tempfile.mkdtemp(prefix="hostile-ts-"))
    try:
        p = d / case.name
        p.write_text(case.text, encoding="latin-1")
        try:
            net = read_touchstone(p)
        except LossLaneError as exc:
            event(f"{case.what}: refused")
            msg = str(exc)
            assert f"touchstone file '{p}'" in msg, msg
            if case.needle is not None:
                assert case.needle in msg, msg
            assert case.what != "valid", msg
            return
        event(f"{case.what}: read")
        assert case.needle is None, f"{case.what} accepted"
        f, s, z0 = np.asarray(net.f), np.asarray(net.s), np.asarray(net.z0)
        assert np.all(np.diff(f) > 0) and np.all(f >= 0)
        assert np.all(np.isfinite(s)) and np.all(np.abs(s) <= 10.0)
        assert np.all(np.isfinite(z0)) and np.all(z0.real > 0)
        if case.what == "valid":
            check_network(s, 1e-9)  # a lossy line model is passive and reciprocal
    finally:
        _cleanup(d)


@settings(max_examples=examples(40))
@given(touchstone_case())
def test_bad_imported_files_in_a_build_name_their_path(case):
    from hostile_common import SMALL

    files = {case.name: case.text}
    doc_text = SMALL + f'\n[[channel]]\ntouchstone = "{case.name}"\n'
    d = Path(tempfile.mkdtemp(prefix="hostile-b-"))
    try:
        for name, content in files.items():
            (d / name).write_text(content, encoding="latin-1")
        (d / "lane.toml").write_text(doc_text, encoding="utf-8")
        before = _listing(d)
        import contextlib
        import io

        from losslane.cli import main

        err = io.StringIO()
        with contextlib.redirect_stdout(io.StringIO()), contextlib.redirect_stderr(err):
            rc = main(["build", str(d / "lane.toml"), "--out", str(d / "out"), "--no-plots"])
        assert rc in (0, 2)
        if rc == 2:
            msg = _refusal(err.getvalue())
            assert case.name in msg, msg
            assert _listing(d) == before
        else:  # a 2-port file: named .s2p, or a version-2 file (its keyword counts)
            assert case.needle is None
            assert case.name.endswith(".s2p") or "[Version]" in case.text
    finally:
        _cleanup(d)


@settings(max_examples=examples(120))
@given(line_options())
def test_line_options(capsys, argv):
    note(repr(argv))
    rc, out, err = run_cli(capsys, *argv)
    event(f"line: exit {rc}")
    assert rc in (0, 2), err
    if rc == 0:
        doc = strict_json(out)
        no_nan_reason(doc)
        return
    assert out == ""
    if "Error:" in err:  # click's own usage errors name the option or argument
        assert "--" in err or "KIND" in err or "Missing argument" in err, err
    else:
        msg = _refusal(err)
        assert "--" in msg or "KIND" in msg, msg


@settings(max_examples=examples(25))
@given(
    out=st.one_of(
        st.sampled_from(["", " ", "/proc/x", "/proc", "/dev/null", "a\x00b", "no/such/dir/x"]),
        st.text(max_size=20),
    ),
    form=st.sampled_from(["ri", "ma", "db", "RI", "x"]),
    version=st.sampled_from(["1", "2", "3", "1.0"]),
)
def test_build_options(capsys, out, form, version):
    from hostile_common import SMALL

    d = Path(tempfile.mkdtemp(prefix="hostile-o-"))
    cwd = os.getcwd()
    try:
        os.chdir(d)
        (d / "lane.toml").write_text(SMALL, encoding="utf-8")
        before = _listing(d)
        rc, stdout, err = run_cli(
            capsys,
            "build",
            "lane.toml",
            "--out",
            out,
            "--form",
            form,
            "--touchstone-version",
            version,
            "--no-plots",
            "--json",
        )
        assert rc in (0, 2), err
        if rc == 2:
            assert _listing(d) == before
            assert "--out" in err or "--form" in err or "--touchstone-version" in err, err
        else:
            doc = strict_json(stdout)
            check_network(np.asarray(read_touchstone(doc["touchstone"]).s), 1e-9)
    finally:
        os.chdir(cwd)
        _cleanup(d)


# --- commands: inspect, extract, fit, sweep ------------------------------------------------


def _run_command(case: CommandCase) -> tuple[int, str, str, Path, set[Path], list[str]]:
    """Write the case's files into a scratch directory and run its command in-process:
    (exit code, stdout, stderr, directory, the listing before, argv)."""
    import contextlib
    import io

    from losslane.cli import main

    d = Path(tempfile.mkdtemp(prefix="hostile-c-"))
    for name, content in case.files.items():
        p = d / name
        p.parent.mkdir(parents=True, exist_ok=True)
        if isinstance(content, bytes):
            p.write_bytes(content)
        else:
            p.write_text(content, encoding="utf-8")
    argv = [a.replace("{dir}", str(d)) for a in case.argv]
    note(repr(argv))
    before = _listing(d)
    stdout, stderr = io.StringIO(), io.StringIO()
    try:
        with contextlib.redirect_stdout(stdout), contextlib.redirect_stderr(stderr):
            rc = main(argv)
    except BaseException:
        _cleanup(d)
        raise
    return rc, stdout.getvalue(), stderr.getvalue(), d, before, argv


def _command_refused(case: CommandCase, out: str, err: str, d: Path, before: set[Path]) -> None:
    """A refusal: nothing on stdout, one message naming an option, key or file of the
    case, and no file left behind."""
    assert out == ""
    keys = [k.replace("{dir}", str(d)) for k in case.keys]
    if "Error:" in err and "error: " not in err:  # click's own usage errors
        msg = err
    else:
        msg = _refusal(err)
    assert any(k in msg for k in keys) or "--" in msg, msg
    assert _listing(d) == before, sorted(map(str, _listing(d) - before))


def _command_succeeded(
    out: str, d: Path, before: set[Path], extra: set[Path] = frozenset()
) -> dict:
    """A success: strict, finite JSON whose ``files`` are the only new files (besides
    ``extra``)."""
    doc = strict_json(out)
    no_nan_reason(doc)
    assert finite_tree(doc)
    listed = {Path(p).resolve() for p in doc.get("files", [])}
    for key in ("library_file",):
        if doc.get(key):
            listed.add(Path(doc[key]).resolve())
    new = {p.resolve() for p in _listing(d) - before if p.is_file()}
    assert listed <= new, (listed, new)
    assert new - listed <= {p.resolve() for p in extra}, sorted(map(str, new - listed))
    return doc


def _command_property(case: CommandCase) -> None:
    rc, out, err, d, before, _ = _run_command(case)
    event(f"{case.argv[0]} {case.what}: exit {rc}")
    try:
        note(err)
        assert rc in (0, 2), err
        if rc == 2:
            assert not case.valid or any(m in err for m in case.may_refuse), err
            _command_refused(case, out, err, d, before)
        else:
            _command_succeeded(out, d, before)
    finally:
        _cleanup(d)


@settings(max_examples=examples(40))
@given(inspect_case())
def test_inspect_options(case):
    _command_property(case)


@settings(max_examples=examples(30))
@given(extract_case())
def test_extract_options(case):
    _command_property(case)


@settings(max_examples=examples(10))
@given(fit_case())
def test_fit_options(case):
    _command_property(case)


def _sweep_files(doc: dict, d: Path) -> set[Path]:
    """What a sweep writes besides its JSON's charts: the table, its parts and the cases'
    Touchstone files."""
    table = Path(doc["out"])
    extra = {table}
    for folder in (table.with_name(table.name + ".parts"), table.with_name(table.name + ".cases")):
        if folder.exists():
            extra |= set(folder.rglob("*"))
    return extra | {Path(p) for p in doc["charts"]}


def _check_table(doc: dict, cases: int | None, failed_ok: bool) -> None:
    import pyarrow.csv as pcsv
    import pyarrow.parquet as pq

    path = Path(doc["out"])
    table = pq.read_table(path) if path.suffix == ".parquet" else pcsv.read_csv(path)
    if cases is not None:
        assert table.num_rows == cases == doc["cases"]
    errors = table.column("error").to_pylist()
    assert sum(e is not None for e in errors) == doc["failed"], errors
    if not failed_ok:
        assert doc["failed"] == 0, errors
    for name in table.column_names:
        col = table.column(name)
        if col.type in ("double", "float"):
            values = [v for v in col.to_pylist() if v is not None]
            assert np.all(np.isfinite(values)), name


@settings(max_examples=examples(15))
@given(sweep_case())
def test_valid_sweep_plans(case):
    rc, out, err, d, before, _ = _run_command(case)
    try:
        note(err)
        assert rc == 0, err
        doc = strict_json(out)
        _check_table(doc, case.cases, failed_ok=False)
        _command_succeeded(out, d, before, _sweep_files(doc, d))
    finally:
        _cleanup(d)


@settings(max_examples=examples(60))
@given(broken_sweep_case())
def test_broken_sweep_plans(case):
    rc, out, err, d, before, _ = _run_command(case)
    event(f"sweep {case.what}: exit {rc}")
    try:
        note(err)
        assert rc in (0, 1, 2), err  # 1: some cases failed, their errors in the table
        if rc == 2:
            _command_refused(case, out, err, d, before)
            return
        doc = strict_json(out)
        _check_table(doc, None, failed_ok=True)
        _command_succeeded(out, d, before, _sweep_files(doc, d))
    finally:
        _cleanup(d)

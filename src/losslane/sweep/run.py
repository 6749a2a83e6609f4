"""Running a sweep on dask.distributed: chunks of cases as tasks, each finished chunk kept
as an atomic part file (so an interrupted run resumes), the parts joined into one table.

* The engine: a local cluster of worker processes sized to the machine's cores by
  default (processes, not threads: the field solver holds the GIL in places; each worker
  runs one task at a time with one thread of linear algebra), or an existing cluster at
  ``scheduler``. ``workers = 0`` runs the chunks in this process (small plans, tests).
* Chunks: cross-section cases evaluated in one array call are batched by the tens of
  thousands (one task per case would be dominated by scheduling); field-solved
  cross-sections and whole builds go a few per task. The plan -- with every file it needs
  as contents -- is sent to each worker once; tasks carry case numbers and return table
  columns, never solved cross-sections (each worker's field-solver cache stays its own).
* Resuming: ``<out>.parts/`` holds one part file per finished chunk and the plan's
  fingerprint; a re-run of the same plan into the same output computes only the missing
  chunks. A different plan refuses to reuse them.
"""

from __future__ import annotations

import os
from collections.abc import Callable
from pathlib import Path

from losslane.errors import LossLaneError
from losslane.sweep.plan import Plan

#: cases per task: closed-form cross-sections, field-solved ones, whole builds
CHUNK_VECTOR = 20_000
CHUNK_FIELD = 2
CHUNK_BUILD = 1


def chunk_size(plan: Plan) -> int:
    if plan.chunk:
        if isinstance(plan.chunk, bool) or not isinstance(plan.chunk, int) or plan.chunk < 1:
            raise LossLaneError(f"plan: chunk = {plan.chunk!r}: expected a whole number >= 1")
        return plan.chunk
    if plan.base is None:
        return CHUNK_BUILD
    solvers = {plan.base.get("solver", "closed-form")}
    solvers |= {v for p in plan.parameters if p.key == "solver" for v in p.values}
    return CHUNK_FIELD if "field" in solvers else CHUNK_VECTOR


def chunks(plan: Plan) -> list[list[int]]:
    size = chunk_size(plan)
    return [list(range(s, min(plan.cases, s + size))) for s in range(0, plan.cases, size)]


def _parts_dir(out: Path, plan: Plan) -> Path:
    parts = out.with_name(out.name + ".parts")
    stamp = parts / "plan.sha256"
    fp = plan.fingerprint()
    if parts.exists():
        if not parts.is_dir() or not stamp.is_file() or stamp.read_text().strip() != fp:
            raise LossLaneError(
                f"--out {str(out)!r}: {str(parts)!r} holds the parts of another plan (or is "
                "not a parts folder); remove it or choose another output"
            )
    else:
        parts.mkdir()
        stamp.write_text(fp + "\n")
    return parts


def _part_path(parts: Path, k: int) -> Path:
    return parts / f"part-{k:06d}.parquet"


def _write_part(parts: Path, k: int, result: dict) -> None:
    import pyarrow as pa
    import pyarrow.parquet as pq

    from losslane.atomic import write_atomic

    table = pa.Table.from_pydict(result["columns"])
    meta = {b"warnings": "\n".join(result["warnings"]).encode()}
    table = table.replace_schema_metadata(meta)
    write_atomic(_part_path(parts, k), lambda tmp: pq.write_table(table, tmp))


def _write_case_files(out: Path, result: dict) -> None:
    from losslane.atomic import write_atomic

    files = result.get("files") or {}
    if not files:
        return
    folder = out.with_name(out.name + ".cases")
    folder.mkdir(exist_ok=True)
    for case, (data, ext) in files.items():
        write_atomic(folder / f"case-{case + 1:06d}.{ext}", lambda tmp, d=data: tmp.write_bytes(d))


def _client(scheduler: str | None, workers: int | None):
    """A dask.distributed client: connected to ``scheduler``, or to a new local cluster of
    ``workers`` processes (default: the machine's cores)."""
    import logging

    import dask
    from distributed import Client, LocalCluster

    if scheduler:
        try:
            return Client(scheduler, timeout="20s"), None
        except OSError as exc:
            raise LossLaneError(f"--scheduler {scheduler!r}: cannot connect ({exc})") from None
    n = workers or os.cpu_count() or 1
    one_thread = {k: "1" for k in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS")}
    with dask.config.set({"distributed.nanny.pre-spawn-environ": one_thread}):
        cluster = LocalCluster(
            n_workers=n,
            threads_per_worker=1,
            processes=True,
            dashboard_address=None,
            silence_logs=logging.ERROR,
        )
    return Client(cluster), cluster


def run(
    plan: Plan,
    out: Path,
    *,
    workers: int | None = None,
    scheduler: str | None = None,
    progress: Callable[[int, int], None] | None = None,
):
    """Evaluate every case of ``plan``; returns the joined pyarrow table (its rows in case
    order) and the distinct warnings met. Finished chunks are kept in ``<out>.parts/``."""
    import pyarrow.parquet as pq

    all_chunks = chunks(plan)
    parts = out.with_name(out.name + ".parts")
    fresh = not parts.exists()
    parts = _parts_dir(out, plan)
    try:
        return _run(plan, out, parts, all_chunks, workers, scheduler, progress, pq)
    except LossLaneError:
        # bad input found while the cases run: leave nothing behind that this run began
        if fresh:
            import shutil

            shutil.rmtree(parts, ignore_errors=True)
            shutil.rmtree(out.with_name(out.name + ".cases"), ignore_errors=True)
        raise


def _run(plan: Plan, out: Path, parts: Path, all_chunks, workers, scheduler, progress, pq):
    from losslane.sweep.evaluate import evaluate_chunk

    todo = [k for k in range(len(all_chunks)) if not _part_path(parts, k).exists()]
    total = plan.cases
    done = sum(len(all_chunks[k]) for k in range(len(all_chunks)) if k not in set(todo))
    if progress is not None:
        progress(done, total)
    # the command line's --workers or --scheduler take precedence over the plan's
    if scheduler is None and workers is None:
        scheduler = plan.scheduler
    workers = plan.workers if workers is None else workers
    if todo and workers == 0 and not scheduler:
        for k in todo:
            result = evaluate_chunk(plan, all_chunks[k])
            _write_part(parts, k, result)
            _write_case_files(out, result)
            done += len(all_chunks[k])
            if progress is not None:
                progress(done, total)
    elif todo:
        from distributed import as_completed

        client, cluster = _client(scheduler, workers)
        try:
            shipped = client.scatter(plan, broadcast=True)
            futures = {
                client.submit(evaluate_chunk, shipped, all_chunks[k], pure=False): k for k in todo
            }
            for fut in as_completed(futures):
                k = futures[fut]
                result = fut.result()
                _write_part(parts, k, result)
                _write_case_files(out, result)
                done += len(all_chunks[k])
                if progress is not None:
                    progress(done, total)
        finally:
            client.close()
            if cluster is not None:
                cluster.close()
    return _join(parts, len(all_chunks), pq)


def _join(parts: Path, n: int, pq):
    import pyarrow as pa

    tables, messages = [], []
    for k in range(n):
        t = pq.read_table(_part_path(parts, k))
        meta = (t.schema.metadata or {}).get(b"warnings", b"").decode()
        messages += [m for m in meta.split("\n") if m]
        tables.append(t.replace_schema_metadata(None))
    table = pa.concat_tables(tables, promote_options="default")
    # the error column last
    names = [c for c in table.column_names if c != "error"] + ["error"]
    return table.select(names), list(dict.fromkeys(messages))


def write_table(table, out: Path) -> Path:
    """The table as Parquet (``.parquet``) or CSV (``.csv``), written atomically."""
    from losslane.atomic import write_atomic

    suffix = out.suffix.lower()
    if suffix == ".parquet":
        import pyarrow.parquet as pq

        return write_atomic(out, lambda tmp: pq.write_table(table, tmp))
    if suffix == ".csv":
        import pyarrow.csv as pcsv

        return write_atomic(out, lambda tmp: pcsv.write_csv(table, tmp))
    raise LossLaneError(f"--out {str(out)!r}: the table is written as .parquet or .csv")


__all__ = ["CHUNK_BUILD", "CHUNK_FIELD", "CHUNK_VECTOR", "chunks", "run", "write_table"]

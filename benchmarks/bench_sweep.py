"""Sweep throughput (`losslane sweep`):

* closed-form cases: >= 100 000 single-line cross-sections per second per worker after
  start-up (pairs >= 50 000), measured as one worker's chunk evaluation in-process (the
  batch path; two frequencies per case);
* field-solver cases: the throughput of two workers over that of one, on this two-core
  machine (goal >= 1.6), each worker one process with one thread of linear algebra; the
  ratio is of wall times of the same plan run on a fresh local cluster of 1 and 2
  workers, start-up excluded by a warm-up plan on the same cluster.
"""

from __future__ import annotations

import statistics
import time

LINES = """
name = "bench"
[base]
kind = "{kind}"
thickness = "1.4 mil"
height = "4 mil"
dielectric = "low-loss"
{extra}
[vary]
width = {{ start = "3 mil", stop = "8 mil", points = {n} }}
height = {{ start = "3 mil", stop = "6 mil", points = 100 }}
[results]
at = ["1 GHz", "28 GHz"]
"""

FIELD = """
name = "field bench"
[base]
kind = "microstrip"
thickness = "1.4 mil"
height = "4 mil"
dielectric = "low-loss"
solver = "field"
[vary]
width = {{ start = "4 mil", stop = "8 mil", points = {n} }}
[results]
at = ["1 GHz"]
"""


def _throughput(kind: str, extra: str) -> float:
    from losslane.sweep.evaluate import evaluate_chunk
    from losslane.sweep.plan import parse_plan

    plan = parse_plan(LINES.format(kind=kind, extra=extra, n=200))
    cases = list(range(20_000))
    evaluate_chunk(plan, cases[:100])  # warm-up
    times = []
    for _ in range(3):
        t0 = time.perf_counter()
        evaluate_chunk(plan, cases)
        times.append(time.perf_counter() - t0)
    return len(cases) / statistics.median(times)


def _field_wall(workers: int, n: int) -> float:
    from losslane.sweep.evaluate import evaluate_chunk
    from losslane.sweep.plan import parse_plan
    from losslane.sweep.run import _client, chunks

    plan = parse_plan(FIELD.format(n=n))
    warm = parse_plan(FIELD.format(n=2 * workers).replace("4 mil", "4.5 mil", 1))
    client, cluster = _client(None, workers)
    try:
        # warm-up on every worker: imports and the first mesh
        client.gather([client.submit(evaluate_chunk, warm, c, pure=False) for c in chunks(warm)])
        t0 = time.perf_counter()
        client.gather([client.submit(evaluate_chunk, plan, c, pure=False) for c in chunks(plan)])
        return time.perf_counter() - t0
    finally:
        client.close()
        cluster.close()


def run() -> list[tuple[str, float, float | None, str]]:
    single = _throughput("microstrip", "")
    pair = _throughput("microstrip-pair", 'spacing = "7 mil"')
    one = _field_wall(1, 16)
    two = _field_wall(2, 16)
    return [
        ("sweep: s per 100 000 closed-form microstrip cases, one worker", 1e5 / single, 1.0, "s"),
        ("sweep: s per 50 000 closed-form microstrip-pair cases, one worker", 5e4 / pair, 1.0, "s"),
        (
            "sweep: field-solved cases, wall with 2 workers / with 1 (1/1.6 = 0.625)",
            two / one,
            0.625,
            "ratio",
        ),
    ]

"""Design sweeps: a plan of cases (cross-sections or whole builds) run on dask.distributed
into one table. ``plan`` reads and checks a plan, ``evaluate`` computes a chunk of cases
(on any worker), ``run`` schedules the chunks and keeps the finished ones."""

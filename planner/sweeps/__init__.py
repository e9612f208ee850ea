"""Many plans at once: a lever compared (``compare``), an operating envelope of ambients x lever values
(``envelope``), a sweep of scenario files from a manifest (``manifest``, ``sweep``), all run on the
caller's executor (``executors``: a local pool or a dask.distributed cluster).  The levers are
``planner.checks.lever_values.LEVERS``, the one lever table.
"""

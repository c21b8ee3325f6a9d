"""Run ``ladder risk``'s chunks of paths on a dask scheduler (the optional ``scale`` extra:
``pip install ".[scale]"``).

``run_chunk`` (``ladder.analysis.risk``) is a pure function of its arguments, so each chunk is a
``dask.delayed`` task and ``dask.compute`` runs them on the chosen scheduler: ``"threads"`` (dask's
local default), ``"processes"``, ``"synchronous"``, or a ``dask.distributed`` client's when one is
active. The results come back in chunk order, so the outcome is the same as one chunk after another.
"""

from __future__ import annotations

from ladder.analysis.risk import run_chunk


def dask_runner(scheduler: str | None = None):
    """A ``run`` for ``risk_book``: (engine, [(paths, needs), ...]) -> each chunk's outcomes, in order."""
    import dask

    def run(engine, jobs):
        tasks = [dask.delayed(run_chunk)(engine, paths, needs) for paths, needs in jobs]
        return list(dask.compute(*tasks, scheduler=scheduler))

    return run

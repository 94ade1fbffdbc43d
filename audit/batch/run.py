"""Run a batch: every job through the same worker function, on local worker
processes or on a Dask cluster, with a progress bar, an index, and a clean stop.

* Local: a :class:`concurrent.futures.ProcessPoolExecutor` with ``jobs`` workers
  (all cores by default), each importing the audit once (``warm_up``).
* Dask: ``distributed.Client`` on a scheduler address, or on a ``LocalCluster``
  started for the batch; results stream back as they finish.  Nothing here
  stands in for the scheduler.

Ctrl-C (or SIGTERM) stops the batch: queued jobs are cancelled, the running ones
are interrupted, and each dataset's outputs are written all or nothing by
:func:`audit.report.write_outputs`, so a dataset folder is either complete or
untouched.  The index then lists the datasets that finished and says how many
did not.
"""

from __future__ import annotations

import os
import sys
import time
from dataclasses import dataclass
from typing import Callable, Sequence

from .index import write_index
from .jobs import Job
from .work import BatchSettings, Outcome, run_job, warm_up

__all__ = ["BatchSummary", "run_batch"]

_BLAS_THREADS = ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS")


@dataclass(frozen=True)
class BatchSummary:
    """What a batch did."""

    outcomes: tuple[Outcome, ...]
    n_jobs: int
    interrupted: bool
    seconds: float
    index_csv: str
    index_html: str

    def count(self, severity: str) -> int:
        return sum(1 for o in self.outcomes if o.severity == severity)

    def summary(self) -> str:
        rate = len(self.outcomes) / self.seconds if self.seconds > 0 else float("nan")
        parts = [f"{self.count(k)} {k}" for k in ("error", "fail", "warn", "pass") if self.count(k)]
        text = (f"{len(self.outcomes)} of {self.n_jobs} datasets audited in {self.seconds:.1f} s "
                f"({rate:.1f}/s): " + (", ".join(parts) or "none"))
        if self.interrupted:
            text += f"; stopped: {self.n_jobs - len(self.outcomes)} not audited"
        return text


def _progress(total: int, enabled: bool | None):
    from tqdm import tqdm

    # a bar is for a person at a terminal; in a log it would be noise
    show = sys.stderr.isatty() if enabled is None else enabled
    return tqdm(total=total, unit="dataset", disable=not show, file=sys.stderr, dynamic_ncols=True)


def _local(jobs: Sequence[Job], settings: BatchSettings, workers: int, on_done: Callable[[Outcome], None]) -> bool:
    """Run on local worker processes; returns True when interrupted."""
    import multiprocessing
    from concurrent.futures import ProcessPoolExecutor

    # one BLAS thread per worker process: with a multithreaded BLAS in every worker the
    # processes fight over the cores (a batch ran 2.5 times slower than on Dask, which
    # does the same); the variables are read when a fresh process loads numpy
    saved = {k: os.environ.get(k) for k in _BLAS_THREADS}
    os.environ.update({k: "1" for k in _BLAS_THREADS})
    try:
        pool = ProcessPoolExecutor(max_workers=workers, initializer=warm_up, initargs=(settings.profile,),
                                   mp_context=multiprocessing.get_context("spawn"))
        return _drain(pool, jobs, settings, workers, on_done)
    finally:
        for k, v in saved.items():
            if v is None:
                os.environ.pop(k, None)
            else:
                os.environ[k] = v


def _drain(pool, jobs, settings, workers, on_done) -> bool:
    from concurrent.futures import FIRST_COMPLETED, wait

    pending = set()
    queue = iter(jobs)
    left = True
    try:
        # keep a bounded number in flight: 10⁵ futures at once cost memory for nothing
        while left or pending:
            while left and len(pending) < 4 * workers:
                job = next(queue, None)
                if job is None:
                    left = False
                    break
                pending.add(pool.submit(run_job, job, settings))
            done, pending = wait(pending, return_when=FIRST_COMPLETED)
            for f in done:
                on_done(f.result())
    except KeyboardInterrupt:
        pool.shutdown(wait=True, cancel_futures=True)
        return True
    pool.shutdown(wait=True)
    return False


def _dask(jobs: Sequence[Job], settings: BatchSettings, workers: int, scheduler: str | None,
          on_done: Callable[[Outcome], None]) -> bool:
    """Run on a Dask cluster (the given scheduler, or a LocalCluster); True when interrupted."""
    from distributed import Client, LocalCluster, as_completed

    cluster = None
    if scheduler is None:
        cluster = LocalCluster(n_workers=workers, threads_per_worker=1, processes=True, dashboard_address=None)
    client = Client(scheduler or cluster)
    try:
        futures = [client.submit(run_job, job, settings, pure=False) for job in jobs]
        try:
            for f in as_completed(futures):
                on_done(f.result())
        except KeyboardInterrupt:
            client.cancel(futures)
            return True
        return False
    finally:
        client.close()
        if cluster is not None:
            cluster.close()


def run_batch(jobs: Sequence[Job], settings: BatchSettings, *, workers: int | None = None, backend: str = "local",
              scheduler: str | None = None, progress: bool | None = None) -> BatchSummary:
    """Audit every job; write each dataset's outputs and the collection index.

    Parameters
    ----------
    jobs : sequence of Job
    settings : BatchSettings
    workers : int, optional
        Worker processes (default: every core).  ``1`` runs in this process.
    backend : {'local', 'dask'}
    scheduler : str, optional
        A Dask scheduler address (``tcp://host:8786``); with ``backend='dask'`` and no
        address, a LocalCluster of ``workers`` processes is started for the batch.
    progress : bool, optional
        Show a progress bar (default: when stderr is a terminal).
    """
    workers = workers or os.cpu_count() or 1
    outcomes: list[Outcome] = []
    t0 = time.perf_counter()
    bar = _progress(len(jobs), progress)

    def done(o: Outcome) -> None:
        outcomes.append(o)
        bar.update(1)
        if o.error:
            bar.set_postfix_str(f"{sum(1 for x in outcomes if x.error)} errors", refresh=False)

    interrupted = False
    try:
        if backend == "dask":
            interrupted = _dask(jobs, settings, workers, scheduler, done)
        elif workers == 1:
            warm_up(settings.profile)
            try:
                for job in jobs:
                    done(run_job(job, settings))
            except KeyboardInterrupt:
                interrupted = True
        else:
            interrupted = _local(jobs, settings, workers, done)
    finally:
        bar.close()
    csv_path, html_path = write_index(settings.out_root, outcomes, profile=settings.profile,
                                      interrupted=len(jobs) - len(outcomes) if interrupted else 0)
    return BatchSummary(tuple(outcomes), len(jobs), interrupted, time.perf_counter() - t0, str(csv_path),
                        str(html_path))

"""One executor interface over local processes, a Dask cluster, or the calling process.

An executor maps a function over items and yields ``(index, outcome)`` in completion order,
where ``outcome`` is the function's return value, or a :class:`Lost` when the executor itself
failed for that item (a worker died, the cluster went away) — the function's own errors are
the function's business (:func:`valband.campaign.task.evaluate` never raises).

* :class:`LocalExecutor` — :class:`concurrent.futures.ProcessPoolExecutor` with ``workers``
  processes (default: all cores), started with the "spawn" method (a fresh interpreter: no
  inherited numba or BLAS thread pools), one numba/BLAS thread per worker.
* :class:`DaskExecutor` — a ``dask.distributed`` client connected to a scheduler address
  (``tcp://host:port``); the optional extra ``valband[screen]`` installs it.
* :class:`SerialExecutor` — the calling process, one item after the other (``workers = 0``;
  for debugging and small runs).

Closing the generator early (an interrupt) cancels what has not started.
"""

from __future__ import annotations

import os
from collections.abc import Callable, Iterator, Sequence
from dataclasses import dataclass

from valband.errors import InputError

__all__ = ["Lost", "Executor", "LocalExecutor", "DaskExecutor", "SerialExecutor",
           "make_executor", "DASK_CONNECT_TIMEOUT_S"]

#: Seconds to wait for a Dask scheduler before giving up.
DASK_CONNECT_TIMEOUT_S = 10.0


@dataclass(frozen=True)
class Lost:
    """The executor could not deliver an item's result (message says why)."""

    message: str


def _single_thread_worker() -> None:
    """Process initializer: one thread for numba and the BLAS libraries."""
    for var in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS",
                "NUMBA_NUM_THREADS"):
        os.environ[var] = "1"


class Executor:
    """Interface: ``imap_unordered(fn, items)``, ``close()``, ``name``, ``workers``."""

    name = "executor"
    workers = 1

    def imap_unordered(self, fn: Callable, items: Sequence) -> Iterator[tuple[int, object]]:
        """Yield (index into ``items``, outcome) as items complete."""
        raise NotImplementedError

    def close(self) -> None:
        """Release workers and connections."""

    def describe(self) -> dict:
        """JSON record of the executor (kind, workers, address)."""
        return {"kind": self.name, "workers": self.workers}

    def __enter__(self):
        return self

    def __exit__(self, *exc) -> None:
        self.close()


class SerialExecutor(Executor):
    """Run items in the calling process, in order."""

    name = "serial"

    def imap_unordered(self, fn, items):
        """Yield (index, outcome) in order."""
        for i, item in enumerate(items):
            yield i, fn(item)


class LocalExecutor(Executor):
    """Worker processes on this machine (``workers=None``: all cores)."""

    name = "local-processes"

    def __init__(self, workers: int | None = None) -> None:
        import multiprocessing
        from concurrent.futures import ProcessPoolExecutor

        n = workers or os.cpu_count() or 1
        self.workers = int(n)
        self._pool = ProcessPoolExecutor(max_workers=self.workers,
                                         mp_context=multiprocessing.get_context("spawn"),
                                         initializer=_single_thread_worker)

    def imap_unordered(self, fn, items):
        """Yield (index, outcome) as the worker processes finish."""
        from concurrent.futures import as_completed

        futures = {self._pool.submit(fn, item): i for i, item in enumerate(items)}
        try:
            for fut in as_completed(futures):
                try:
                    yield futures[fut], fut.result()
                except Exception as exc:  # noqa: BLE001 - a dead worker, not the candidate
                    yield futures[fut], Lost(f"{type(exc).__name__}: {exc}")
        finally:
            for fut in futures:
                fut.cancel()

    def close(self) -> None:
        """Shut the pool down (pending items are cancelled)."""
        self._pool.shutdown(wait=True, cancel_futures=True)


class DaskExecutor(Executor):
    """A ``dask.distributed`` cluster reached at ``address`` (or an existing client)."""

    name = "dask"

    def __init__(self, address: str | None = None, client=None,
                 timeout: float = DASK_CONNECT_TIMEOUT_S) -> None:
        try:
            from distributed import Client
        except ImportError:
            raise InputError(
                "a Dask scheduler was asked for, but dask.distributed is not installed; "
                "install the optional extra: pip install 'valband[screen]' (or "
                "'dask[distributed]'), or run without --scheduler to use local processes"
            ) from None
        self.address = address
        self._own = client is None
        if client is None:
            try:
                client = Client(address, timeout=f"{timeout}s", set_as_default=False)
            except (OSError, TimeoutError, ValueError) as exc:
                raise InputError(
                    f"cannot reach the Dask scheduler at {address!r} within {timeout:g} s "
                    f"({type(exc).__name__}: {exc}); check the address (e.g. "
                    "tcp://127.0.0.1:8786) and that the scheduler runs, or drop --scheduler to "
                    "use local worker processes. Nothing was computed and the database is "
                    "unchanged."
                ) from None
        self.client = client
        info = client.scheduler_info()
        self.workers = max(1, sum(int(w.get("nthreads", 1)) for w in
                                  info.get("workers", {}).values()))
        self.address = self.address or info.get("address")

    def imap_unordered(self, fn, items):
        """Yield (index, outcome) as the cluster finishes."""
        from distributed import as_completed

        futures = [self.client.submit(fn, item, pure=False) for item in items]
        index = {f.key: i for i, f in enumerate(futures)}
        try:
            for fut in as_completed(futures, loop=self.client.loop):
                try:
                    yield index[fut.key], fut.result()
                except Exception as exc:  # noqa: BLE001 - a lost worker, not the candidate
                    yield index[fut.key], Lost(f"{type(exc).__name__}: {exc}")
        finally:
            self.client.cancel([f for f in futures if not f.done()])

    def describe(self) -> dict:
        """JSON record: kind, worker threads, scheduler address."""
        return {"kind": self.name, "workers": self.workers, "address": self.address}

    def close(self) -> None:
        """Close the client if this executor opened it."""
        if self._own:
            self.client.close()


def make_executor(workers: int | None = None, scheduler: str | None = None,
                  connect_timeout: float = DASK_CONNECT_TIMEOUT_S) -> Executor:
    """Make a Dask executor when ``scheduler`` is given, else local processes (0: serial)."""
    if scheduler:
        return DaskExecutor(scheduler, timeout=connect_timeout)
    if workers == 0:
        return SerialExecutor()
    return LocalExecutor(workers)

"""Where a study runs: on a Dask cluster for ``--scheduler ADDRESS`` (:mod:`solver.distributed`),
else local workers for ``--jobs N``: a pool of processes (N > 1) or one worker thread, and how to
stop them at once on Ctrl-C (pending work cancelled, processes terminated, a busy thread
interrupted), so that ``sweep`` and ``check`` can write what is done and exit within about a
second."""

from __future__ import annotations

import ctypes
import signal
import threading
from concurrent.futures import Executor, ProcessPoolExecutor, ThreadPoolExecutor

__all__ = ["local_executor", "stop_workers", "study_executor"]


def local_executor(jobs: int) -> Executor:
    """Worker processes for ``jobs`` > 1; a single worker thread otherwise."""
    if jobs > 1:
        return ProcessPoolExecutor(max_workers=jobs, initializer=_ignore_interrupts)
    return ThreadPoolExecutor(max_workers=1)


def study_executor(jobs: int, scheduler: str | None = None) -> Executor:
    """The executor of a study: a Dask cluster's when ``scheduler`` (its address) is given
    (:mod:`solver.distributed`), local workers otherwise."""
    if scheduler:
        from .distributed import cluster_executor

        return cluster_executor(scheduler)
    return local_executor(jobs)


def _ignore_interrupts() -> None:
    """Ctrl-C reaches the whole process group; the command stops its workers itself."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)


def stop_workers(executor: Executor) -> None:
    """Stop at once: pending work cancelled, worker processes terminated, and a worker thread
    interrupted in its work rather than waited for."""
    processes = list((getattr(executor, "_processes", None) or {}).values())
    threads = list(getattr(executor, "_threads", ()))
    executor.shutdown(wait=False, cancel_futures=True)
    hook = threading.excepthook  # a thread interrupted between two tasks has nothing to report
    threading.excepthook = lambda args: None if issubclass(args.exc_type, KeyboardInterrupt) else hook(args)
    for process in processes:
        if process.is_alive():
            process.terminate()
    for thread in threads:
        if thread.is_alive() and thread.ident is not None:
            ctypes.pythonapi.PyThreadState_SetAsyncExc(ctypes.c_ulong(thread.ident), ctypes.py_object(KeyboardInterrupt))
    for process in processes:
        process.join(timeout=5.0)
    for thread in threads:
        thread.join(timeout=5.0)

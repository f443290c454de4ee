"""Studies on a Dask distributed cluster (``--scheduler tcp://HOST:PORT``): an
:class:`concurrent.futures.Executor` whose work runs on the cluster's workers, so that ``sweep``,
``check`` and ``uncertainty`` hand it their points exactly as they hand local worker processes.

Dask is an optional extra (``pip install "traystack[distributed]"``); without it the command
says so and exits 2. The workers need traystack installed (the same version), since each point
runs ``solver`` functions there. Tasks are submitted as impure (every point is solved, even two
with equal arguments).
"""

from __future__ import annotations

from concurrent.futures import Executor, Future
from typing import Any, Callable

from .errors import CaseError

__all__ = ["INSTALL_HINT", "ClusterExecutor", "cluster_executor"]

INSTALL_HINT = 'pip install "traystack[distributed]"'


class ClusterExecutor(Executor):
    """The executor of a Dask ``Client`` connected to a scheduler; ``shutdown`` also closes the
    client (the cluster itself keeps running)."""

    def __init__(self, client: Any) -> None:
        self.client = client
        self._executor = client.get_executor(pure=False)

    @property
    def worker_threads(self) -> int:
        """The number of threads of all the cluster's workers (at least 1)."""
        return max(1, sum(self.client.nthreads().values()))

    def submit(self, fn: Callable, /, *args: Any, **kwargs: Any) -> Future:
        return self._executor.submit(fn, *args, **kwargs)

    def shutdown(self, wait: bool = True, *, cancel_futures: bool = False) -> None:
        try:
            self._executor.shutdown(wait=wait and not cancel_futures)
        finally:
            self.client.close()


def cluster_executor(address: str, timeout: float = 30.0) -> ClusterExecutor:
    """An executor on the Dask cluster whose scheduler is at ``address``
    (``tcp://HOST:PORT``). Raises :class:`CaseError` (exit 2) when Dask is not installed, the
    address is not one, or the scheduler cannot be reached within ``timeout`` seconds."""
    if "://" not in address:
        raise CaseError("not a scheduler address", key="--scheduler", value=address, expected="tcp://HOST:PORT")
    try:
        from distributed import Client
    except ImportError:
        raise CaseError("running on a Dask cluster needs the optional packages dask and distributed",
                        key="--scheduler", value=address, expected=f"install them with: {INSTALL_HINT}") from None
    try:
        client = Client(address, timeout=timeout)
    except (OSError, TimeoutError, ValueError) as exc:
        raise CaseError(f"cannot reach the Dask scheduler ({exc})", key="--scheduler", value=address,
                        expected="the address of a running scheduler, e.g. tcp://10.0.0.5:8786") from None
    return ClusterExecutor(client)

"""Run one function over many items, on a pool of forked processes when there are many.

Sweeps and maps run many independent `stiff check` solves of small models. Two habits make
that fast on a few cores:

* numpy's BLAS runs on one thread (``threadpoolctl``) while the items run, in this process and
  in each worker: on models this small a threaded BLAS costs more than it gains (one check of
  the five-bar demo: 0.87 s with the default two threads, 0.26 s with one, on 2 cores), and it
  would make two workers fight over the same cores;
* workers are forked with the function (a case holds mapping proxies, which do not pickle), so
  only the items and the results cross between processes.

Where ``fork`` is not available the items run in this process.
"""

from __future__ import annotations

import concurrent.futures as cf
import multiprocessing as mp
from collections.abc import Callable, Sequence
from typing import Any, TypeVar

from threadpoolctl import threadpool_limits

T = TypeVar("T")
R = TypeVar("R")

#: Above this many items the pool is used.
POOL_ABOVE = 4
#: Worker processes by default.
WORKERS = 2

#: The function a forked worker process serves, set once in that process by ``_start``.
_WORKER: dict[str, Callable[[Any], Any]] = {}


def _start(fn: Callable[[Any], Any]) -> None:
    _WORKER["fn"] = fn
    threadpool_limits(limits=1, user_api="blas")


def _run_chunk(chunk: list[Any]) -> list[Any]:
    fn = _WORKER["fn"]
    return [fn(item) for item in chunk]


def map_items(fn: Callable[[T], R], items: Sequence[T], workers: int = WORKERS,
              progress: Callable[[int], None] | None = None) -> list[R]:
    """``[fn(item) for item in items]``, in order, on ``workers`` forked processes when there
    are more than :data:`POOL_ABOVE` items; ``progress`` is called with the number of items
    just finished."""
    with threadpool_limits(limits=1, user_api="blas"):
        if len(items) <= POOL_ABOVE or workers <= 1 or "fork" not in mp.get_all_start_methods():
            out = []
            for item in items:
                out.append(fn(item))
                if progress is not None:
                    progress(1)
            return out
        size = max(1, min(8, len(items) // (4 * workers)))
        chunks = [list(items[i:i + size]) for i in range(0, len(items), size)]
        done: dict[int, list[R]] = {}
        with cf.ProcessPoolExecutor(max_workers=workers, mp_context=mp.get_context("fork"),
                                    initializer=_start, initargs=(fn,)) as pool:
            futures = {pool.submit(_run_chunk, c): k for k, c in enumerate(chunks)}
            for fut in cf.as_completed(futures):
                got: list[R] = fut.result()
                done[futures[fut]] = got
                if progress is not None:
                    progress(len(got))
        return [r for k in range(len(chunks)) for r in done[k]]

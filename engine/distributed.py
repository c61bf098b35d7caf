"""Perception on a Dask cluster, for catalogues larger than one machine's cores can perceive in good time.

Only perception (RDKit, the costly step) leaves this process: the distinct
structures that the perception cache does not hold are cut into tasks of at
most :data:`halosift.engine.parallel.CHUNK` strings, and each task is one call
of :func:`halosift.engine.parallel.perceive_batch` on an Arrow batch, exactly
the unit the local worker processes run. Results come back as Arrow batches and
are put together in task order, so reading, the cache, weighing and the result
table are the very code of a local screen and its rows come out identical, in
the same order. The cache is this process's: hits are never sent out, and what
the workers perceive is stored here, so workers need no shared folder.

Dask is optional (``pip install 'halosift[dask]'``) and imported only here, only
when a screen asks for it.
"""

from __future__ import annotations

import threading
from collections.abc import Callable, Iterator, Sequence
from contextlib import contextmanager
from dataclasses import dataclass
from typing import Any

import pandas as pd
import pyarrow as pa
from halosift.engine.parallel import Cancelled, _from_batches, chunk_bounds, perceive_batch
from halosift.engine.parameters import DEFAULT_MAX_HEAVY_ATOMS
from halosift.engine.perception import Perception, concat

#: Seconds to wait for a scheduler to answer before calling its address unreachable.
CONNECT_TIMEOUT_S = 10
#: Prefix of the address that starts a cluster of worker processes on this machine instead.
LOCAL_PREFIX = "local:"


class DaskError(Exception):
    """Dask cannot be used as asked (not installed, bad address, scheduler unreachable); the message is one line."""


@dataclass(frozen=True)
class DaskTarget:
    """Where distributed perception runs."""

    address: str | None
    """A scheduler address (``tcp://host:8786``), or None for a local cluster."""
    local_workers: int
    """Workers of the local cluster (``local:N``); 0 with an address."""


def parse_target(text: str) -> DaskTarget:
    """``local:N`` or a scheduler address; DaskError (one line) when it is neither."""
    text = text.strip()
    if text.startswith(LOCAL_PREFIX):
        count = text[len(LOCAL_PREFIX):]
        if not count.isdigit() or int(count) < 1:
            raise DaskError(f"--dask {text!r}: local:N needs a worker count of at least 1, e.g. local:4")
        return DaskTarget(None, int(count))
    if not text or any(c.isspace() for c in text):
        raise DaskError(f"--dask {text!r} is neither a scheduler address (tcp://host:8786) nor local:N")
    return DaskTarget(text, 0)


def _distributed() -> Any:
    try:
        import distributed
    except ImportError:
        raise DaskError("Dask is not installed: pip install 'halosift[dask]'") from None
    return distributed


@contextmanager
def dask_client(target: str | DaskTarget) -> Iterator[Any]:
    """A ``distributed.Client`` for ``target``, closed (and a local cluster stopped) on leaving."""
    if isinstance(target, str):
        target = parse_target(target)
    distributed = _distributed()
    if target.address is None:
        # One thread per worker: RDKit work holds the GIL, so threads within a worker would not help.
        cluster = distributed.LocalCluster(n_workers=target.local_workers, threads_per_worker=1, processes=True,
                                           dashboard_address=None)
        try:
            with distributed.Client(cluster) as client:
                yield client
        finally:
            cluster.close()
        return
    try:
        client = distributed.Client(target.address, timeout=CONNECT_TIMEOUT_S)
    except (OSError, TimeoutError, ValueError, TypeError) as exc:
        reason = str(exc).splitlines()[0] if str(exc) else type(exc).__name__
        raise DaskError(f"cannot reach the Dask scheduler at {target.address} ({reason})") from None
    try:
        yield client
    finally:
        client.close()


def is_dask_frame(obj: object) -> bool:
    """Whether ``obj`` is a Dask DataFrame, without importing Dask when it is not loaded already."""
    import sys

    module = type(obj).__module__ or ""
    return module.split(".")[0] == "dask" and "dask.dataframe" in sys.modules and hasattr(obj, "npartitions")


def gather_frame(frame: Any) -> pd.DataFrame:
    """A Dask DataFrame's rows, in partition order, as one pandas DataFrame (every row appears in the result).

    Dask turns text columns into Arrow strings with ``pd.NA`` (its ``dataframe.convert-string``
    setting); they come back as pandas' own text type, so a Dask DataFrame made from a pandas
    one screens to the very DataFrame the pandas one does.
    """
    import dask

    out = frame.compute().reset_index(drop=True)
    if dask.config.get("dataframe.convert-string", None) is not False:  # None: Dask's default, on
        text = pd.Series(["x"]).dtype  # what pandas makes of text here
        arrow_text = pd.StringDtype("pyarrow", na_value=pd.NA)
        converted = {c: text for c, t in out.dtypes.items() if t == arrow_text and t != text}
        if converted:
            out = out.astype(converted)
    return out


def current_client() -> Any | None:
    """The Dask client this process already uses (a Dask DataFrame's), or None."""
    try:
        distributed = _distributed()
        return distributed.get_client()
    except (DaskError, ValueError):
        return None


def _worker_count(client: Any) -> int:
    try:
        return max(1, len(client.scheduler_info().get("workers", {})))
    except Exception:  # noqa: BLE001 - only a hint for task sizes
        return 1


def perceive_on_cluster(
    smiles: Sequence[str | None],
    *,
    client: Any,
    max_heavy_atoms: int = DEFAULT_MAX_HEAVY_ATOMS,
    progress: Callable[[int, int], None] | None = None,
    cancel: threading.Event | None = None,
    detail: bool = False,
) -> Perception:
    """Perceive ``smiles`` on the cluster behind ``client``, one perceive_batch per task; order is kept."""
    total = len(smiles)
    if progress:
        progress(0, total)
    if total == 0:
        return concat([])
    distributed = _distributed()
    bounds = chunk_bounds(total, _worker_count(client))
    batches = [pa.record_batch([pa.array(list(smiles[a:b]), type=pa.string())], names=["smiles"])
               for a, b in bounds]
    futures = client.map(perceive_batch, batches, max_heavy_atoms=max_heavy_atoms, detail=detail, pure=False)
    order = {f.key: i for i, f in enumerate(futures)}
    parts: list[Perception | None] = [None] * len(futures)
    done = 0
    try:
        for future in distributed.as_completed(futures):
            if cancel is not None and cancel.is_set():
                raise Cancelled()
            i = order[future.key]
            parts[i] = _from_batches(*future.result())
            done += bounds[i][1] - bounds[i][0]
            if progress:
                progress(done, total)
    finally:
        # Every future, finished ones too: the cluster drops their results now, not when the last
        # reference here goes (a traceback can keep this frame alive).
        client.cancel(futures)
    return concat([p for p in parts if p is not None])


@contextmanager
def dask_for(source: object, dask: object | None) -> Iterator[tuple[object, Any | None]]:
    """(source with a Dask DataFrame gathered to pandas, the client to perceive with or None) for a screen.

    Plain sources without ``dask`` never touch Dask (nothing is imported).
    """
    dask_frame = is_dask_frame(source)
    if dask is None and not dask_frame:
        yield source, None
        return
    if dask_frame:
        source = gather_frame(source)
    if dask is None or not isinstance(dask, str):  # a Client given, or the Dask DataFrame's own (None: local)
        yield source, dask if dask is not None else current_client()
        return
    with dask_client(dask) as client:
        yield source, client

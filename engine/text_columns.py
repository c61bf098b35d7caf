"""Text columns of a screen's result, gathered in bulk with Arrow (no per-row Python).

The majors' SMILES are taken from the site table by row number; a monobromide is the
monochloride's SMILES with Cl rewritten to Br in the Arrow buffers, pass by pass.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
import pandas as pd
import pyarrow as pa
import pyarrow.compute as pc
from halosift.engine.site_classes import SITE_CLASSES

#: The column type pandas gives a column of Python strings (Arrow-backed ``str`` from pandas 3 on, else object).
TEXT_DTYPE = pd.DataFrame({"t": np.array([""], dtype=object)})["t"].dtype


ARROW_TEXT = isinstance(TEXT_DTYPE, pd.StringDtype) and TEXT_DTYPE.storage == "pyarrow"


#: Bytes per pass of the Cl→Br rewrite: its temporaries stay small and are reused pass to pass.
_SWAP_CHUNK = 1 << 20


def site_type_names(masks: np.ndarray) -> tuple[list[str], np.ndarray]:
    """Distinct comma-joined site-class names of bit ``masks`` and, per mask, the index of its name."""
    present = np.flatnonzero(np.bincount(masks)) if len(masks) else np.zeros(0, dtype=np.int64)
    names = [",".join(sorted(SITE_CLASSES[i] for i in range(len(SITE_CLASSES)) if int(m) >> i & 1)) for m in present]
    index = np.zeros(int(present[-1]) + 1 if len(present) else 1, dtype=np.int32)
    index[present] = np.arange(len(present), dtype=np.int32)
    return names, index[masks]


def labels_column(labels: Sequence[str], codes: np.ndarray) -> object:
    """``labels[codes]`` as a text column, without building a Python string per row."""
    if ARROW_TEXT:
        return pd.array(pc.take(pa.array(list(labels), type=pa.large_string()), pa.array(codes)), dtype=TEXT_DTYPE)
    return np.array(list(labels), dtype=object)[codes]


def _arrow_owned(nbytes: int) -> tuple[pa.Buffer, np.ndarray]:
    """A writable buffer from Arrow's memory pool and a uint8 view of it.

    Output text is built here rather than in numpy memory: Arrow's pool reuses what
    earlier Arrow results freed, where a fresh numpy array of this size is new memory.
    """
    buf = pa.allocate_buffer(nbytes)
    return buf, np.frombuffer(buf, dtype=np.uint8)


def _swap_pair(data: np.ndarray, offsets: np.ndarray, old: str, new: str) -> pa.Buffer:
    """UTF-8 bytes ``data`` of strings bounded by ``offsets`` with every ``old`` replaced by ``new``, as a new buffer.

    Only for two ASCII strings of two characters whose first and last differ: no UTF-8
    continuation byte can match, lengths stay put, and such a pattern cannot overlap
    itself, so this equals ``str.replace`` string by string.
    """
    buf, out = _arrow_owned(len(data))
    out[:] = data
    first, second = ord(old[0]), ord(old[1])
    lo, hi = int(offsets[0]), int(offsets[-1])
    for start in range(lo, hi, _SWAP_CHUNK):
        stop = min(start + _SWAP_CHUNK, hi)
        # A match may start on this piece's last byte and end on the next piece's first.
        match = data[start:stop] == first
        match[:-1] &= data[start + 1 : stop] == second
        match[-1] &= stop < hi and data[stop] == second
        # A match from one string's last byte into the next's first is none.
        bounds = offsets[np.searchsorted(offsets, start + 1) : np.searchsorted(offsets, stop, side="right")]
        match[bounds - 1 - start] = False
        hits = np.flatnonzero(match) + start
        out[hits], out[hits + 1] = ord(new[0]), ord(new[1])
    return buf


def _expand(text: pa.LargeStringArray, has: np.ndarray) -> pa.LargeStringArray:
    """``text`` (one string per set entry of ``has``) spread over ``len(has)`` entries, '' where unset.

    The strings' bytes are shared; only new offsets are written (in Arrow's pool).
    """
    _, offsets_buf, data_buf = text.buffers()
    offsets = np.frombuffer(offsets_buf, dtype=np.int64)[text.offset : text.offset + len(text) + 1]
    buf, raw = _arrow_owned(8 * (len(has) + 1))
    out = raw.view(np.int64)
    out[0] = offsets[0]
    lengths = out[1:]
    lengths[:] = 0
    lengths[has] = np.diff(offsets)
    np.cumsum(lengths, out=lengths)
    lengths += offsets[0]
    return pa.LargeStringArray.from_buffers(len(has), buf, data_buf)


def gather_text(column: pd.Series, rows: np.ndarray, swap: tuple[str, str] | None = None) -> object:
    """``column`` at ``rows`` ('' where a row is −1), with substring ``swap[0]`` → ``swap[1]``, as a text column."""
    has = rows >= 0
    arrow = getattr(column.array, "__arrow_array__", None)
    if ARROW_TEXT and arrow is not None:
        taken = pc.take(arrow(), pa.array(rows if has.all() else rows[has]))
        taken = (taken.combine_chunks() if taken.num_chunks != 1 else taken.chunk(0)).cast(pa.large_string())
        swappable = swap is not None and all(len(x) == 2 and x.isascii() and x[0] != x[1] for x in swap)
        if taken.null_count or (swap is not None and not swappable):  # not met in perceptions: the general way
            out = pc.fill_null(pc.take(arrow(), pa.array(rows, mask=~has)), "")
            return pd.array(pc.replace_substring(out, *swap) if swap else out, dtype=TEXT_DTYPE)
        if swap is not None and taken.buffers()[2] is not None:
            _, offsets_buf, data_buf = taken.buffers()
            offsets = np.frombuffer(offsets_buf, dtype=np.int64)[taken.offset : taken.offset + len(taken) + 1]
            swapped = _swap_pair(np.frombuffer(data_buf, dtype=np.uint8), offsets, *swap)
            taken = pa.LargeStringArray.from_buffers(len(taken), offsets_buf, swapped, None, 0, taken.offset)
        return pd.array(taken if has.all() else _expand(taken, has), dtype=TEXT_DTYPE)
    values = column.to_numpy(dtype=object)
    out = np.full(len(rows), "", dtype=object)
    out[has] = values[rows[has]]
    if swap is not None:
        out = np.array([s.replace(*swap) for s in out], dtype=object)
    return out

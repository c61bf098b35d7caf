"""Shared pieces of the app's tests: an invented library and ways to wait for the app."""

from __future__ import annotations

import asyncio
import functools
import io
from pathlib import Path

import pandas as pd

#: An invented supplier's list (IDs made up) covering every verdict and two rejections.
QX_ROWS = [
    ("QX-0001", "CC"),
    ("QX-0002", "CCC"),
    ("QX-0003", "CC(C)C"),
    ("QX-0004", "Cc1ccccc1"),
    ("QX-0005", "CCc1ccccc1"),
    ("QX-0006", "C1CCCCC1"),
    ("QX-0007", "CC1=CCCCC1"),
    ("QX-0008", "c1ccccc1"),
    ("QX-0009", "O"),
    ("QX-0010", "CCC(C)CC"),
    ("QX-0011", "C(C)(C)C"),
    ("QX-0012", "not a smiles"),
    ("QX-0013", "CC(C)Cc1ccccc1"),
    ("QX-0014", "CCCC"),
]


def async_test(fn):
    """Run an async test function in a fresh event loop (no async plugin is a dependency)."""

    @functools.wraps(fn)
    def wrapper(*args, **kwargs):
        return asyncio.run(fn(*args, **kwargs))

    return wrapper


async def settle(pilot, app=None, rounds: int = 1000) -> None:
    """Wait until screening, every worker and every table update has finished."""
    from textual.worker import WorkerCancelled

    app = app or pilot.app
    for _ in range(rounds):
        try:
            await app.workers.wait_for_complete()
        except WorkerCancelled:  # a newer request replaced it (exclusive workers): wait for that one
            pass
        await pilot.pause()
        if not app.busy and not any(w.is_running for w in app.workers):
            await pilot.pause()
            return
        await pilot.pause(0.02)
    raise AssertionError("the app did not settle")


def write_library(folder: Path) -> Path:
    """Write :data:`QX_ROWS` as ``qx_library.csv`` in folder and return its path."""
    path = folder / "qx_library.csv"
    pd.DataFrame(QX_ROWS, columns=["id", "smiles"]).to_csv(path, index=False)
    return path


def plain(widget) -> str:
    """What a Static shows, as plain text."""
    from rich.console import Console

    content = widget.content
    if isinstance(content, str):
        return content
    if hasattr(content, "plain"):
        return content.plain
    console = Console(width=max(widget.size.width, 40), record=True, file=io.StringIO(), color_system=None)
    console.print(content)
    return console.export_text()


#: The characters a terminal sends for the named keys used in bursts (others: the key itself).
_BURST_CHARACTERS = {"backspace": "\x7f", "enter": "\r", "tab": "\t", "escape": "\x1b", "space": " ",
                     "end": None, "home": None, "left": None, "right": None, "delete": None}


async def burst(pilot, *keys: str) -> None:
    """Send ``keys`` as a terminal does when they arrive in one read: each is posted to the app at once.

    ``pilot.press`` waits for every key to be handled before sending the next, which hides
    any reordering between keys; this does not wait.
    """
    from textual import events

    for key in keys:
        pilot.app.post_message(events.Key(key, _BURST_CHARACTERS.get(key, key)))
    await pilot.pause()

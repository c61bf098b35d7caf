"""The report in a real browser: headless Chromium renders it to a PNG that is not blank and shows every drawing."""

from __future__ import annotations

import re
import shutil
import struct
import subprocess
import zlib
from pathlib import Path

import pandas as pd
import pytest

from halosift.cli import main

CHROMIUM = shutil.which("chromium") or ("/usr/bin/chromium" if Path("/usr/bin/chromium").exists() else None)
pytestmark = pytest.mark.skipif(
    CHROMIUM is None, reason="Chromium is not installed (Debian package 'chromium'); the browser check needs it"
)

#: An invented supplier's shortlist (IDs made up); one rejected row.
ROWS = [("ZB-01", "CCC"), ("ZB-02", "CC(C)Cc1ccccc1"), ("ZB-03", "C1CCC(C)CC1"), ("ZB-04", "CCO"), ("ZB-05", "CC")]

FLAGS = [
    "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
    "--disable-background-networking", "--disable-component-update", "--disable-sync",
]


def _paeth(a: int, b: int, c: int) -> int:
    p = a + b - c
    pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
    return a if pa <= pb and pa <= pc else (b if pb <= pc else c)


def decode_png(data: bytes) -> tuple[int, int, int, list[bytes]]:
    """(width, height, bytes per pixel, unfiltered rows) of an 8-bit RGB/RGBA, non-interlaced PNG (stdlib only)."""
    assert data[:8] == b"\x89PNG\r\n\x1a\n", "not a PNG"
    pos, idat = 8, b""
    width = height = bpp = 0
    while pos < len(data):
        (length,) = struct.unpack(">I", data[pos:pos + 4])
        kind = data[pos + 4:pos + 8]
        body = data[pos + 8:pos + 8 + length]
        pos += 12 + length
        if kind == b"IHDR":
            width, height, depth, colour, _, _, interlace = struct.unpack(">IIBBBBB", body)
            assert depth == 8 and colour in (2, 6) and interlace == 0, (depth, colour, interlace)
            bpp = 3 if colour == 2 else 4
        elif kind == b"IDAT":
            idat += body
        elif kind == b"IEND":
            break
    raw = zlib.decompress(idat)
    stride = width * bpp
    rows: list[bytes] = []
    prev = bytearray(stride)
    for y in range(height):
        start = y * (stride + 1)
        ftype, line = raw[start], bytearray(raw[start + 1:start + 1 + stride])
        for i in range(stride):
            a = line[i - bpp] if i >= bpp else 0
            b = prev[i]
            c = prev[i - bpp] if i >= bpp else 0
            if ftype == 1:
                line[i] = (line[i] + a) & 0xFF
            elif ftype == 2:
                line[i] = (line[i] + b) & 0xFF
            elif ftype == 3:
                line[i] = (line[i] + (a + b) // 2) & 0xFF
            elif ftype == 4:
                line[i] = (line[i] + _paeth(a, b, c)) & 0xFF
        rows.append(bytes(line))
        prev = line
    return width, height, bpp, rows


def chromium(*args: str, profile: Path) -> subprocess.CompletedProcess:
    return subprocess.run([CHROMIUM, *FLAGS, f"--user-data-dir={profile}", *args],
                          capture_output=True, text=True, timeout=180)


def test_report_renders_in_headless_chromium(tmp_path: Path) -> None:
    source = tmp_path / "zb.csv"
    pd.DataFrame(ROWS, columns=["id", "smiles"]).to_csv(source, index=False)
    page = tmp_path / "report.html"
    assert main(["report", str(source), "-o", str(page)]) == 0
    n_drawings = page.read_text(encoding="utf-8").count('<svg class="structure"')
    assert n_drawings == 4  # every modelled row; the rejected one has no drawing

    shot = tmp_path / "page.png"
    proc = chromium(f"--screenshot={shot}", "--window-size=1200,2000", page.as_uri(), profile=tmp_path / "profile")
    assert shot.exists(), proc.stderr[-2000:]
    width, height, bpp, rows = decode_png(shot.read_bytes())
    assert (width, height) == (1200, 2000)
    # Not blank: many non-white pixels, and more than one grey level among them.
    non_white = 0
    levels = set()
    for line in rows[::4]:
        for x in range(0, width * bpp, bpp * 4):
            r, g, b = line[x], line[x + 1], line[x + 2]
            if r < 235 or g < 235 or b < 235:
                non_white += 1
                levels.add((r // 32, g // 32, b // 32))
    assert non_white > 2000, non_white
    assert len(levels) > 5, levels

    # The DOM the browser built holds every drawing and every substrate section.
    proc = chromium("--dump-dom", page.as_uri(), profile=tmp_path / "profile2")
    dom = proc.stdout
    assert "</html>" in dom, proc.stderr[-2000:]
    assert len(re.findall(r'<svg[^>]*class="structure"', dom)) == n_drawings
    assert len(re.findall(r'<section class="substrate"', dom)) == n_drawings
    assert len(re.findall(r'<svg[^>]*class="chart"', dom)) == 4

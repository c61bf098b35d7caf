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


#: Substrates from 5 to 20 carbons (invented IDs): chains, branches, rings, fused rings, an arene, stereo, a bicycle.
LABEL_ROWS = [
    ("LB-05", "CCCCC"),                                # 5 C
    ("LB-06", "CC(C)C(C)C"),                           # 6 C
    ("LB-07", "CC1CCCCC1"),                            # 7 C
    ("LB-08", "CC(C)(C)CC(C)C"),                       # 8 C, crowded quaternary carbon
    ("LB-09", "CC(C)c1ccccc1"),                        # 9 C, cumene
    ("LB-10", "C1CCC2CCCCC2C1"),                       # 10 C, decalin
    ("LB-10b", "CC(C)c1ccc(C)cc1"),                    # 10 C, p-cymene
    ("LB-11", "C[C@H](CC)C[C@@H](C)CC(C)C"),           # 11 C, two stereocentres (wedges)
    ("LB-11b", "CC1C2CC3CC(C2)CC1C3"),                # 11 C, 2-methyladamantane: crossing bonds in 2D, a leader line
    ("LB-12", "CCCCCCCCCCCC"),                         # 12 C chain
    ("LB-13", "C1CC2CCC1C2CC(C)CC"),                   # 13 C, norbornane with a side chain
    ("LB-15", "CC(C)CCCC(C)CCCC(C)C"),                 # 15 C, branched
    ("LB-17", "C1CCC2C(C1)CCC1C2CCC2CCCC21"),          # 17 C, the steroid ring skeleton: 17 sites
    ("LB-20", "CC(C)CCCC(C)CCCC(C)CCCC(C)C"),          # 20 C, phytane
    ("LB-20b", "CCCCCCCCCCCCCCCCCCCC"),                # 20 C chain
]

#: Larger than the printed column: shrunk on the page, so their letters are drawn larger to print at the same size.
WIDE_ROWS = [("LW-30", "C" * 30), ("LW-40", "C" * 40)]

#: Measures, in the browser, every site letter's box against the other letters and against every bond line
#: (each bond path sampled every 0.5 px), and writes the result into the page as JSON.
MEASURE = """
<pre id="measure"></pre>
<script>
const out = [];
for (const svg of document.querySelectorAll('svg.structure')) {
  const row = svg.closest('section').dataset.row;
  const labels = [...svg.querySelectorAll('text.site-label')].map(t => {
    const r = t.getBoundingClientRect();
    return {l: t.textContent, x0: r.left, y0: r.top, x1: r.right, y1: r.bottom};
  });
  const points = [];
  for (const p of svg.querySelectorAll('path[class^="bond-"]')) {
    const m = p.getScreenCTM();
    const n = p.getTotalLength();
    for (let s = 0; s <= n; s += 0.5) {
      const q = p.getPointAtLength(s);
      const d = new DOMPoint(q.x, q.y).matrixTransform(m);
      points.push([d.x, d.y]);
    }
  }
  const pairs = [], hits = [];
  const half = 1.0;  // half the bond stroke width
  for (let i = 0; i < labels.length; i++) {
    const a = labels[i];
    for (let j = i + 1; j < labels.length; j++) {
      const b = labels[j];
      if (a.x0 < b.x1 && b.x0 < a.x1 && a.y0 < b.y1 && b.y0 < a.y1) pairs.push(a.l + '/' + b.l);
    }
    if (points.some(([x, y]) => x > a.x0 - half && x < a.x1 + half && y > a.y0 - half && y < a.y1 + half)) hits.push(a.l);
  }
  const box = svg.getBoundingClientRect();
  out.push({row, n: labels.length, bondPoints: points.length, pairs, hits,
            heights: labels.map(l => l.y1 - l.y0), width: box.width, natural: svg.viewBox.baseVal.width});
}
document.getElementById('measure').textContent = JSON.stringify(out);
</script>
"""


def test_site_letters_never_touch_each_other_or_bonds(tmp_path: Path) -> None:
    import json

    from halosift import engine

    source = tmp_path / "labels.csv"
    rows = LABEL_ROWS + WIDE_ROWS
    pd.DataFrame(rows, columns=["id", "smiles"]).to_csv(source, index=False)
    report = tmp_path / "labels.html"
    assert main(["report", str(source), "-o", str(report)]) == 0
    page = tmp_path / "measured.html"
    page.write_text(report.read_text(encoding="utf-8").replace("</body>", MEASURE + "</body>"), encoding="utf-8")
    proc = chromium("--window-size=1200,2000", "--dump-dom", page.as_uri(), profile=tmp_path / "profile")
    found = re.search(r'<pre id="measure">(.*?)</pre>', proc.stdout, flags=re.DOTALL)
    assert found and found.group(1), proc.stderr[-2000:]
    measured = {int(m["row"]): m for m in json.loads(found.group(1).replace("&quot;", '"'))}
    screened = engine.screen(source, use_cache=False)
    assert sorted(measured) == list(range(1, len(rows) + 1))
    for row, m in measured.items():
        smiles = rows[row - 1][1]
        assert m["n"] == int(screened["n_products"].iloc[row - 1]) >= 1, (smiles, m["n"])  # every site lettered
        assert m["bondPoints"] > 0, smiles
        assert m["pairs"] == [], (smiles, m["pairs"])
        assert m["hits"] == [], (smiles, m["hits"])
        # One print size whatever the molecule: up to 20 carbons drawn at natural size (not shrunk); wider ones
        # shrunk to the column with larger letters; on the page every letter is at least 12 px tall.
        if row <= len(LABEL_ROWS):
            assert abs(m["width"] - m["natural"]) < 1.5, (smiles, m["width"], m["natural"])
        else:
            assert m["width"] < m["natural"] - 100, (smiles, m["width"], m["natural"])
        assert min(m["heights"]) >= 12, (smiles, m["heights"])
    assert max(m["n"] for m in measured.values()) >= 12  # the test includes crowded drawings

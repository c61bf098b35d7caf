"""Worst-case stereo work per structure, against the target of about a second per row.

Times full-detail perception (what `explain`, the report and the app's detail
run) of structures chosen to make stereo expensive: one set centre and n open
ones on an end-for-end symmetric chain (enumerated, no shortcut), for n around
where a product's share of engine.stereo.STEREO_WORK_BUDGET runs out, and the
long chains and cages the counts were once wrong for. Prints seconds per
structure and how many products fell back to "not counted".

Usage: python benchmarks/bench_stereo_budget.py
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from halosift.engine.stereo import NOT_COUNTED, STEREO_WORK_BUDGET  # noqa: E402

from halosift import engine  # noqa: E402

#: Target for one structure's whole perception with every product's stereo worked out.
TARGET_S = 1.0


def cases() -> list[tuple[str, str]]:
    """(label, SMILES) of the structures timed."""
    out = [(f"1 set + {n - 1} open, symmetric chain", "CC[C@H](C)" + "C(C)" * (n - 2) + "C(C)CC") for n in range(5, 13)]
    out.append(("1 set + 45 open, symmetric chain", "CC[C@H](C)" + "C(C)" * 44 + "C(C)CC"))
    out.append(("45 open, no set stereo (orbit count)", "CC" + "C(C)" * 45 + "CCC"))
    out.append(("dodecahedrane", "C12C3C4C5C1C6C7C2C8C3C9C4C1C5C6C2C7C8C9C12"))
    out.append(("(E)-propenylnorbornane", "C/C=C/C1CC2CCC1C2"))
    return out


def main() -> int:
    """Time each case once (after one warm-up run of RDKit) and report the slowest."""
    engine.perceive(["CCCC"])
    worst = 0.0
    print(f"stereo budget {STEREO_WORK_BUDGET} atom-isomers per structure; target {TARGET_S:.1f} s per structure")
    for label, smiles in cases():
        start = time.perf_counter()
        sites = engine.perceive([smiles]).sites
        seconds = time.perf_counter() - start
        worst = max(worst, seconds)
        fallback = int((sites["stereo"] == NOT_COUNTED).sum())
        print(f"{seconds:7.3f} s  {fallback:3d}/{len(sites):3d} not counted  {label}")
    print(f"slowest {worst:.3f} s: {'meets' if worst <= TARGET_S else 'misses'} the {TARGET_S:.1f} s target")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())

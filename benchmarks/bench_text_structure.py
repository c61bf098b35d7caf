"""How long the site detail's text drawing takes: layout (RDKit) and drawing (pure Python), per structure.

Prints figures measured in this run; no target is asserted anywhere.
"""

from __future__ import annotations

import time

from halosift.engine.depiction import depict
from halosift.tui.text_structure import draw_structure

STRUCTURES = {
    "isopentane": "CC(C)CC",
    "isobutylbenzene": "CC(C)Cc1ccccc1",
    "icosane": "CCCCCCCCCCCCCCCCCCCC",
    "phytane": "CC(C)CCCC(C)CCCC(C)CCCC(C)C",
    "perhydroanthracene": "C1CCC2CC3CCCCC3CC2C1",
}


def timed(fn, repeats: int = 20) -> float:
    """Best of ``repeats`` calls, in milliseconds."""
    best = float("inf")
    for _ in range(repeats):
        start = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - start)
    return best * 1000


def main() -> None:
    print(f"{'structure':<20} {'atoms':>5} {'layout ms':>10} {'draw ms':>8}  (76 × 12 cells, a label on every carbon)")
    for name, smiles in STRUCTURES.items():
        mol = depict(smiles)
        labels = {a.index: f"P{a.index + 1}" for a in mol.atoms}
        layout = timed(lambda smiles=smiles: depict(smiles))
        draw = timed(lambda mol=mol, labels=labels: draw_structure(mol, labels, 76, 12))
        print(f"{name:<20} {len(mol.atoms):>5} {layout:>10.2f} {draw:>8.2f}")


if __name__ == "__main__":
    main()

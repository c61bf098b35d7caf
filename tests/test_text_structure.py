"""The text drawing of a structure (tui.text_structure) and the SMILES wrapping beside it."""

from __future__ import annotations

import math
import re
from itertools import pairwise

import pandas as pd
import pytest
from alkanes import alkanes
from halosift.engine.depiction import depict
from halosift.tui.structure_view import site_labels
from halosift.tui.text_structure import BRAILLE, draw_structure, smiles_lines

from halosift import engine

#: Structures the detail screen meets: chains, branches, rings, bridged rings, arenes, alkenes, alkynes, up to C20.
STRUCTURES = [
    "C", "CC", "CC(C)CC", "CC1CCCCC1", "C1CC2CCC1C2", "CC(C)Cc1ccccc1", "CCc1ccccc1", "C=CCC#C",
    "CC12CCC(CC1)C(C)(C)C2", "CCc1ccc2ccccc2c1", "C1CC1C1CC1", "CC(C)(C)C(C)(C)C(C)(C)C",
    "CCCCCCCCCCCCCCCCCCCC", "CC(C)CCCC(C)CCCC(C)CCCC(C)C", "C1CCC2(CC1)CCCCC2", "C12C3C4C1C5C2C3C45",
    "CC1=CCCCC1", "c1ccc(cc1)-c1ccccc1", "C1CC2CC3CCC2CC3C1", "CC(C)c1ccc(C)cc1",
]


def labels_for(smiles: str) -> tuple[str, dict[int, str]]:
    """Canonical SMILES and the detail screen's site labels for one structure."""
    library = engine.load_library(pd.DataFrame({"smiles": [smiles]}), use_cache=False)
    canonical = str(library.evaluate()["canonical_smiles"].iloc[0])
    return canonical, site_labels(library.products(0))


def cell_text(drawing, line: int, start: int, length: int) -> str:
    return drawing.lines[line][start:start + length]


def check_drawing(smiles: str, labels: dict[int, str], width: int, height: int):
    """Every invariant of a drawing; returns it for further checks."""
    drawing = draw_structure(smiles, labels, width, height)
    # Inside the box, every line as long as the others.
    assert 0 < len(drawing.lines) <= height
    assert len({len(line) for line in drawing.lines}) == 1 and len(drawing.lines[0]) <= width
    # Every label exactly once, where the drawing says it is, and readable as itself.
    assert sorted(p.text for p in drawing.labels) == sorted(labels.values())
    assert sorted(p.atom for p in drawing.labels) == sorted(labels)
    label_spans = [s for s in drawing.spans if s.kind == "label"]
    assert sorted(cell_text(drawing, s.line, s.start, s.end - s.start) for s in label_spans) == sorted(labels.values())
    cells: set[tuple[int, int]] = set()
    for p in drawing.labels:
        assert cell_text(drawing, p.line, p.start, len(p.text)) == p.text
        mine = {(p.line, p.start + k) for k in range(len(p.text))}
        assert not mine & cells, f"two labels share a cell in {smiles}"
        cells |= mine
        if not p.moved:
            assert (p.line, drawing.atom_cells[p.atom][1]) in mine and drawing.atom_cells[p.atom][0] == p.line
    # Between two bonded atoms no cell on the bond's path is blank.
    mol = depict(smiles)
    for bond in mol.bonds:
        (x0, y0), (x1, y1) = drawing.atom_dots[bond.begin], drawing.atom_dots[bond.end]
        steps = max(1, int(math.hypot(x1 - x0, y1 - y0) * 2))
        for k in range(steps + 1):
            x, y = x0 + (x1 - x0) * k / steps, y0 + (y1 - y0) * k / steps
            # The dot drawn is the ideal point rounded either way on the minor axis.
            near = {(int(yy) // 4, int(xx) // 2) for xx in (math.floor(x), math.ceil(x)) for yy in (math.floor(y), math.ceil(y))}
            assert any(drawing.lines[r][c] != " " for r, c in near), f"gap in bond {bond} of {smiles}"
    return drawing


@pytest.mark.parametrize("smiles", STRUCTURES)
def test_every_invariant_at_the_detail_screen_size(smiles: str) -> None:
    canonical, labels = labels_for(smiles)
    check_drawing(canonical, labels, 76, 12)


@pytest.mark.parametrize("size", [(40, 8), (24, 6), (76, 4)])
def test_every_invariant_in_cramped_boxes(size: tuple[int, int]) -> None:
    for smiles in ("CC(C)CC", "CC1CCCCC1", "CC(C)Cc1ccccc1", "CC(C)(C)C(C)(C)C(C)(C)C"):
        canonical, labels = labels_for(smiles)
        check_drawing(canonical, labels, *size)


def test_every_heptane_isomer() -> None:
    for smiles in sorted(alkanes(7)):
        canonical, labels = labels_for(smiles)
        check_drawing(canonical, labels, 76, 12)


def test_labels_sit_on_their_carbons_when_there_is_room() -> None:
    canonical, labels = labels_for("CC(C)CC")
    drawing = check_drawing(canonical, labels, 76, 12)
    assert not any(p.moved for p in drawing.labels)


def test_a_label_on_every_atom_is_nudged_to_free_cells() -> None:
    labels = {i: f"P{i + 1}" for i in range(6)}
    drawing = check_drawing("C1CCCCC1", labels, 7, 3)
    assert any(p.moved for p in drawing.labels)  # too little room for all six on their own carbons


def test_labels_never_touch_side_by_side() -> None:
    labels = {i: f"P{i + 1}" for i in range(20)}
    drawing = check_drawing("CCCCCCCCCCCCCCCCCCCC", labels, 76, 12)
    for line in drawing.lines:
        assert not re.search(r"P\d+P\d", line), line


def test_output_is_deterministic() -> None:
    canonical, labels = labels_for("CC(C)Cc1ccccc1")
    first = draw_structure(canonical, labels, 76, 12)
    again = draw_structure(depict(canonical), dict(reversed(list(labels.items()))), 76, 12)
    assert first == again


def dot_count(drawing) -> int:
    return sum((ord(ch) - BRAILLE).bit_count() for line in drawing.lines for ch in line if ord(ch) >= BRAILLE)


def test_double_and_triple_bonds_are_drawn_differently_from_single_bonds() -> None:
    single, double, triple = (draw_structure(s, {}, 76, 12) for s in ("CC", "C=C", "C#C"))
    assert dot_count(single) < dot_count(double) < dot_count(triple)
    assert single.lines != double.lines != triple.lines


def test_an_aromatic_ring_shows_its_three_double_bonds() -> None:
    arene = draw_structure("c1ccccc1", {}, 76, 12)
    saturated = draw_structure("C1CCCCC1", {}, 76, 12)
    assert dot_count(arene) > dot_count(saturated) * 1.3


def test_carbon_is_the_bare_skeleton_and_other_elements_their_symbol() -> None:
    drawing = draw_structure("CC(=O)CBr", {}, 76, 12)
    text = "\n".join(drawing.lines)
    assert "O" in text and "Br" in text and "C" not in text.replace("Br", "")
    assert draw_structure("C", {}, 10, 4).lines == ("C",)  # a lone carbon has no skeleton to show


def test_twenty_carbons_fit_the_80x24_detail() -> None:
    for smiles in ("CCCCCCCCCCCCCCCCCCCC", "CC(C)CCCC(C)CCCC(C)CCCC(C)C", "C1CC2CC3CCC2CC3C1"):
        canonical, labels = labels_for(smiles)
        drawing = check_drawing(canonical, labels, 76, 12)
        assert len(drawing.lines[0]) <= 76 and len(drawing.lines) <= 12


def test_layout_records_rings_and_kekule_orders() -> None:
    benzene = depict("c1ccccc1")
    assert len(benzene.atoms) == 6 and len(benzene.rings) == 1
    assert sorted(b.order for b in benzene.bonds) == [1, 1, 1, 2, 2, 2] and all(b.ring == 0 for b in benzene.bonds)
    chain = depict("CC=CC#C")
    assert [b.order for b in chain.bonds] == [1, 2, 1, 3] and all(b.ring is None for b in chain.bonds)
    assert depict("C1CC2CCC1C2") == depict("C1CC2CCC1C2")  # the same layout every time
    with pytest.raises(ValueError, match="cannot lay out"):
        depict("not a smiles")


def test_a_label_on_a_missing_atom_is_an_error() -> None:
    with pytest.raises(ValueError, match="atom 9"):
        draw_structure("CCC", {9: "P1"}, 40, 8)


# ---------------------------------------------------------------------- SMILES wrapping

LONG = "CC(C)CC1CCC(CC1)C(C)(C)Cc1ccc2cc(CCl)ccc2c1[C@@H](Br)C%12CCCCC%12.CCCCBr"


@pytest.mark.parametrize("width", [6, 10, 16, 25, 40, 200])
def test_smiles_lines_keep_every_character_and_fit(width: int) -> None:
    lines = smiles_lines(LONG, width)
    assert "".join(lines) == LONG
    assert all(0 < len(line) <= width for line in lines)


@pytest.mark.parametrize("width", [8, 10, 16, 25, 40])
def test_smiles_lines_never_split_an_atom_or_a_ring_closure(width: int) -> None:
    lines = smiles_lines(LONG, width)
    for before, after in pairwise(lines):
        assert not (before.endswith("C") and after.startswith("l")) and not (before.endswith("B") and after.startswith("r"))
        assert not re.match(r"\d|%|\)", after), (before, after)  # ring digits and ')' stay with their atom
        assert before.count("[") == before.count("]")  # no bracket atom cut
        assert not before.endswith(("(", "=", "#"))


def test_smiles_lines_prefer_ring_closures_and_branches() -> None:
    assert smiles_lines("CC(C)CC1CCC(CC1)C(C)(C)C", 16) == ["CC(C)CC1CCC(CC1)", "C(C)(C)C"]
    assert smiles_lines("CCCCCCCCCC", 4) == ["CCCC", "CCCC", "CC"]
    assert smiles_lines("[C@@H]", 3) == ["[C@", "@H]"]  # only a token wider than the line is cut

"""Where perception's time goes, stage by stage, measured in one run (CPU seconds of this process).

Each stage is a function of the kernel path (engine.perception and the modules it calls); for
one run of ``engine.perceive(..., detail=False)`` (what a screen does) every such function is
wrapped in a timer and its inclusive CPU time summed. Stages nest (``stereo_outcome`` holds
``potential_stereo`` and ``_orbit_outcome``), so the indented rows are parts of the row above;
"rest" is what no stage covers (the per-structure glue in engine.perception). The timers add
about a microsecond per call, so the total is a little above an untimed run's.

Usage: python benchmarks/bench_stages.py [--unique N] [--alkanes-step K]
"""

from __future__ import annotations

import argparse
import sys
import time
from collections import Counter
from collections.abc import Callable
from pathlib import Path
from typing import Any

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
sys.path.insert(0, str(HERE.parent))

import halosift.engine.nbs as nbs  # noqa: E402
import halosift.engine.perception as perception  # noqa: E402
import halosift.engine.sites as sites  # noqa: E402
import halosift.engine.stereo as stereo  # noqa: E402
from bench_kernels import all_alkanes  # noqa: E402
from library_gen import make_library  # noqa: E402
from rdkit import Chem  # noqa: E402

from halosift import engine  # noqa: E402

#: (module, function, label, nesting depth) of every timed stage, in display order.
STAGES: list[tuple[Any, str, str, int]] = [
    (perception, "parse_hydrocarbon", "parse and validate (RDKit MolFromSmiles + checks)", 0),
    (perception, "_canonical", "substrate canonical SMILES (RDKit MolToSmiles)", 0),
    (perception, "mol_arrays", "kernel input arrays (adjacency, H counts, rings)", 0),
    (perception, "classify", "batch kernels (site classes, pattern flags)", 0),
    (perception, "nbs_facts", "NBS kernels (radical classes, allyl partners)", 0),
    (perception, "as_lists", "NBS kernel results as lists", 0),
    (perception, "is_small_bridgehead", "bridgehead path search", 0),
    (perception, "norbornane_positions", "norbornane SMARTS", 0),
    (perception, "kernel_flags", "cage / central-bond walks", 0),
    (perception, "site_groups", "site groups (RDKit ranks + orbit splitting)", 0),
    (sites, "automorphisms", "automorphisms (RDKit substructure self-match)", 1),
    (perception, "Skeleton", "stereo skeleton (ring geometry atoms)", 0),
    (perception, "contenders", "possible majors (contender vertices)", 0),
    (sites, "substitute", "product molecules (RDKit RWMol copy + edit)", 0),
    (sites, "_smiles", "product SMILES (RDKit MolToSmiles)", 0),
    (perception, "stereo_outcome_later", "stereo outcome (counts by orbits gathered for the batch)", 0),
    (stereo, "potential_stereo", "product stereo elements (RDKit FindPotentialStereo)", 1),
    (stereo, "orbit_job", "orbit jobs (elements and automorphisms gathered)", 1),
    (perception, "_resolve", "orbit counts (array passes over the batch)", 0),
    (perception, "allylic_rows", "NBS rows", 0),
    (nbs, "_built_termini", "termini (RDKit bromides from the kernels' partners)", 1),
    (perception, "_tables", "result tables (pandas, Arrow check)", 0),
]


def _timed(fn: Callable[..., Any], label: str, acc: Counter[str]) -> Callable[..., Any]:
    def wrapper(*args: Any, **kwargs: Any) -> Any:
        start = time.process_time()
        try:
            return fn(*args, **kwargs)
        finally:
            acc[label] += time.process_time() - start

    return wrapper


def profile(name: str, smiles: list[str]) -> None:
    """Print the stage table of one set."""
    acc: Counter[str] = Counter()
    saved = [(mod, attr, getattr(mod, attr)) for mod, attr, _, _ in STAGES if attr != "_canonical"]
    try:
        # The substrate's canonical SMILES is an inline RDKit call in _perceive_batch: time it by
        # giving the module a Chem whose MolToSmiles is timed (perception calls nothing else by that name).
        chem = type("TimedChem", (), {})()
        for key in dir(Chem):
            if not key.startswith("__"):
                setattr(chem, key, getattr(Chem, key))
        chem.MolToSmiles = _timed(Chem.MolToSmiles, "_canonical", acc)
        saved.append((perception, "Chem", perception.Chem))
        perception.Chem = chem  # type: ignore[assignment]
        for mod, attr, label, _ in STAGES:
            if attr != "_canonical":
                setattr(mod, attr, _timed(getattr(mod, attr), label, acc))
        engine.perceive(smiles[:300], detail=False)  # first-use caches, as a warm worker has them
        acc.clear()
        start = time.process_time()
        engine.perceive(smiles, detail=False)
        total = time.process_time() - start
    finally:
        for mod, attr, fn in saved:
            setattr(mod, attr, fn)
    t = time.process_time()
    for s in smiles:
        Chem.MolFromSmiles(s)
    parse = time.process_time() - t
    us = 1e6 / len(smiles)
    print(f"[{name}] {len(smiles):,} structures: perception {total * us:6.0f} µs/structure, "
          f"RDKit MolFromSmiles alone {parse * us:5.1f} µs (ratio {total / parse:4.1f})")
    covered = 0.0
    for _, attr, label, depth in STAGES:
        key = "_canonical" if attr == "_canonical" else label
        spent = acc.get(key, 0.0)
        if depth == 0:
            covered += spent
        print(f"  {'  ' * depth}{label:<{58 - 2 * depth}} {spent * us:7.1f} µs  {100 * spent / total:5.1f} %")
    rest = total - covered
    print(f"  {'rest (per-structure glue)':<58} {rest * us:7.1f} µs  {100 * rest / total:5.1f} %")


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--unique", type=int, default=3000, help="generated structures profiled")
    ap.add_argument("--alkanes-step", type=int, default=6, help="profile every K-th alkane C1-C16 (18,030 in all)")
    opts = ap.parse_args()
    profile("generated", make_library(opts.unique, seed=7))
    profile("alkanes C1-C16", all_alkanes(16)[:: opts.alkanes_step])
    return 0


if __name__ == "__main__":
    sys.exit(main())

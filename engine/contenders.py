"""Which monohalides can be the major product under some conditions.

A screen works out product SMILES and stereo only for these contenders; the
rest keep their counts and weights (all a re-weighing needs) and get their
detail on demand.

Why the test is exact. Every rate per H is Arrhenius, k_c = A_c·exp(−E_c/RT),
in each of the rate tables a condition can select (Cl· gas phase, Cl· neat
liquid, Br·), and a Cl2 solvent multiplies every log-selectivity against
primary by one exponent s (:func:`engine.solvent.scale_rates`). The winners
over a union of tables are the union of each table's winners, so each table
is checked on its own. So, up to a term common to
all products, the log-weight of a group g of site class c with h_g hydrogens is

    score_g(x, y) = ln h_g + x·(ln A_c − ln A_primary) − y·(E_c − E_primary)/R

with x = s and y = s/T. Every temperature up to the program's limit
(:data:`engine.conditions.MAX_TEMP_C`) and every solvent exponent s ≥ 0 is a
point of the cone x ≥ 0, y ≥ x/T_max (Br2: the ray x = 1, y ≥ 1/T_max). The
winners over the cone are the faces of the upper envelope of these planes;
each face is a pointed convex region with a corner where its winner ties
with two others, or with one other on an edge of the cone, or at the apex.
Checking the argmax at every such corner therefore finds every product that
wins anywhere — a superset of what allowed conditions reach, never a subset.
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Sequence
from functools import lru_cache

import numpy as np

from engine.conditions import MAX_TEMP_C
from engine.parameters import KELVIN, R_KCAL
from engine.rates import PHASES, rate_table
from engine.site_classes import ABSTRACTABLE

#: Scores within this of the maximum count as tied (ties are kept: a superset is safe).
TIE = 1e-9
_PRIMARY = ABSTRACTABLE.index("primary")
_INVERSE_T_MAX = 1.0 / (MAX_TEMP_C + KELVIN)


@lru_cache(maxsize=None)
def _class_terms(radical: str, phase: str) -> tuple[np.ndarray, np.ndarray]:
    """Per abstractable site code: (ln A − ln A_primary, (E − E_primary)/R) toward ``radical`` in ``phase``."""
    params = rate_table(radical, phase).params
    ln_a = np.array([math.log(params[s].a_per_h) for s in ABSTRACTABLE])
    ea = np.array([params[s].ea for s in ABSTRACTABLE])
    return ln_a - ln_a[_PRIMARY], (ea - ea[_PRIMARY]) / R_KCAL


def _winners(ln_h: np.ndarray, a: np.ndarray, e: np.ndarray, vertices: list[tuple[float, float]]) -> set[int]:
    """Indices that reach the maximum score at any of ``vertices``."""
    pts = np.array(vertices, dtype=np.float64)
    scores = ln_h[None, :] + pts[:, :1] * a[None, :] - pts[:, 1:] * e[None, :]
    best = scores.max(axis=1, keepdims=True)
    tol = TIE * np.maximum(1.0, np.abs(best))
    return set(np.flatnonzero((scores >= best - tol).any(axis=0)).tolist())


def _cone_vertices(ln_h: np.ndarray, a: np.ndarray, e: np.ndarray) -> list[tuple[float, float]]:
    """The apex, pairwise ties on each edge of the cone, and three-way ties inside it."""
    out = [(0.0, 0.0)]
    m = len(ln_h)
    slope = _INVERSE_T_MAX
    for i, j in itertools.combinations(range(m), 2):
        dh, da, de = ln_h[i] - ln_h[j], a[i] - a[j], e[i] - e[j]
        if de != 0 and (y := dh / de) >= 0:  # on x = 0: dh − y·de = 0
            out.append((0.0, y))
        run = da - de * slope  # on (t, t/T_max): dh + t·(da − de/T_max) = 0
        if run != 0 and (t := -dh / run) >= 0:
            out.append((t, t * slope))
    for i, j, k in itertools.combinations(range(m), 3):
        # Solve score_i = score_j = score_k for (x, y).
        m2 = np.array([[a[i] - a[j], -(e[i] - e[j])], [a[i] - a[k], -(e[i] - e[k])]])
        rhs = np.array([ln_h[j] - ln_h[i], ln_h[k] - ln_h[i]])
        det = np.linalg.det(m2)
        if abs(det) < 1e-12:
            continue
        x, y = np.linalg.solve(m2, rhs)
        if x >= -TIE and y >= x * slope - TIE:
            out.append((max(x, 0.0), max(y, x * slope)))
    return out


def _ray_vertices(ln_h: np.ndarray, a: np.ndarray, e: np.ndarray) -> list[tuple[float, float]]:
    """x = 1, y ≥ 1/T_max: the hot end and every pairwise tie on the ray."""
    out = [(1.0, _INVERSE_T_MAX)]
    for i, j in itertools.combinations(range(len(ln_h)), 2):
        de = e[i] - e[j]
        if de != 0 and (y := (ln_h[i] - ln_h[j] + a[i] - a[j]) / de) >= _INVERSE_T_MAX:
            out.append((1.0, y))
    return out


@lru_cache(maxsize=65536)
def contending_classes(classes: tuple[tuple[int, int], ...], radical: str) -> frozenset[int]:
    """Site codes whose largest group can be the major product toward ``radical`` ('cl' or 'br').

    ``classes``: (site code, H count of that class's largest group) for every
    abstractable class present, sorted. Cl· is weighed over the whole cone
    (any allowed temperature, any solvent exponent) of each of its phase
    tables (gas, liquid) and the winners are united; Br· over the ray x = 1
    (no solvent term). Cached: libraries repeat these patterns.
    """
    if len(classes) <= 1:
        return frozenset(code for code, _ in classes)
    codes = np.array([c for c, _ in classes])
    ln_h = np.log(np.array([h for _, h in classes], dtype=np.float64))
    won: set[int] = set()
    for phase in PHASES if radical == "cl" else ("liquid",):
        a, e = (t[codes] for t in _class_terms(radical, phase))
        vertices = _cone_vertices(ln_h, a, e) if radical == "cl" else _ray_vertices(ln_h, a, e)
        won |= _winners(ln_h, a, e, vertices)
    return frozenset(int(codes[i]) for i in won)


def contenders(groups: Sequence[tuple[int, int]]) -> tuple[set[int], set[int]]:
    """Indices of the groups that can be the Cl2 major product, and the Br2 major, under some conditions.

    ``groups``: (site code, H count) per group; codes ≥ len(ABSTRACTABLE)
    (vinyl, aryl, alkynyl) are never abstracted and never contend. Within a
    class the rate per H is shared, so only the class's largest group can win;
    of groups tied for largest, the first listed, since that is the one
    :func:`engine.weigh.summarise` names when shares are equal.
    """
    best: dict[int, int] = {}
    first: dict[int, int] = {}
    for g, (code, h) in enumerate(groups):
        if code < len(ABSTRACTABLE) and h > best.get(code, 0):
            best[code], first[code] = h, g
    key = tuple(sorted(best.items()))
    return (
        {first[code] for code in contending_classes(key, "cl")},
        {first[code] for code in contending_classes(key, "br")},
    )

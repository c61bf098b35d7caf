"""Which monohalides can be the major product under some conditions.

A screen works out product SMILES and stereo only for these contenders; the
rest keep their counts and weights (all a re-weighing needs) and get their
detail on demand.

Why the test is exact. Every rate per H is Arrhenius, k_c = A_c·exp(−E_c/RT),
in each of the rate tables a condition can select (Cl· gas phase, Cl· neat
liquid, Br·), and a Cl2 solvent multiplies every log-selectivity against
primary by one exponent s (:func:`halosift.engine.solvent.scale_rates`). The winners
over a union of tables are the union of each table's winners, so each table
is checked on its own. So, up to a term common to
all products, the log-weight of a group g of site class c with h_g hydrogens is

    score_g(x, y) = ln h_g + x·(ln A_c − ln A_primary) − y·(E_c − E_primary)/R

with x = s and y = s/T. Every temperature up to the program's limit
(:data:`halosift.engine.conditions.MAX_TEMP_C`) and every solvent exponent s ≥ 0 is a
point of the cone x ≥ 0, y ≥ x/T_max (Br2: the ray x = 1, y ≥ 1/T_max). The
winners over the cone are the faces of the upper envelope of these planes;
each face is a pointed convex region with a corner where its winner ties
with two others, or with one other on an edge of the cone, or at the apex.
Checking the argmax at every such corner therefore finds every product that
wins anywhere — a superset of what allowed conditions reach, never a subset.

In the liquid a solvent scales only each class's alkyl part: a π-activated
class c of degree d keeps its excess over d (:data:`halosift.engine.site_classes.SOLVENT_BASE`).
Its score is then

    score_g = ln h_g + β_c − z·φ_c + x·α_c − y·ε_c

with (α, ε) the degree's terms, (β, φ) the excess, x = s, y = s/T, z = 1/T.
The points (s, s/T, 1/T) lie in the polyhedron x ≥ 0, z ≥ 1/T_max,
y ≥ x/T_max, which contains no line, so every winner's region in it has a
vertex: where three of these constraints hold — facets, or ties of the winner
with others. Checking the argmax at every such point finds every class that
wins anywhere in the polyhedron, again a superset.
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Sequence
from functools import lru_cache

import numpy as np

from halosift.engine.conditions import MAX_TEMP_C
from halosift.engine.parameters import KELVIN, R_KCAL
from halosift.engine.rates import rate_table
from halosift.engine.site_classes import ABSTRACTABLE, SOLVENT_BASE

#: Scores within this of the maximum count as tied (ties are kept: a superset is safe).
TIE = 1e-9
#: The same for the three-parameter liquid test, whose vertices come from 3×3 solves.
TIE_3D = 1e-7
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


@lru_cache(maxsize=None)
def _split_terms(phase: str) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """Per abstractable code toward Cl· in ``phase``: the solvent-scaled part (α, ε) and the kept excess (β, φ)."""
    a, e = _class_terms("cl", phase)
    base = np.array(SOLVENT_BASE[: len(ABSTRACTABLE)])
    return a[base], e[base], a - a[base], e - e[base]


def _liquid_winners(ln_h: np.ndarray, alpha: np.ndarray, eps: np.ndarray, beta: np.ndarray,
                    phi: np.ndarray) -> set[int]:
    """Indices that win somewhere in x ≥ 0, z ≥ z0, y ≥ z0·x (see the module docstring)."""
    m = len(ln_h)
    z0 = _INVERSE_T_MAX
    c = ln_h + beta
    # Facets as rows n·p = d, p = (x, y, z).
    facets = [(np.array([1.0, 0.0, 0.0]), 0.0), (np.array([0.0, 0.0, 1.0]), z0), (np.array([-z0, 1.0, 0.0]), 0.0)]
    normals, rhs = [], []
    for size in range(1, 5):
        n_facets = 4 - size
        for members in itertools.combinations(range(m), size):
            w, others = members[0], members[1:]
            ties = [(np.array([alpha[w] - alpha[j], -(eps[w] - eps[j]), -(phi[w] - phi[j])]), c[j] - c[w])
                    for j in others]
            for chosen in itertools.combinations(facets, n_facets):
                rows = [*ties, *chosen]
                normals.append(np.array([r[0] for r in rows]))
                rhs.append(np.array([r[1] for r in rows]))
    n_arr, d_arr = np.array(normals), np.array(rhs)
    ok = np.abs(np.linalg.det(n_arr)) > 1e-14
    pts = np.linalg.solve(n_arr[ok], d_arr[ok][..., None])[..., 0]
    tol = 1e-9
    inside = (pts[:, 0] >= -tol) & (pts[:, 2] >= z0 - tol) & (pts[:, 1] - z0 * pts[:, 0] >= -tol)
    pts = pts[inside & np.isfinite(pts).all(axis=1)]
    x = np.maximum(pts[:, 0], 0.0)
    z = np.maximum(pts[:, 2], z0)
    y = np.maximum(pts[:, 1], z0 * x)
    scores = c[None, :] + x[:, None] * alpha[None, :] - y[:, None] * eps[None, :] - z[:, None] * phi[None, :]
    best = scores.max(axis=1, keepdims=True)
    won = (scores >= best - TIE_3D * np.maximum(1.0, np.abs(best))).any(axis=0)
    return set(np.flatnonzero(won).tolist())


@lru_cache(maxsize=65536)
def contending_classes(classes: tuple[tuple[int, int], ...], radical: str) -> frozenset[int]:
    """Site codes whose largest group can be the major product toward ``radical`` ('cl' or 'br').

    ``classes``: (site code, H count of that class's largest group) for every
    abstractable class present, sorted. Cl· is weighed over the whole cone of
    its gas-phase table and over the liquid polyhedron (any allowed
    temperature, any solvent exponent) of its liquid table, and the winners
    are united; Br· over the ray x = 1 (no solvent term). Cached: libraries
    repeat these patterns.
    """
    if len(classes) <= 1:
        return frozenset(code for code, _ in classes)
    codes = np.array([c for c, _ in classes])
    ln_h = np.log(np.array([h for _, h in classes], dtype=np.float64))
    won: set[int] = set()
    if radical == "cl":
        # Gas phase: no solvent, one exponent (the cone is a superset); liquid: the solvent's split terms.
        a, e = (t[codes] for t in _class_terms("cl", "gas"))
        won |= _winners(ln_h, a, e, _cone_vertices(ln_h, a, e))
        won |= _liquid_winners(ln_h, *(t[codes] for t in _split_terms("liquid")))
    else:
        a, e = (t[codes] for t in _class_terms(radical, "liquid"))
        won |= _winners(ln_h, a, e, _ray_vertices(ln_h, a, e))
    return frozenset(int(codes[i]) for i in won)


def contenders(groups: Sequence[tuple[int, int]]) -> tuple[set[int], set[int]]:
    """Indices of the groups that can be the Cl2 major product, and the Br2 major, under some conditions.

    ``groups``: (site code, H count) per group; codes ≥ len(ABSTRACTABLE)
    (vinyl, aryl, alkynyl) are never abstracted and never contend. Within a
    class the rate per H is shared, so only the class's largest group can win;
    of groups tied for largest, the first listed, since that is the one
    :func:`halosift.engine.weigh.summarise` names when shares are equal.
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

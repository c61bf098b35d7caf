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
from functools import cache, lru_cache

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


@cache
def _class_terms(radical: str, phase: str) -> tuple[np.ndarray, np.ndarray]:
    """Per abstractable site code: (ln A − ln A_primary, (E − E_primary)/R) toward ``radical`` in ``phase``."""
    params = rate_table(radical, phase).params
    ln_a = np.array([math.log(params[s].a_per_h) for s in ABSTRACTABLE])
    ea = np.array([params[s].ea for s in ABSTRACTABLE])
    return ln_a - ln_a[_PRIMARY], (ea - ea[_PRIMARY]) / R_KCAL


def _winners(ln_h: np.ndarray, a: np.ndarray, e: np.ndarray, vertices: list[tuple[float, float]] | np.ndarray) -> set[int]:
    """Indices that reach the maximum score at any of ``vertices``."""
    pts = np.array(vertices, dtype=np.float64)
    scores = ln_h[None, :] + pts[:, :1] * a[None, :] - pts[:, 1:] * e[None, :]
    best = scores.max(axis=1, keepdims=True)
    tol = TIE * np.maximum(1.0, np.abs(best))
    return set(np.flatnonzero((scores >= best - tol).any(axis=0)).tolist())


def _cone_vertices_reference(ln_h: np.ndarray, a: np.ndarray, e: np.ndarray) -> list[tuple[float, float]]:
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


@cache
def _split_terms(phase: str) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """Per abstractable code toward Cl· in ``phase``: the solvent-scaled part (α, ε) and the kept excess (β, φ)."""
    a, e = _class_terms("cl", phase)
    base = np.array(SOLVENT_BASE[: len(ABSTRACTABLE)])
    return a[base], e[base], a - a[base], e - e[base]


def _liquid_winners_reference(ln_h: np.ndarray, alpha: np.ndarray, eps: np.ndarray, beta: np.ndarray,
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
    return _liquid_argmax(n_arr, d_arr, c, alpha, eps, phi)


def _liquid_argmax(n_arr: np.ndarray, d_arr: np.ndarray, c: np.ndarray, alpha: np.ndarray, eps: np.ndarray,
                   phi: np.ndarray) -> set[int]:
    """Indices reaching the maximum score at any solution of the stacked 3×3 systems that lies in the polyhedron."""
    z0 = _INVERSE_T_MAX
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


@lru_cache(maxsize=64)
def _index_combinations(m: int, size: int) -> np.ndarray:
    """Every ``size``-subset of range(m) as rows, in itertools order (shape (n, size))."""
    combos = list(itertools.combinations(range(m), size))
    return np.array(combos, dtype=np.intp).reshape(len(combos), size)


def _cone_vertices(ln_h: np.ndarray, a: np.ndarray, e: np.ndarray) -> np.ndarray:
    """:func:`_cone_vertices_reference` as one array of (x, y) rows, computed over all pairs and triples at once.

    The same IEEE operations on the same operands (and per-matrix LAPACK calls in the batched
    det/solve), so the vertices are bit-for-bit those of the loop; only their order differs,
    which the winner test ignores.
    """
    m = len(ln_h)
    slope = _INVERSE_T_MAX
    parts = [np.zeros((1, 2))]
    if m >= 2:
        i, j = _index_combinations(m, 2).T
        dh, da, de = ln_h[i] - ln_h[j], a[i] - a[j], e[i] - e[j]
        with np.errstate(divide="ignore", invalid="ignore"):
            y = dh / de
            run = da - de * slope
            t = -dh / run
        on_axis = (de != 0) & (y >= 0)
        parts.append(np.column_stack([np.zeros(int(on_axis.sum())), y[on_axis]]))
        on_edge = (run != 0) & (t >= 0)
        parts.append(np.column_stack([t[on_edge], t[on_edge] * slope]))
    if m >= 3:
        i, j, k = _index_combinations(m, 3).T
        m2 = np.empty((len(i), 2, 2))
        m2[:, 0, 0], m2[:, 0, 1] = a[i] - a[j], -(e[i] - e[j])
        m2[:, 1, 0], m2[:, 1, 1] = a[i] - a[k], -(e[i] - e[k])
        rhs = np.column_stack([ln_h[j] - ln_h[i], ln_h[k] - ln_h[i]])
        ok = ~(np.abs(np.linalg.det(m2)) < 1e-12)
        if ok.any():
            xy = np.linalg.solve(m2[ok], rhs[ok][..., None])[..., 0]
            x, y = xy[:, 0], xy[:, 1]
            keep = (x >= -TIE) & (y >= x * slope - TIE)
            x, y = x[keep], y[keep]
            parts.append(np.column_stack([np.maximum(x, 0.0), np.maximum(y, x * slope)]))
    return np.concatenate(parts)


#: The three facets of the liquid polyhedron as (normal, rhs) (see :func:`_liquid_winners`).
_FACET_NORMALS = np.array([[1.0, 0.0, 0.0], [0.0, 0.0, 1.0], [-_INVERSE_T_MAX, 1.0, 0.0]])
_FACET_RHS = np.array([0.0, _INVERSE_T_MAX, 0.0])


def _liquid_winners(ln_h: np.ndarray, alpha: np.ndarray, eps: np.ndarray, beta: np.ndarray,
                    phi: np.ndarray) -> set[int]:
    """:func:`_liquid_winners_reference` with its 3×3 systems built by array indexing instead of loops.

    Every matrix entry is the same subtraction of the same operands and the systems are solved
    in the same order, so the winners are identical.
    """
    m = len(ln_h)
    c = ln_h + beta
    normals, rhs = [], []
    for size in range(1, 5):
        if size > m:
            break
        members = _index_combinations(m, size)
        w, others = members[:, 0], members[:, 1:]
        tie_n = np.stack([alpha[w][:, None] - alpha[others], -(eps[w][:, None] - eps[others]),
                          -(phi[w][:, None] - phi[others])], axis=-1)  # (n, size-1, 3)
        tie_d = c[others] - c[w][:, None]  # (n, size-1)
        chosen = _index_combinations(3, 4 - size)  # (f, 4-size)
        n, f = len(members), len(chosen)
        block_n = np.empty((n, f, 3, 3))
        block_d = np.empty((n, f, 3))
        block_n[:, :, : size - 1] = tie_n[:, None]
        block_d[:, :, : size - 1] = tie_d[:, None]
        block_n[:, :, size - 1:] = _FACET_NORMALS[chosen][None]
        block_d[:, :, size - 1:] = _FACET_RHS[chosen][None]
        normals.append(block_n.reshape(n * f, 3, 3))
        rhs.append(block_d.reshape(n * f, 3))
    n_arr, d_arr = np.concatenate(normals), np.concatenate(rhs)
    return _liquid_argmax(n_arr, d_arr, c, alpha, eps, phi)


#: When True, :func:`contending_classes` runs the loop-by-loop reference vertex builders
#: (``*_reference``); the differential tests compare both (see :func:`halosift.engine.perception.reference_mode`).
use_reference = False


def contending_classes(classes: tuple[tuple[int, int], ...], radical: str) -> frozenset[int]:
    """:func:`_contending_classes` by the array builders, or the reference loops under :data:`use_reference`."""
    return _contending_classes(classes, radical, use_reference)


@lru_cache(maxsize=65536)
def _contending_classes(classes: tuple[tuple[int, int], ...], radical: str, reference: bool) -> frozenset[int]:
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
        cone, liquid = (_cone_vertices_reference, _liquid_winners_reference) if reference else (
            _cone_vertices, _liquid_winners)
        won |= _winners(ln_h, a, e, cone(ln_h, a, e))
        won |= liquid(ln_h, *(t[codes] for t in _split_terms("liquid")))
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

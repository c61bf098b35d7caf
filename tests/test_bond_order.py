"""No inversion of per-H rates against bond strength, at any accepted temperature, phase and radical.

A per-H rate ratio tends to the ratio of A factors as the temperature rises, so a weaker C–H with a smaller A
than a stronger one would be overtaken when hot (an Arrhenius extrapolation artefact, not chemistry). The check
runs over every pair of site classes where one C–H is weaker (engine.site_classes.site_bde), every rate table
and the temperatures Conditions.validate accepts for it. Exceptions are only pairs a published measurement
inverts, each named below.
"""

from __future__ import annotations

import itertools

import numpy as np
import pytest
from halosift.engine.conditions import MAX_TEMP_C, Conditions
from halosift.engine.parameters import KELVIN
from halosift.engine.rates import TABLES, rate_table
from halosift.engine.site_classes import ABSTRACTABLE, SITE_CODE, site_bde

_GAS_BENZYLIC = ("Cl + toluene, 5.9e-11 for 3 H at 298 K (Shi & Bernhard 1997) against propane CH2 and isobutane CH "
                 "(Sarzyński & Sztuba 2002): a benzylic CH3 reacts 0.54× a secondary and 0.40× a tertiary alkyl C–H "
                 "per H; allylic and propargylic CH3 carry the benzylic excess over (estimate)")
#: (radical, phase, weaker class, stronger class) → the measurement that inverts the pair.
EXCEPTIONS: dict[tuple[str, str, str, str], str] = {
    **{("cl", "gas", f"{kind}-primary", strong): _GAS_BENZYLIC
       for kind in ("allylic", "benzylic", "propargylic")
       for strong in ("secondary", "tertiary", "norbornyl-2-secondary", "norbornyl-2-tertiary")},
    **{("cl", phase, "methane", "cyclopropyl"):
       "Cl + CH4 6.6e-12·exp(−1240/T) and Cl + cyclopropane 1.4e-10·exp(−2074/T) (compiled data, gt R package "
       "reactions set): per H cyclopropane passes methane above ≈ 50 °C although its C–H is 1.3 kcal/mol stronger"
       for phase in ("gas", "liquid")},
    ("br", "liquid", "propargylic-tertiary", "allylic-secondary"):
        "Russell & DeBoer's measured benzylic degree factors (17, 37 per H at 40 °C) carried to both classes, whose "
        "bond enthalpies are additivity estimates 0.9 kcal/mol apart (within their uncertainty)",
}


def _temps_c(radical: str, phase: str) -> np.ndarray:
    """0 °C up to the highest temperature Conditions.validate accepts for a reagent using this table."""
    if radical == "br":
        top = Conditions().max_temp_c("br2")[0]
    else:
        top = Conditions(cl2_phase=phase).max_temp_c("cl2")[0]
    return np.append(np.arange(0.0, top, 10.0), top)


def _pairs() -> list[tuple[str, str]]:
    return [(w, s) for w, s in itertools.permutations(ABSTRACTABLE, 2) if site_bde(w).value < site_bde(s).value]


@pytest.mark.parametrize(("radical", "phase"), TABLES)
def test_a_weaker_c_h_is_never_slower_per_h(radical: str, phase: str) -> None:
    table = rate_table(radical, phase)
    temps = _temps_c(radical, phase)
    k = np.array([table.per_h(t + KELVIN) for t in temps])  # (temperature, site code)
    inverted = []
    for weak, strong in _pairs():
        ratio = k[:, SITE_CODE[weak]] / k[:, SITE_CODE[strong]]
        if (radical, phase, weak, strong) in EXCEPTIONS:
            continue
        if (ratio < 1 - 1e-9).any():
            i = int(np.argmax(ratio < 1 - 1e-9))
            inverted.append(f"{weak} < {strong} at {temps[i]:g} °C ({ratio[i]:.3f})")
    assert not inverted, inverted


@pytest.mark.parametrize("key", sorted(EXCEPTIONS))
def test_every_exception_is_still_an_inversion(key: tuple[str, str, str, str]) -> None:
    # An exception that no longer inverts must leave the list (it would hide a future artefact).
    radical, phase, weak, strong = key
    table = rate_table(radical, phase)
    ratios = [table.per_h(t + KELVIN)[SITE_CODE[weak]] / table.per_h(t + KELVIN)[SITE_CODE[strong]]
              for t in _temps_c(radical, phase)]
    assert min(ratios) < 1, EXCEPTIONS[key]


def test_the_check_would_catch_the_old_liquid_artefact() -> None:
    # The class of error: the measured Eα − Eβ of ethylbenzene with its 25 °C split gives A(α) < A(β); rebuilt
    # that way, the benzylic CH2 must come out slower than the CH3 when hot, and the check above must see it.
    from halosift.engine import parameters as P
    from halosift.engine.rates import _k

    prim = rate_table("cl", "liquid").params["primary"]
    t = P.CL_ETHYLBENZENE_T_K
    per_h = (P.CL_ETHYLBENZENE_ALPHA_PCT.value / 2) / ((100 - P.CL_ETHYLBENZENE_ALPHA_PCT.value) / 3)
    dea = P.CL_ETHYLBENZENE_DEA.value
    a = prim.a_per_h * per_h * np.exp(dea / (P.R_KCAL * t))
    old = P.Arrhenius(a, prim.ea + dea, "estimate", "old derivation")
    hot = 400.0 + KELVIN
    assert _k(old, hot) / _k(prim, hot) < 1
    assert rate_table("cl", "liquid").per_h(200.0 + KELVIN)[SITE_CODE["benzylic-secondary"]] > rate_table(
        "cl", "liquid").per_h(200.0 + KELVIN)[SITE_CODE["primary"]]


def test_gas_phase_keeps_the_high_range_and_condensed_phases_do_not() -> None:
    assert Conditions(cl2_phase="gas").max_temp_c("cl2")[0] == MAX_TEMP_C
    assert Conditions().max_temp_c("br2")[0] == MAX_TEMP_C
    for reagent in ("so2cl2", "nbs"):
        assert Conditions().max_temp_c(reagent)[0] < 250
    assert Conditions().max_temp_c("cl2")[0] < 250

"""Rate constants and thermochemistry against their published sources."""

from __future__ import annotations

import math

import pytest

from engine import parameters as P
from engine.rates import enthalpy_of_abstraction, rate_table
from engine.site_classes import SITE_CLASSES


def per_h_ratio(radical: str, site: str, temp_k: float) -> float:
    k = rate_table(radical).per_h(temp_k)
    return k[SITE_CLASSES.index(site)] / k[SITE_CLASSES.index("primary")]


def test_chlorine_per_h_ratios_at_298k() -> None:
    # Sarzyński & Sztuba, Int. J. Chem. Kinet. 2002, 34, 651: per H 1 : 3.7 : 4.8 at 298 K
    # (3.7 within propane, 4.8 within isobutane). The model uses one generic primary
    # constant (propane's), so the tertiary ratio may differ by isobutane's own
    # primary/propane primary (≈ 4 %); 5 % is allowed.
    assert per_h_ratio("cl", "secondary", 298.0) == pytest.approx(3.7, abs=0.05)
    assert per_h_ratio("cl", "tertiary", 298.0) == pytest.approx(4.8, rel=0.05)


@pytest.mark.parametrize("temp_k", [295.0, 350.0, 400.0, 469.0])
def test_n_butane_fit_agrees_with_propane_fit(temp_k: float) -> None:
    # Same paper: n-butane's own site fits give the same per-H secondary/primary ratio.
    a1, n1, b1 = P.CL_OTHER_FITS["n-butane primary"]
    a2, n2, b2 = P.CL_OTHER_FITS["n-butane secondary"]
    butane = (a2 / n2 * math.exp(-b2 / temp_k)) / (a1 / n1 * math.exp(-b1 / temp_k))
    assert per_h_ratio("cl", "secondary", temp_k) == pytest.approx(butane, rel=0.03)


def test_bromine_ratios_at_127c() -> None:
    # Morrison & Boyd (textbook, from memory): 1 : 82 : 1600 per H at 127 °C.
    assert per_h_ratio("br", "secondary", 400.15) == pytest.approx(82, rel=1e-6)
    assert per_h_ratio("br", "tertiary", 400.15) == pytest.approx(1600, rel=1e-6)


def test_bromine_far_more_selective_than_chlorine() -> None:
    # Common practice: the endothermic Br· abstraction is the selective one.
    for site in ("secondary", "tertiary", "benzylic-primary", "allylic-primary"):
        assert per_h_ratio("br", site, 398.0) > 10 * per_h_ratio("cl", site, 298.0)


def test_enthalpies_of_abstraction_sign() -> None:
    # Blanksby & Ellison 2003: H–Cl 103.2 > every alkyl C–H, H–Br 87.5 < every C–H listed.
    assert enthalpy_of_abstraction("primary", "cl") == pytest.approx(101.1 - 103.2)
    assert enthalpy_of_abstraction("tertiary", "br") == pytest.approx(96.5 - 87.5)
    for site in ("primary", "secondary", "tertiary"):
        assert enthalpy_of_abstraction(site, "cl") < 0 < enthalpy_of_abstraction(site, "br")


def test_vinyl_and_aryl_are_never_weighted() -> None:
    for radical in ("cl", "br"):
        k = rate_table(radical).per_h(350.0)
        for site in ("vinyl", "aryl", "alkynyl"):
            assert k[SITE_CLASSES.index(site)] == 0


def test_every_parameter_has_a_source() -> None:
    for radical in ("cl", "br"):
        for site, arr in rate_table(radical).params.items():
            assert arr.source and arr.basis in ("measured", "textbook", "estimate"), site

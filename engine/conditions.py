"""Reaction conditions: which reagent, at what temperature and in what solvent, judged against what threshold."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from halosift.engine.parameters import (
    DEFAULT_TEMP_C,
    DEFAULT_THRESHOLD_PCT,
    KELVIN,
    MAX_LIQUID_TEMP_C,
    MAX_NBS_TEMP_C,
)
from halosift.engine.rates import RateTable, product_basis, rate_table
from halosift.engine.reagents import EXPLAIN_REAGENTS, RADICAL_OF, REAGENT_LABELS, REAGENT_NAMES, REAGENTS
from halosift.engine.site_classes import ABSTRACTABLE, SITE_CLASSES
from halosift.engine.solvent import check_solvent, extrapolated, scale_rates, selectivity_exponent

__all__ = ["CL2_PHASES", "Conditions", "EXPLAIN_REAGENTS", "MAX_TEMP_C", "REAGENTS", "REAGENT_LABELS"]

#: Phases of a Cl2 chlorination: the gas phase (vapour-phase kinetics), the neat liquid hydrocarbon
#: (the preparative default), or a solution in cl2_solvent (``liquid`` with a solvent means the same).
CL2_PHASES = ("gas", "liquid", "solution")

#: Highest temperature accepted, °C (a limit of this program: beyond it no rate here means anything).
#: Gas-phase Cl2 and Br2 keep this range (vapour-phase halogenation, an alkene's allylic substitution at
#: 400 °C and above); condensed phases are bounded lower (:meth:`Conditions.max_temp_c`).
MAX_TEMP_C = 1500.0


@dataclass(frozen=True)
class Conditions:
    """Conditions for one weighing of a perceived library."""

    cl2_temp_c: float = DEFAULT_TEMP_C["cl2"]
    """Chlorination temperature, °C."""
    br2_temp_c: float = DEFAULT_TEMP_C["br2"]
    """Bromination temperature, °C."""
    threshold_pct: float = DEFAULT_THRESHOLD_PCT
    """Share of a reagent's major product (percent) at which its outcome is clean (engine.outcomes)."""
    so2cl2_temp_c: float = DEFAULT_TEMP_C["so2cl2"]
    """Sulfuryl chloride (with initiator) temperature, °C: Cl· rates at this temperature (screen and explain)."""
    cl2_solvent: str = "none"
    """Solvent of the Cl2 chlorination: none, benzene or cs2 (see engine.solvent)."""
    cl2_solvent_molar: float = 0.0
    """Solvent concentration, mol/L (0 with a solvent: Russell's neat-liquid point)."""
    nbs_temp_c: float = DEFAULT_TEMP_C["nbs"]
    """NBS (with initiator) temperature, °C; sets the Br· rates of the allylic/benzylic sites."""
    cl2_phase: str = "liquid"
    """Cl2 phase: gas, liquid (the neat hydrocarbon, a preparative chlorination's usual state) or solution
    (in cl2_solvent; liquid with a solvent set means the same). SO2Cl2 is always weighed as a liquid."""

    def __post_init__(self) -> None:
        # Checked here, not by each caller, so no screen, explain, summary or panel can weigh a condition
        # no experiment can have (a missed validate() once let 450 °C liquid Cl2 through the API).
        self.validate()

    def temp_c(self, reagent: str) -> float:
        """Temperature of one reagent, °C."""
        return {"cl2": self.cl2_temp_c, "br2": self.br2_temp_c, "so2cl2": self.so2cl2_temp_c,
                "nbs": self.nbs_temp_c}[reagent]

    def temp_k(self, reagent: str) -> float:
        """Temperature of one reagent, K."""
        return self.temp_c(reagent) + KELVIN

    def solvent_exponent(self, reagent: str) -> float:
        """Factor on log-selectivities from the solvent (1 unless Cl2 in a solvent)."""
        if reagent != "cl2":
            return 1.0
        return selectivity_exponent(self.cl2_solvent, self.cl2_solvent_molar)

    def reagent_key(self, reagent: str) -> tuple:
        """Everything one reagent's split depends on (its temperature; for cl2 also phase and solvent)."""
        key: tuple = (reagent, self.temp_c(reagent))
        return key + ((self.cl2_phase, self.cl2_solvent, self.cl2_solvent_molar) if reagent == "cl2" else ())

    def phase(self, reagent: str) -> str:
        """Rate table phase of one reagent: 'gas' only for Cl2 in the gas phase, else 'liquid'."""
        return "gas" if reagent == "cl2" and self.cl2_phase == "gas" else "liquid"

    def table(self, reagent: str) -> RateTable:
        """The rate table one reagent is weighed with."""
        return rate_table(RADICAL_OF[reagent], self.phase(reagent))

    def per_h(self, reagent: str) -> np.ndarray:
        """Rate constant per H for every site class (by site code) under these conditions."""
        k = self.table(reagent).per_h(self.temp_k(reagent))
        return scale_rates(k, self.solvent_exponent(reagent))

    def bases(self, reagent: str) -> np.ndarray:
        """What each site code's product share rests on: measured / textbook / from memory / estimate / 'not abstracted'.

        The rate's basis, weakened to 'from memory' when its source says so and by any split of the product
        (exo/endo, allylic termini: engine.rates.product_basis). A solvent scaling is an interpolation
        applied to every class, so it makes every Cl2 rate an estimate; so2cl2 borrows the Cl· constants on
        an assumption (common practice), so its rates are estimates too. Outside the temperature range of
        the reagent's rate data (the range :meth:`warnings` names) every rate is an extrapolation: an estimate.
        """
        table = self.table(reagent)
        lo, hi = table.valid_k
        assumed = (reagent == "so2cl2" or self.solvent_exponent(reagent) != 1.0
                   or not lo <= self.temp_k(reagent) <= hi)
        out = np.full(len(SITE_CLASSES), "not abstracted", dtype=object)
        for i, site in enumerate(ABSTRACTABLE):
            out[i] = "estimate" if assumed else product_basis(table, site)
        return out

    def max_temp_c(self, reagent: str) -> tuple[float, str]:
        """Highest temperature accepted for one reagent, °C, and what sets it.

        Cl2 in the gas phase and Br2 (whose substitution of a C=C substrate at 400 °C and above is a
        vapour-phase process; the engine has one Br· table) keep :data:`MAX_TEMP_C`; Cl2 as a neat liquid or
        in solution and SO2Cl2 stop at :data:`~halosift.engine.parameters.MAX_LIQUID_TEMP_C`, NBS at
        :data:`~halosift.engine.parameters.MAX_NBS_TEMP_C`.
        """
        if reagent == "nbs":
            return MAX_NBS_TEMP_C.value, "an NBS bromination is a solvent reflux"
        if reagent == "so2cl2":
            return MAX_LIQUID_TEMP_C.value, "SO2Cl2 with an initiator is a liquid-phase reaction"
        if reagent == "cl2" and self.cl2_phase != "gas":
            state = "a solution" if self.cl2_phase == "solution" or self.cl2_solvent != "none" else "a neat liquid"
            return MAX_LIQUID_TEMP_C.value, f"{state} is not a real condition above it; use phase gas"
        return MAX_TEMP_C, "beyond any model here"

    def validate(self) -> None:
        """Raise ValueError (one line) for values no experiment can have; run by the constructor too."""
        for reagent in RADICAL_OF:
            t = self.temp_c(reagent)
            if not t == t:
                raise ValueError(f"{REAGENT_NAMES[reagent]} temperature is not a number")
            if t <= -KELVIN:
                raise ValueError(f"{REAGENT_NAMES[reagent]} temperature {t:g} °C is at or below absolute zero")
        if self.cl2_phase not in CL2_PHASES:
            raise ValueError(f"unknown Cl2 phase {self.cl2_phase!r}; expected one of {', '.join(CL2_PHASES)}")
        for reagent in RADICAL_OF:
            t = self.temp_c(reagent)
            top, why = self.max_temp_c(reagent)
            if t > top:
                raise ValueError(f"{REAGENT_NAMES[reagent]} temperature {t:g} °C is above the {top:g} °C accepted ({why})")
        if not 0 <= self.threshold_pct <= 100:
            raise ValueError(f"threshold {self.threshold_pct} is not a percentage between 0 and 100")
        check_solvent(self.cl2_solvent, self.cl2_solvent_molar)
        if self.cl2_phase == "gas" and self.cl2_solvent != "none":
            raise ValueError("a Cl2 solvent needs phase solution (or liquid), not gas")
        if self.cl2_phase == "solution" and self.cl2_solvent == "none":
            raise ValueError("Cl2 phase solution needs a solvent (benzene or cs2)")
        if self.cl2_phase == "solution" and not self.cl2_solvent_molar > 0:
            # 0 M is Russell's neat-liquid point: a "solution" in no solvent is the neat liquid, phase liquid
            raise ValueError(f"a solution needs a {self.cl2_solvent} concentration above 0 M (0 M is the neat "
                             "liquid: use phase liquid)")

    def warnings(self, reagents: tuple[str, ...] = (*REAGENTS, "nbs")) -> list[str]:
        """Temperatures outside the range the rate data were measured over, and solvent extrapolation."""
        out = []
        for reagent in reagents:
            lo, hi = self.table(reagent).valid_k
            t = self.temp_k(reagent)
            if not lo <= t <= hi:
                out.append(
                    f"{REAGENT_NAMES[reagent]} at {self.temp_c(reagent):g} °C is outside the {lo - KELVIN:.0f}–{hi - KELVIN:.0f} °C "
                    "range of its rate data; the split is extrapolated"
                )
        if "cl2" in reagents and self.cl2_solvent != "none":
            if extrapolated(self.cl2_solvent, self.cl2_solvent_molar):
                out.append(
                    f"Cl2 in {self.cl2_solvent_molar:g} M {self.cl2_solvent} is beyond the measured solvent data; "
                    "the solvent effect is extrapolated"
                )
            if abs(self.cl2_temp_c - 25.0) > 10:
                out.append("the Cl2 solvent effect was measured at 25 °C; it is applied unchanged at other temperatures")
        return out

    def describe(self) -> str:
        """One line for headers and file metadata."""
        if self.cl2_solvent != "none":
            solvent = f" in {self.cl2_solvent_molar:g} M {self.cl2_solvent}"
        else:
            solvent = " (gas phase)" if self.cl2_phase == "gas" else " (neat liquid)"
        return (
            f"Cl2 at {self.cl2_temp_c:g} °C{solvent}, Br2 at {self.br2_temp_c:g} °C, SO2Cl2 at "
            f"{self.so2cl2_temp_c:g} °C, NBS at {self.nbs_temp_c:g} °C, threshold {self.threshold_pct:g} %"
        )

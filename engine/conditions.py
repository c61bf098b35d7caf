"""Reaction conditions: which reagent, at what temperature, judged against what threshold."""

from __future__ import annotations

from dataclasses import dataclass

from engine.parameters import DEFAULT_TEMP_C, DEFAULT_THRESHOLD_PCT, KELVIN
from engine.rates import rate_table

#: Reagent name → chain-carrying radical.
REAGENTS: dict[str, str] = {"cl2": "cl", "br2": "br"}
REAGENT_LABELS: dict[str, str] = {"cl2": "Cl2, light", "br2": "Br2, light"}


@dataclass(frozen=True)
class Conditions:
    """Conditions for one weighing of a perceived library."""

    cl2_temp_c: float = DEFAULT_TEMP_C["cl2"]
    """Chlorination temperature, °C."""
    br2_temp_c: float = DEFAULT_TEMP_C["br2"]
    """Bromination temperature, °C."""
    threshold_pct: float = DEFAULT_THRESHOLD_PCT
    """Share of the bromination major product (percent) that earns 'br-selective'."""

    def temp_c(self, reagent: str) -> float:
        """Temperature of one reagent, °C."""
        return {"cl2": self.cl2_temp_c, "br2": self.br2_temp_c}[reagent]

    def temp_k(self, reagent: str) -> float:
        """Temperature of one reagent, K."""
        return self.temp_c(reagent) + KELVIN

    def validate(self) -> None:
        """Raise ValueError (one line) for values no experiment can have."""
        for reagent in REAGENTS:
            t = self.temp_c(reagent)
            if not t == t or t <= -KELVIN:
                raise ValueError(f"{reagent} temperature {t} °C is at or below absolute zero")
            if t > 1500:
                raise ValueError(f"{reagent} temperature {t} °C is beyond any model here (max 1500 °C)")
        if not 0 <= self.threshold_pct <= 100:
            raise ValueError(f"threshold {self.threshold_pct} is not a percentage between 0 and 100")

    def warnings(self, reagents: tuple[str, ...] = tuple(REAGENTS)) -> list[str]:
        """Temperatures outside the range the rate data were measured over."""
        out = []
        for reagent in reagents:
            lo, hi = rate_table(REAGENTS[reagent]).valid_k
            t = self.temp_k(reagent)
            if not lo <= t <= hi:
                out.append(
                    f"{reagent} at {self.temp_c(reagent):g} °C is outside the {lo - KELVIN:.0f}–{hi - KELVIN:.0f} °C "
                    "range of its rate data; the split is extrapolated"
                )
        return out

    def describe(self) -> str:
        """One line for headers and file metadata."""
        return (
            f"Cl2 at {self.cl2_temp_c:g} °C, Br2 at {self.br2_temp_c:g} °C, "
            f"br-selective threshold {self.threshold_pct:g} %"
        )

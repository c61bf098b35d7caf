"""Every number the selectivity model rests on, each with its source.

Nothing else in the engine holds a chemical constant. Values are tagged with a
``basis`` so every prediction can say what it stands on:

* ``measured``  – a published measurement, cited;
* ``textbook``  – a standard textbook value (cited);
* ``estimate``  – derived here (Bell–Evans–Polanyi, additivity), with the
  assumption stated;
* values we could not re-check against the paper are marked "from memory" in
  their source text; :func:`halosift.engine.rates.stated_basis` reads that
  marker, so a prediction resting on such a value reports ``from memory``
  rather than ``measured`` or ``textbook`` (the ``confidence`` column).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

Basis = Literal["measured", "textbook", "estimate"]

#: Gas constant, kcal mol⁻¹ K⁻¹ (CODATA: 8.314462618 J mol⁻¹ K⁻¹ / 4184).
R_KCAL = 8.314462618 / 4184.0
KELVIN = 273.15


@dataclass(frozen=True)
class Value:
    """A number with its provenance."""

    value: float
    """The number itself, in the unit named by the constant that holds it."""
    basis: Basis
    """How solid it is: measured, textbook or estimate."""
    source: str
    """Where it comes from (citation, or the derivation for estimates)."""


# ---------------------------------------------------------------------------
# C–H and H–X bond dissociation enthalpies at 298 K, kcal/mol.
# Blanksby, S. J.; Ellison, G. B. "Bond Dissociation Energies of Organic
# Molecules", Acc. Chem. Res. 2003, 36, 255–263, Table 1 (values from memory,
# as quoted in the project brief).
# ---------------------------------------------------------------------------
_BE = "Blanksby & Ellison, Acc. Chem. Res. 2003, 36, 255 (from memory)"

BDE: dict[str, Value] = {
    "methane": Value(105.0, "measured", _BE + ": CH3–H"),
    "primary": Value(101.1, "measured", _BE + ": C2H5–H"),
    "secondary": Value(98.6, "measured", _BE + ": (CH3)2CH–H"),
    "tertiary": Value(96.5, "measured", _BE + ": (CH3)3C–H"),
    "allyl": Value(88.8, "measured", _BE + ": CH2=CHCH2–H"),
    "benzyl": Value(89.7, "measured", _BE + ": C6H5CH2–H"),
    "vinyl": Value(110.7, "measured", _BE + ": CH2=CH–H"),
    "phenyl": Value(112.9, "measured", _BE + ": C6H5–H"),
    # Not in the brief's list; both from memory of the same review and of
    # Luo, Comprehensive Handbook of Chemical Bond Energies (CRC, 2007).
    "propargyl": Value(90.0, "estimate", "HC≡CCH2–H ≈ 90 kcal/mol, Luo 2007 (from memory)"),
    "ethynyl": Value(133.3, "measured", _BE + ": HC≡C–H (from memory)"),
    "cyclopropyl": Value(106.3, "measured", "c-C3H5–H, Luo 2007 (from memory)"),
    # An allylic or benzylic C–H whose radical is conjugated further (pentadienyl, 1-phenylallyl,
    # diphenylmethyl): between 1,4-pentadiene's 76.6 and allylbenzene's ≈ 82 kcal/mol (both from memory
    # of Blanksby & Ellison 2003 / Luo 2007); one value for the class (estimate).
    "conjugated": Value(80.0, "estimate", "pentadienyl/1-phenylallyl-type C–H, 76.6–82 kcal/mol; 80 taken "
                        "(from memory; estimate)"),
}

BDE_HX: dict[str, Value] = {
    "cl": Value(103.2, "measured", _BE + ": H–Cl"),
    "br": Value(87.5, "measured", _BE + ": H–Br"),
    "f": Value(136.3, "measured", _BE + ": H–F (from memory)"),
    "i": Value(71.3, "measured", _BE + ": H–I (from memory)"),
}

# ---------------------------------------------------------------------------
# Cl· + alkane, site-specific Arrhenius fits, 295–469 K, gas phase.
# Sarzyński, D.; Sztuba, B. "Gas-phase reactions of Cl atoms with propane, n-butane, and isobutane",
# Int. J. Chem. Kinet. 2002, 34, 651–658 (all six fits below checked against the paper's indexed abstract).
# k = A·exp(−B/T) per *site* (cm³ molecule⁻¹ s⁻¹); per-H A = A / n_H.
# We adopt propane's primary and secondary fits and isobutane's tertiary fit
# as the generic per-H constants; the n-butane fits agree with propane's
# per-H ratio to better than 2 % over the range.
# ---------------------------------------------------------------------------
_SS = "Sarzyński & Sztuba, Int. J. Chem. Kinet. 2002, 34, 651–658"


@dataclass(frozen=True)
class Arrhenius:
    """Per-hydrogen Arrhenius parameters for one site class and one radical."""

    a_per_h: float
    """Pre-exponential factor per hydrogen, cm³ molecule⁻¹ s⁻¹."""
    ea: float
    """Activation energy, kcal/mol (may be negative for Cl·)."""
    basis: Basis
    """How solid the pair is: measured, textbook or estimate."""
    source: str
    """Citation, or the derivation for estimates."""


def _from_b(a_site: float, n_h: int, b_kelvin: float, source: str) -> Arrhenius:
    return Arrhenius(a_site / n_h, b_kelvin * R_KCAL, "measured", source)


CL_ANCHORS: dict[str, Arrhenius] = {
    "primary": _from_b(7.4e-11, 6, 70.0, _SS + ": propane CH3, 7.4e-11·exp(−70/T)"),
    "secondary": _from_b(5.1e-11, 2, -104.0, _SS + ": propane CH2, 5.1e-11·exp(+104/T)"),
    "tertiary": _from_b(2.9e-11, 1, -155.0, _SS + ": isobutane CH, 2.9e-11·exp(+155/T)"),
}
#: The other fits of the same paper, kept for the consistency test.
CL_OTHER_FITS: dict[str, tuple[float, int, float]] = {
    "n-butane primary": (7.3e-11, 6, 68.0),
    "n-butane secondary": (9.9e-11, 4, -106.0),
    "isobutane primary": (13.0e-11, 9, 104.0),
}
#: Gas-phase Cl· data span Sarzyński & Sztuba's 295–469 K and the 300 °C vapour-phase products below.
CL_RANGE_K = (295.0, 300.0 + KELVIN)

# Neighbour effects. Aschmann & Atkinson's structure–activity relationship for Cl· + alkanes
# ("Rate constants for the gas-phase reactions of alkanes with Cl atoms at 296 ± 2 K", Int. J. Chem. Kinet. 1995,
# 27(6), 613–622: title and pages checked against Sarzyński & Sztuba's indexed reference list; the constants are
# from memory, not re-checked) writes
# k(CH3–X) = k_prim·F(X), k(X–CH2–Y) = k_sec·F(X)·F(Y), k(tertiary) = k_tert·F(X)F(Y)F(Z) with
# F(–CH3) = 1 and F(–CH2–) = F(>CH–) = F(>C<) = 0.79 at 298 K, fitted to whole-molecule rate constants.
# NOT USED: the site-resolved kinetics contradict it. Per H at 298 K, n-butane's CH2 (an ethyl
# neighbour) reacts 0.97× propane's CH2, isobutane's CH3 (next to CH) 1.04× propane's CH3 (next to
# CH2) (Sarzyński & Sztuba, fits above), and ethane's CH3 (next to CH3) ≈ 0.97× propane's CH3 (JPL
# 19-5, below) — where the relationship predicts 0.79, 1.0 and 1.27. Its own constants (k_prim
# 3.32e-11, k_sec 8.34e-11, k_tert 6.09e-11 per group) give propane 39/61 and isobutane 56/44
# against the published 45/55 and 62–64/36, where the site fits give 45/55 and 64/36 (n-butane:
# SAR 28.5/71.5, model 28.8/71.2, published 28/72); its factors on this model's class rates put
# n-butane at 33.9/66.1; a factor fitted on n-butane's distribution is 1.04 (no attenuation), and Choi et al.'s
# propane (48 % primary at 298 K, tests/test_published_distributions.py) is missed by 9.4 points with the SAR's
# constants. The engine therefore keeps one rate per class; tests/test_rates.py checks
# the neighbour-independence on the site fits, tests/test_neighbour_sar.py the distributions.
# (The paper's table, and any text quoting its constants, was searched for and not found, so the constants stay
# "from memory"; no temperature-dependent Cl-atom SAR with numbers was found either.)
# Whole-molecule k(298 K) of larger alkanes (tests/test_neighbour_sar.py) do show a neighbour effect the
# site fits cannot: a CH2 between two non-methyl carbons reacts ≈ 0.76× (cyclohexane), so the class model is
# 20–73 % fast for rings and 21–63 % for C9–C14 chains (open chains to C8 agree within the data's uncertainty).
# Not adopted yet (README, "Neighbour effects toward Cl·").
CL_SAR_F_NONMETHYL = Value(0.79, "measured", "Aschmann & Atkinson, Int. J. Chem. Kinet. 1995, 27, 613–622 (value from "
                           "memory; not used, see above)")
CL_SAR_GROUP_K298 = {"primary": 3.32e-11, "secondary": 8.34e-11, "tertiary": 6.09e-11}  # same source; per group
#: Cl + ethane, 7.05e-11·exp(−60/T) for 6 H, 220–600 K, k298 5.8e-11 ± 15 % (the compilation _GT below; JPL 19-5's
#: 7.2e-11·exp(−70/T), recalled from memory, agrees within 1 % at 298 K) — a check of neighbour-independence.
CL_ETHANE = _from_b(7.05e-11, 6, 60.0, "compiled Cl + RH rate constants, gt R package data set data-raw/reactions.csv "
                    "(rstudio/gt @042da4e8): Cl + C2H6, 7.05e-11·exp(−60/T), 220–600 K")

#: Vapour-phase chlorination at 300 °C: per-H relative rates primary : secondary : tertiary
#: 1 : 3.25 : 4.43 — the rule Hass, McBee & Weber drew from their product analyses of propane,
#: butanes and pentanes (Ind. Eng. Chem. 1935, 27, 1190; 1936, 28, 333; values and pages from
#: memory, not re-checked). The gas-phase Cl· table passes through Sarzyński & Sztuba's per-H
#: ratios at 298 K and these at 300 °C: the two fixed points set each class's A and Ea relative
#: to primary (the primary constants stay Sarzyński & Sztuba's propane fit).
_HMW = "Hass, McBee & Weber, Ind. Eng. Chem. 1936, 28, 333 (vapour phase, 300 °C; from memory)"
CL_VAPOUR_T_K = 300.0 + KELVIN
CL_VAPOUR_RATIOS: dict[str, Value] = {
    "secondary": Value(3.25, "measured", _HMW + ": secondary : primary per H 3.25"),
    "tertiary": Value(4.43, "measured", _HMW + ": tertiary : primary per H 4.43"),
}
#: Sarzyński & Sztuba's per-H ratios at this temperature are the low-temperature fixed point.
CL_LOW_T_K = 298.15

# Benzylic C–H toward Cl·.
# Gas phase: Cl + toluene k = 5.9e-11 cm³ molecule⁻¹ s⁻¹ at 298 K, all benzylic abstraction
# (Shi & Bernhard, Int. J. Chem. Kinet. 1997, as quoted by Finlayson-Pitts & Pitts, Chemistry of
# the Upper and Lower Atmosphere, 2000). The value was checked against a published excerpt of that
# book (climate-policy-watcher.org/aromatic-hydrocarbons/ch-1.html: toluene 0.59e-10, benzene
# 1.3e-15, Shi and Bernhard 1997); the journal's volume and pages were not. Its temperature
# dependence is slight (from memory), so the benzylic excess over an alkyl C–H of the same degree
# is put into A, not Ea (estimate).
CL_TOLUENE_K298 = Value(
    5.9e-11, "measured",
    "Cl + toluene, 298 K, gas phase: 5.9e-11 cm³ molecule⁻¹ s⁻¹ for 3 benzylic H (Shi & Bernhard 1997, "
    "quoted in Finlayson-Pitts & Pitts 2000; value checked against an excerpt of the book, journal pages not)",
)
CL_TOLUENE_H = 3
#: Cl + ethylbenzene, 298 K, gas phase: 1.29e-10 ± 25 % for the whole molecule (the compilation _GT below). With
#: the ring H negligible (Cl + benzene 1.3e-15, same excerpt as toluene) and the β CH3 taken as an ordinary primary
#: C–H (assumption), it fixes the secondary benzylic excess: ≈ 1.4× a secondary alkyl C–H per H, against ≈ 2.0×
#: for toluene's primary benzylic C–H over a primary one — the excess shrinks with degree, so carrying toluene's
#: over (as before) made ethylbenzene 1.36× too fast.
CL_ETHYLBENZENE_K298 = Value(
    1.29e-10, "measured",
    "compiled Cl + RH rate constants, gt R package data set data-raw/reactions.csv (rstudio/gt @042da4e8): "
    "Cl + ethylbenzene, k298 1.29e-10 ± 25 %",
)
# Liquid phase: photochlorination of ethylbenzene gives α 90 % / β 10 %, and over 22–98 °C the
# α and β chlorinations differ in activation energy by 3.13 kcal/mol (α the lower: it is the
# favoured one) — liquid-phase photochlorination of C6H5R, R = Et, Pr, iPr, Bu, s-Bu, pentyl
# (abstract indexed at scilit.com/publications/fa60b48db7bc69fde73c358cee4778ba; authors and
# journal not checked; the temperature of the 90/10 split is taken as 25 °C, an assumption).
_EB = ("liquid-phase photochlorination of alkylbenzenes, 22–98 °C (abstract indexed at "
       "scilit.com/publications/fa60b48db7bc69fde73c358cee4778ba; authors/journal not checked)")
CL_ETHYLBENZENE_ALPHA_PCT = Value(90.0, "measured", _EB + ": ethylbenzene α 90 % / β 10 %")
CL_ETHYLBENZENE_T_K = 298.15
CL_ETHYLBENZENE_DEA = Value(
    -3.13, "measured", _EB + ": Eα − Eβ of ethylbenzene = 3.13 kcal/mol in size, α lower (sign read from which is favoured)"
)
CL_LIQUID_BENZYLIC_RANGE_K = (22.0 + KELVIN, 98.0 + KELVIN)

# ---------------------------------------------------------------------------
# Br·: relative per-H reactivity 1 : 82 : 1600 (primary : secondary : tertiary)
# at 127 °C, liquid phase — Morrison & Boyd, Organic Chemistry (textbook,
# from memory). Kinetics near 400 K in the gas phase give a steeper
# ≈1 : 200 : 6500 (Seakins et al., below). We keep the textbook ratios at
# 127 °C because halosift predicts preparative product mixtures, which is
# what they were measured on, and they reproduce propane's 3/97 at 127 °C.
#
# Temperature dependence: the activation energy of each alkyl class comes
# from thermochemistry and the measured reverse reactions,
# Ea(R–H + Br·) = ΔH + Ea(R· + HBr), exact by microscopic reversibility up
# to small heat-capacity terms; ΔH from the bond enthalpies above,
# Ea(R· + HBr) from Seakins, Pilling, Niiranen, Gutman & Krasnoperov,
# J. Phys. Chem. 1992, 96, 9847 (numbers checked against its abstract).
# The textbook ratios at 127 °C then fix each class's A per H. (Before,
# equal A was assumed and the whole ratio went into Ea: an effective
# Evans–Polanyi slope of 1.3 on bond enthalpy, which is unphysical.)
# ---------------------------------------------------------------------------
_MB = "Morrison & Boyd, Organic Chemistry, per-H 1 : 82 : 1600 at 127 °C (textbook, from memory)"
BR_REFERENCE_T_K = 127.0 + KELVIN
BR_RATIOS: dict[str, Value] = {
    "primary": Value(1.0, "textbook", _MB),
    "secondary": Value(82.0, "textbook", _MB),
    "tertiary": Value(1600.0, "textbook", _MB),
}
_SP = "Seakins, Pilling, Niiranen, Gutman & Krasnoperov, J. Phys. Chem. 1992, 96, 9847"
KJ = 1.0 / 4.184
#: Activation energy of R· + HBr → R–H + Br·, kcal/mol, by the class of the radical formed.
BR_REVERSE_EA: dict[str, Value] = {
    "methane": Value(
        -1.6 * KJ, "measured",
        _SP + ": CH3 + HBr, 299–536 K, |Ea| = 1.6 kJ/mol (the indexed abstract garbles the sign; taken "
        "negative like the other three, not re-checked)",
    ),
    "primary": Value(-4.2 * KJ, "measured", _SP + ": C2H5 + HBr, 297–530 K, Ea = −4.2 kJ/mol"),
    "secondary": Value(-6.4 * KJ, "measured", _SP + ": i-C3H7 + HBr, 298–530 K, Ea = −6.4 kJ/mol"),
    "tertiary": Value(-7.8 * KJ, "measured", _SP + ": t-C4H9 + HBr, 298–530 K, Ea = −7.8 kJ/mol"),
}
#: The same paper's direct Br + RH measurements (whole molecule): (A cm³ molecule⁻¹ s⁻¹, H, Ea kJ/mol,
#: range K). Not used by the model: they are the independent check of the Ea construction above.
BR_FORWARD_FITS: dict[str, tuple[float, int, float, tuple[float, float]]] = {
    "ethane": (2.35e-10, 6, 53.3, (473.0, 621.0)),
    "propane": (8.78e-11, 8, 36.0, (476.0, 667.0)),
    "isobutane": (1.61e-10, 10, 28.8, (423.0, 621.0)),
}
#: A per H of a primary C–H: Br + C2H6, 2.35e-10 for 6 H (same paper); sets only the absolute scale.
BR_A_PER_H = Value(2.35e-10 / 6, "measured", _SP + ": Br + C2H6, A = 2.35e-10 for 6 H; cancels in every product ratio")
BR_RANGE_K = (298.0, 536.0)  # the 127 °C ratios and the reverse kinetics (297–536 K)

#: Evans–Polanyi slope for saturated C–H without data of their own toward Br· (cyclopropyl; the
#: bicyclic classes below when no distribution covers them): the abstraction is endothermic by
#: 9–18 kcal/mol, so the transition state is late and the barrier follows most of any further change
#: of ΔH, but the slope must stay below 1 (a barrier cannot grow faster than the endothermicity).
BEP_ALPHA_SATURATED_BR = Value(
    0.9, "estimate",
    "late transition state of an endothermic abstraction (Hammond), bounded below 1; value chosen (estimate)",
)

# ---------------------------------------------------------------------------
# Benzylic and allylic C–H toward Br·. The primary benzylic site is placed by
# an Evans–Polanyi slope from the primary alkyl site. Within the benzylic
# series the degree matters far less than in alkanes (the radical is already
# delocalised): per-H relative rates toluene : ethylbenzene : cumene
# ≈ 1 : 17 : 37 toward Br· (Russell & DeBoer, J. Am. Chem. Soc. 1963, 85,
# 3136, photobromination of alkylbenzenes; values, temperature (≈ 40 °C) and
# pages from memory, not re-checked). Equal A per H within the series is
# assumed, so each factor becomes an activation-energy difference at that
# temperature (estimate). Allylic and propargylic sites take the same
# factors (estimate: no competitive alkene data used).
# ---------------------------------------------------------------------------
BEP_ALPHA_DELOCALISED_BR = Value(
    0.5,
    "estimate",
    "chosen so Ea(Br + toluene) − Ea(Br + ethane) ≈ −5.7 kcal/mol, in line with the "
    "≈ −6 kcal/mol of gas-phase Br· data (NIST kinetics database, from memory)",
)
_RD = ("Russell & DeBoer, J. Am. Chem. Soc. 1963, 85, 3136: per-H toluene : ethylbenzene : cumene "
       "≈ 1 : 17 : 37 toward Br· (from memory, not re-checked)")
BR_BENZYLIC_T_K = 40.0 + KELVIN
BR_BENZYLIC_RATIOS: dict[str, Value] = {
    "primary": Value(1.0, "measured", _RD),
    "secondary": Value(17.0, "measured", _RD),
    "tertiary": Value(37.0, "measured", _RD),
}

# ---------------------------------------------------------------------------
# Cl· + methane, for completeness (a one-product substrate; absolute k only).
# JPL Publication 19-5 (Burkholder et al. 2019): 7.1e-12·exp(−1270/T) for 4 H
# (from memory).
# ---------------------------------------------------------------------------
#: A compilation of evaluated gas-phase rate constants at hand as a file: the ``reactions`` data set of the gt R
#: package (github.com/rstudio/gt, data-raw/reactions.csv at commit 042da4e8b42231b89844de523e1fa457f3be8e13,
#: columns Cl_k298, Cl_unc, Cl_A, Cl_B, Cl_t_low, Cl_t_high; k = A·exp(−B/T)). Values were read from that file;
#: the primary studies behind them were not re-checked.
_GT = "compiled Cl + RH rate constants, gt R package data set data-raw/reactions.csv (rstudio/gt @042da4e8)"
CL_METHANE = _from_b(6.6e-12, 4, 1240.0, _GT + ": Cl + CH4, 6.6e-12·exp(−1240/T), 200–300 K, k298 1.0e-13 ± 15 %")
#: The JPL 19-5 expression recalled for the same reaction, 7.1e-12·exp(−1270/T) (from memory), gives the same
#: k(298 K), 1.0e-13; kept as a cross-check (tests/test_rates.py).
CL_METHANE_JPL = (7.1e-12, 1270.0)

# ---------------------------------------------------------------------------
# Cl· + cyclopropane: k = 1.4e-10·exp(−2074/T) for the whole molecule (6 equivalent H), 300–450 K,
# k(298 K) = 1.4e-13 ± 29 % (the compilation above), some 400 times slower per H than a primary C–H —
# ring C–H are unusually strong. This replaces k(298 K) ≈ 1.1e-13 recalled from memory with A per H
# borrowed from the secondary anchor and Ea derived from the two (4.29 kcal/mol; the compiled
# expression has 4.12), which had replaced a BEP extrapolation whose fitted slope (≈ 0.1) made ring
# C–H react almost like secondary ones.
# ---------------------------------------------------------------------------
CL_CYCLOPROPANE = _from_b(
    1.4e-10, 6, 2074.0, _GT + ": Cl + cyclopropane, 1.4e-10·exp(−2074/T), 300–450 K, k298 1.4e-13 ± 29 %"
)
CL_CYCLOPROPANE_H = 6

# ---------------------------------------------------------------------------
# Reagent defaults and verdict threshold (common practice, no source).
# ---------------------------------------------------------------------------
#: so2cl2: near the boiling point of SO2Cl2 (69 °C), where it is usually run (common practice).
#: nbs: refluxing CCl4 (77 °C), the classical Wohl–Ziegler solvent (common practice; greener solvents
#: such as PhCF3 are run at similar temperatures).
DEFAULT_TEMP_C: dict[str, float] = {"cl2": 25.0, "br2": 125.0, "so2cl2": 70.0, "nbs": 77.0}
DEFAULT_THRESHOLD_PCT = 90.0
#: Highest temperature a condensed-phase (neat liquid or solution) radical chlorination is accepted at, °C:
#: liquid-phase side-chain chlorinations are run up to about 200 °C (toluene to benzotrichloride is finished
#: near 200 °C, from memory); SO2Cl2 with an initiator is a liquid-phase reagent, bounded alike. Above it a neat
#: liquid or a solution is not a real condition, so Conditions.validate refuses it (common practice).
MAX_LIQUID_TEMP_C = Value(200.0, "estimate", "liquid-phase radical chlorination up to ≈ 200 °C (common practice)")
#: Highest NBS temperature accepted, °C: a Wohl–Ziegler bromination is a reflux in CCl4 (77 °C) or a higher-boiling
#: solvent (PhCF3 102 °C, chlorobenzene 132 °C); NBS itself decomposes near its melting point, ≈ 175 °C (from
#: memory). 150 °C bounds every such reflux (common practice).
MAX_NBS_TEMP_C = Value(150.0, "estimate", "Wohl–Ziegler reflux, 77–132 °C; NBS decomposes ≈ 175 °C (common practice)")
DEFAULT_MAX_HEAVY_ATOMS = 150

# ---------------------------------------------------------------------------
# Reagents halosift declines to predict (see engine.reagents). The numbers
# here feed the explanation the user gets instead of a prediction.
# ---------------------------------------------------------------------------
#: Per-H relative reactivity of F· toward primary : secondary : tertiary C–H,
#: room temperature — near statistical, i.e. barely selective.
F_RATIOS: dict[str, Value] = {
    "primary": Value(1.0, "textbook", "F· per-H selectivity ≈ 1 : 1.2 : 1.4 at 25 °C (textbook, from memory)"),
    "secondary": Value(1.2, "textbook", "F· per-H selectivity ≈ 1 : 1.2 : 1.4 at 25 °C (textbook, from memory)"),
    "tertiary": Value(1.4, "textbook", "F· per-H selectivity ≈ 1 : 1.2 : 1.4 at 25 °C (textbook, from memory)"),
}
#: F–F bond enthalpy, kcal/mol: so weak that the whole chain R–H + F2 → R–F + HF
#: releases ≈ 100 kcal/mol, enough to break C–C bonds (uncontrolled, explosive).
BDE_FF = Value(37.8, "textbook", "F–F ≈ 37–38 kcal/mol (standard thermochemical tables, from memory)")
BDE_CF = Value(
    108.0, "textbook", "primary C–F ≈ 108 kcal/mol (Blanksby & Ellison 2003 / Luo 2007, from memory)"
)

# ---------------------------------------------------------------------------
# Cyclopropylmethyl radical ring opening (a "radical clock"): fast enough that
# halogen transfer competes with it, so ring-opened products are a risk.
# ---------------------------------------------------------------------------
K_CYCLOPROPYLMETHYL_OPENING = Value(
    1.0e8,
    "measured",
    "cyclopropylmethyl → but-3-enyl, k ≈ 1e8 s⁻¹ at 25 °C (Griller & Ingold, Acc. Chem. Res. 1980, 13, 317; from memory)",
)

# ---------------------------------------------------------------------------
# Bridgehead C–H of small bicycles ([1.1.1]…[2.2.2], every bridge 1–2 atoms):
# the radical cannot planarise. One site class covers them all, so one
# number: a tertiary C–H strengthened by a pyramidalisation penalty.
# ---------------------------------------------------------------------------
BDE_BRIDGEHEAD = Value(
    104.0,
    "estimate",
    "tertiary C–H (96.5) + ≈ 7.5 kcal/mol for a radical that cannot planarise; chosen between "
    "the ≈ 100–106 kcal/mol quoted for 1-norbornyl C–H and the stronger bicyclo[1.1.1]pentyl C–H "
    "(from memory; one value for all small bicycles is itself an estimate)",
)
NORBORNANE_CL2_NOTE = (
    "norbornane + Cl2 chlorinates almost only at C2, exo more than endo; 7- and bridgehead C1 chlorides "
    "are minor (from memory; engine.parameters.NORBORNANE_CL2)"
)

# ---------------------------------------------------------------------------
# Bicyclo[2.2.1] skeletons (norbornane): three site classes of their own.
# C2/C3/C5/C6 ("norbornyl-2") give a 2-norbornyl radical that takes the
# halogen mostly from the exo face; C7 ("norbornyl-7") gives a radical whose
# C1–C7–C4 angle (≈ 94°) resists planarisation; C1/C4 are bridgeheads.
# Published: norbornane + Cl2 (liquid, near room temperature) gives the
# 2-chloride almost exclusively, exo over endo (Kooyman & Vegter, Tetrahedron
# 1958, 4, 382; Russell & Hendry on norbornane chlorination — the split below
# is from memory, not re-checked: 2-Cl 96 %, 7-Cl 3 %, 1-Cl 1 %).
# Per-H factors relative to an open-chain C–H of the same degree follow, with
# the 2-position H taken as ordinary (factor 1, an assumption): C7 and the
# bridgehead get factors from that split, put into Ea at 25 °C with equal A
# (estimate).
# ---------------------------------------------------------------------------
_KV = ("norbornane + Cl2, liquid, ≈ 25 °C: 2-Cl 96 %, 7-Cl 3 %, 1-Cl 1 % (Kooyman & Vegter, Tetrahedron 1958, "
       "4, 382; Russell & Hendry; split from memory, not re-checked)")
NORBORNANE_CL2: dict[str, Value] = {
    "norbornyl-2": Value(96.0, "measured", _KV),
    "norbornyl-7": Value(3.0, "measured", _KV),
    "bridgehead": Value(1.0, "measured", _KV),
}
NORBORNANE_H = {"norbornyl-2": 8, "norbornyl-7": 2, "bridgehead": 2}
NORBORNANE_T_K = 25.0 + KELVIN
#: Exo share of the 2-halide: set by which face of the 2-norbornyl radical the halogen donor meets,
#: so a property of the radical and the donor, not of the H abstracted.
EXO_FRACTION: dict[str, Value] = {
    "cl": Value(0.70, "measured", "2-norbornyl radical + Cl2: exo : endo ≈ 70 : 30 (Kooyman & Vegter 1958; from memory)"),
    "br": Value(0.95, "estimate", "2-norbornyl radical + Br2: exo ≥ 95 % (common practice: the larger donor is more "
                "exo-selective; from memory)"),
}
#: C7–H of norbornane toward Br· (no distribution used): the 7-norbornyl radical lies ≈ 3 kcal/mol above a
#: 2-norbornyl radical (from memory of computed radical stabilities; estimate), placed by BEP_ALPHA_SATURATED_BR.
NORBORNYL7_EXTRA_BDE = Value(3.0, "estimate", "7-norbornyl vs 2-norbornyl radical ≈ +3 kcal/mol (from memory; estimate)")

# ---------------------------------------------------------------------------
# Alkenes under Cl2/Br2: addition to C=C wins at ordinary temperatures;
# substitution (allylic) wins only hot or at very low halogen concentration.
# engine.outcomes rules Cl2, Br2 and SO2Cl2 out for a C=C substrate below
# these temperatures and weighs allylic substitution above them.
# ---------------------------------------------------------------------------
ALKENE_SUBSTITUTION_T_C = Value(
    400.0,
    "measured",
    "propene + Cl2 in the gas phase at 400 °C and above gives allyl chloride rather than "
    "1,2-dichloropropane, the industrial allyl chloride process (Groll & Hearne, Ind. Eng. Chem. 1939, "
    "31, 1530, as cited by Hearne, Evans, Yale & Hoff, J. Am. Chem. Soc. 1953, vol. 75 (page not verified: searched for and not found), on the "
    "high-temperature chlorination of chloropropenes; 400 °C gas phase as in the standard organic textbooks)",
)
BR_ALKENE_SUBSTITUTION_T_C = Value(
    400.0,
    "estimate",
    "textbooks state that propene and Br2, like Cl2, substitute rather than add only at very high temperature "
    "or very low halogen concentration, without a number for Br2; Cl2's 400 °C is borrowed (estimate)",
)
#: C≡C under Cl2/Br2/SO2Cl2: halogen atoms and halogens add to the triple bond; this program knows no
#: temperature window in which substitution of an alkyne substrate wins, so none is offered (common practice).
ALKYNE_ADDITION_NOTE = (
    "Cl2 and Br2 (and Cl· from SO2Cl2) add to C≡C; no temperature at which substitution of an alkyne wins is "
    "known to this program (common practice)"
)

# ---------------------------------------------------------------------------
# Sulfuryl chloride with a radical initiator (peroxide or AIBN). Used as a
# liquid source of Cl· (Kharasch & Brown, J. Am. Chem. Soc. 1939, 61, 2142,
# from memory). halosift treats the chain carrier as Cl· with Cl2's rate
# constants; reports of somewhat higher selectivity exist, but we know no
# correction we could cite with numbers, so none is applied (common practice).
# ---------------------------------------------------------------------------
SO2CL2_NOTE = (
    "SO2Cl2 + initiator treated as Cl· with the Cl2 rate constants (common practice; "
    "reagent: Kharasch & Brown, J. Am. Chem. Soc. 1939, 61, 2142, from memory); no correction "
    "for any SO2Cl· participation is applied"
)

# ---------------------------------------------------------------------------
# Solvent effect on Cl· selectivity (complexed Cl· in aromatic solvents and CS2).
# Russell, J. Am. Chem. Soc. 1958, 80, 4987: 2,3-dimethylbutane + Cl2 at 25 °C,
# per-H tertiary : primary (values from memory).
# ---------------------------------------------------------------------------
_RU = "Russell, J. Am. Chem. Soc. 1958, 80, 4987, 2,3-dimethylbutane at 25 °C (from memory)"
RUSSELL_T_K = 25.0 + KELVIN
RUSSELL_NEAT = Value(4.0, "measured", _RU + ": tertiary:primary per H ≈ 4 neat")
#: solvent → ((molarity, per-H tertiary:primary), ...) measured points, ascending molarity.
RUSSELL_POINTS: dict[str, tuple[tuple[float, Value], ...]] = {
    "benzene": (
        (4.0, Value(14.0, "measured", _RU + ": ≈ 14 in 4 M benzene")),
        (8.0, Value(49.0, "measured", _RU + ": ≈ 49 in 8 M benzene")),
    ),
    "cs2": ((12.0, Value(225.0, "measured", _RU + ": ≈ 225 in 12 M CS2")),),
}
#: Molarity of the pure solvent (density / molar mass at 25 °C), the upper
#: bound of any solution: benzene 0.874 g/mL / 78.11 g/mol; CS2 1.26 / 76.14 (textbook, from memory).
SOLVENT_MAX_MOLAR: dict[str, float] = {"benzene": 11.2, "cs2": 16.6}

# ---------------------------------------------------------------------------
# NBS (Wohl–Ziegler): allylic and benzylic bromination by Br· at a low, steady
# Br2 concentration (Br2 is regenerated from NBS by the HBr formed), so Br2
# addition to C=C cannot compete (the Goldfinger mechanism; common practice).
# Reference for the reagent: Ziegler et al., Liebigs Ann. Chem. 1942, 551, 80;
# review Djerassi, Chem. Rev. 1948, 43, 271 (both from memory).
# The chain carrier is Br·, so the rate of forming each allylic/benzylic
# radical uses halosift's Br· constants; the delocalised allyl radical then
# takes Br at either terminus.
# ---------------------------------------------------------------------------
PROPARGYL_NBS_NOTE = (
    "a propargylic radical (C–H next to C≡C, benzylic or allylic ones included) is delocalised onto the far "
    "alkyne carbon, so Br· can end at either terminus: propargyl and allenyl bromides both form (from memory; "
    "common practice to expect the mixture), and halosift has no measured split to weigh them by"
)
NBS_NOTE = (
    "NBS with an initiator: Br· at low Br2 concentration; only allylic and benzylic C–H are brominated "
    "(other C–H get no share), an allylic radical gives Br at both termini (allylic transposition, E/Z mixture)"
)
#: 1-octene + NBS: 3-bromo-1-octene : 1-bromo-2-octene (E + Z) ≈ 17 : 83 — the figure widely quoted for
#: this teaching-laboratory reaction (from memory, not re-checked; the exact split varies with conditions).
NBS_OCTENE_SPLIT = Value(
    17.0,
    "measured",
    "1-octene + NBS: ≈ 17 % 3-bromo-1-octene, ≈ 83 % 1-bromo-2-octene (E + Z) (published NBS product ratio, "
    "from memory, not re-checked)",
)
#: Weight of an allyl-radical terminus: F ** n, n = carbon substituents on the C=C the product ends up with
#: (the more substituted alkene is favoured, as product stability suggests). F is fixed by the 1-octene split:
#: its two termini differ by one substituent (CH2=CH–R vs R'CH=CH–R).
NBS_SUBSTITUENT_FACTOR = Value(
    (100.0 - NBS_OCTENE_SPLIT.value) / NBS_OCTENE_SPLIT.value,
    "estimate",
    "F = 83/17 per extra alkyl substituent on the product C=C, from the 1-octene split; one factor for every "
    "alkene (estimate); a product C=C conjugated with an arene or another C=C counts one substituent more "
    "(NBS_CONJUGATION_SUBSTITUENTS)",
)
#: A product C=C conjugated with an arene or another C=C: worth this many extra substituents in the terminus
#: weight. Hydrogenation enthalpies put styrene-type conjugation at ≈ 2 kcal/mol, about what one more alkyl
#: substituent on a C=C is worth (from memory; estimate).
NBS_CONJUGATION_SUBSTITUENTS = Value(
    1.0, "estimate", "conjugation of the product C=C ≈ one alkyl substituent (≈ 2 kcal/mol; from memory; estimate)"
)

# ---------------------------------------------------------------------------
# Polyhalogenation: how much a halogen already on the molecule slows the next
# substitution (one factor per radical on the monohalide's total remaining
# C–H reactivity; the planner, engine.polyhalogenation, uses it).
# ---------------------------------------------------------------------------
POLY_DEACTIVATION: dict[str, Value] = {
    "cl": Value(
        0.6,
        "estimate",
        "Cl· on 1-chlorobutane vs n-butane: per-H reactivity at C1 (α) ≈ 0.35×, C2 (β) ≈ 0.4×, C3 ≈ 0.75× "
        "of the alkane's (photochlorination of 1-chlorobutane gives ≈ 6 : 23 : 46 : 25 % 1,1- : 1,2- : 1,3- : "
        "1,4-dichloride; from memory, not re-checked); summed over its C–H the monochloride reacts ≈ 0.6× as fast "
        "as the alkane minus one H (estimate: one factor for every structure)",
    ),
    "br": Value(
        1.0,
        "estimate",
        "Br· is not slowed: a β-bromine assists abstraction by bridging, so alkyl bromides brominate further "
        "about as fast as alkanes, mostly to vicinal dibromides (common practice; from memory); factor 1 (estimate)",
    ),
}
#: Substrate : halogen (mol/mol) at which the screen reports polyhalide (an equimolar charge, the
#: naive default a planner is asked to improve on; common practice).
POLY_SCREEN_RATIO = 1.0

# ---------------------------------------------------------------------------
# Strained rings: pathways other than C–H substitution (engine.outcomes).
# These are rules with a source, not rate constants: they decide whether a
# reagent's substitution percentages apply at all.
# ---------------------------------------------------------------------------
#: Br· opens cyclopropane rings by attack at carbon (homolytic substitution), so Br2 gives 1,3-dibromides.
CYCLOPROPANE_BR2_NOTE = (
    "cyclopropane + Br2 under light gives 1,3-dibromopropane by ring-opening addition, not bromocyclopropane "
    "(textbook, from memory); photolytic Br· opens 1,2-diarylcyclopropanes in CCl4 to the "
    "1,3-dibromo-1,3-diarylpropanes (> 80 %; Hoffmann, Graham & Rowell, J. Org. Chem. 1975, 40, 3005); Br· is the "
    "chain carrier under NBS too, so NBS is ruled out alike (rule of this program, common practice)"
)
#: Cl· mostly abstracts H from cyclopropane: substitution is weighed, with ring opening as a caution.
CYCLOPROPANE_CL2_NOTE = (
    "photochlorination of cyclopropane gives mainly chlorocyclopropane, with ring-opened 1,3-dichloropropane "
    "as a by-product (Roberts & Dirstine, J. Am. Chem. Soc. 1945, 67, 1281; from memory, not re-checked); "
    "ring opening can take over: in the cold solid (10–77 K) the Cl· chain gives 1,3-dichloropropane by "
    "ring-opening addition (Tague & Wight, J. Phys. Chem. 1993, 97, 3266); SO2Cl2 follows Cl· (common practice)"
)
#: [1.1.1]propellane and bicyclo[1.1.0]butane: the central C–C bond, not a C–H, reacts with halogens and radicals.
CENTRAL_BOND_NOTE = (
    "halogens and radicals add across the central bond of [1.1.1]propellane, giving 1,3-disubstituted "
    "bicyclo[1.1.1]pentanes (I2 gives 1,3-diiodobicyclo[1.1.1]pentane; Wiberg & Waddell, J. Am. Chem. Soc. "
    "1990, 112, 2194, from memory), and across C1–C3 of bicyclo[1.1.0]butanes, giving 1,3-dihalocyclobutanes "
    "(from memory); no C–H substitution is predicted"
)
#: Cubane-like cages: neither their C–H rates nor the fate of the cage radical are modelled.
CAGE_NOTE = (
    "strained polycyclic cages (cubane, prismane, cuneane): no measured C–H rates and no model of the cage "
    "radical's rearrangement or ring opening, so no reagent is offered (rule of this program)"
)
#: Cyclopropylmethyl radicals open faster than many halogen transfers: ring-opened halides form.
CYCLOPROPYLMETHYL_NOTE = (
    "a cyclopropylmethyl radical opens to but-3-enyl at ≈ 1e8 s⁻¹ (see K_CYCLOPROPYLMETHYL_OPENING), "
    "comparable to its capture by the halogen, so ring-opened halides form as well, and the substitution "
    "percentages do not include them (rule of this program: every reagent is ruled out when any such C–H is present)"
)

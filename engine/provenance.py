"""What every exported file records about how it was made."""

from __future__ import annotations

from datetime import datetime, timezone

from halosift.engine.conditions import Conditions
from halosift.engine.outcomes import OUTCOME_DOCS, VERDICT_DOCS
from halosift.engine.safety import CAUTION
from halosift.engine.stereo import OUTCOMES as STEREO_OUTCOMES

MODEL_SOURCES = (
    "Cl· site kinetics: Sarzyński & Sztuba, Int. J. Chem. Kinet. 2002, 34, 651; "
    "Br· per-H ratios 1:82:1600 at 127 °C: Morrison & Boyd (textbook); "
    "C–H and H–X bond enthalpies: Blanksby & Ellison, Acc. Chem. Res. 2003, 36, 255; "
    "unmeasured sites: Bell–Evans–Polanyi estimates (see engine/parameters.py); "
    "pathways other than substitution (addition to C=C below 400 °C: Groll & Hearne, Ind. Eng. Chem. 1939, 31, 1530; "
    "ring opening, strained central bonds, cages): engine/outcomes.py, sources in engine/parameters.py"
)


def result_columns_text() -> str:
    """What every result column holds, one ``name: meaning`` line each (engine.library.RESULT_DOCS)."""
    from halosift.engine.library import RESULT_COLUMNS, RESULT_DOCS  # library imports much; only when exporting

    lines = [f"{name}: {RESULT_DOCS[name]}" for name in RESULT_COLUMNS]
    lines.append("other columns: the input's own, as read (an input column named like a result column is "
                 "renamed input_<name>)")
    return "\n".join(lines)


def export_metadata(conditions: Conditions, **extra: str) -> dict[str, str]:
    """Key/value provenance for an export; the file writers namespace the keys (halosift.engine.io.metadata)."""
    from halosift.engine import __version__

    meta = {
        "version": __version__,
        "created_utc": datetime.now(timezone.utc).strftime("%Y-%m-%dT%H:%M:%SZ"),
        "conditions": conditions.describe(),
        "cl2_temp_c": f"{conditions.cl2_temp_c:g}",
        "br2_temp_c": f"{conditions.br2_temp_c:g}",
        "so2cl2_temp_c": f"{conditions.so2cl2_temp_c:g}",
        "nbs_temp_c": f"{conditions.nbs_temp_c:g}",
        "threshold_pct": f"{conditions.threshold_pct:g}",
        "verdicts": "; ".join(f"{k}: {v.format(threshold=f'{conditions.threshold_pct:g}')}"
                              for k, v in VERDICT_DOCS.items()),
        "outcomes": "per reagent (cl2_outcome, br2_outcome, so2cl2_outcome, nbs_outcome): " + "; ".join(
            f"{k}: {v.format(threshold=f'{conditions.threshold_pct:g}')}" for k, v in OUTCOME_DOCS.items()),
        "stereo_outcomes": " / ".join(STEREO_OUTCOMES),
        "columns": result_columns_text(),
        "model_sources": MODEL_SOURCES,
        "caution": CAUTION,
    }
    meta.update(extra)
    return meta

"""What every exported file records about how it was made."""

from __future__ import annotations

from datetime import datetime, timezone

from engine.conditions import Conditions
from engine.safety import CAUTION

MODEL_SOURCES = (
    "Cl· site kinetics: Sarzyński & Sztuba, Int. J. Chem. Kinet. 2002, 34, 651; "
    "Br· per-H ratios 1:82:1600 at 127 °C: Morrison & Boyd (textbook); "
    "C–H and H–X bond enthalpies: Blanksby & Ellison, Acc. Chem. Res. 2003, 36, 255; "
    "unmeasured sites: Bell–Evans–Polanyi estimates (see engine/parameters.py)"
)


def export_metadata(conditions: Conditions, **extra: str) -> dict[str, str]:
    """Key/value provenance for file metadata, SDF properties or a sidecar file."""
    from engine import __version__

    meta = {
        "halosift_version": __version__,
        "created_utc": datetime.now(timezone.utc).strftime("%Y-%m-%dT%H:%M:%SZ"),
        "conditions": conditions.describe(),
        "cl2_temp_c": f"{conditions.cl2_temp_c:g}",
        "br2_temp_c": f"{conditions.br2_temp_c:g}",
        "threshold_pct": f"{conditions.threshold_pct:g}",
        "model_sources": MODEL_SOURCES,
        "caution": CAUTION,
    }
    meta.update(extra)
    return meta

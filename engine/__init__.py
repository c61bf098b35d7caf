"""halosift's selectivity engine: pure computation, no user interface.

Perceive once (:func:`perceive`, RDKit), weigh many (:func:`weigh`,
:func:`summarise`, numpy/pandas only).
"""

from engine.conditions import REAGENTS, Conditions
from engine.explain import Explanation, ProductRecord, explain
from engine.molecules import Parsed, parse_hydrocarbon, quiet_rdkit, to_mol
from engine.perception import Perception, perceive
from engine.reagents import EXPLAIN_REAGENTS, NOT_PREDICTED, UnsupportedReagent, check_reagent
from engine.safety import CAUTION
from engine.site_classes import ABSTRACTABLE, SITE_CLASSES
from engine.special_sites import FLAGS
from engine.weigh import VERDICTS, summarise, weigh

__version__ = "0.1.0"

__all__ = [
    "ABSTRACTABLE", "CAUTION", "Conditions", "EXPLAIN_REAGENTS", "Explanation", "FLAGS", "NOT_PREDICTED", "Parsed",
    "Perception", "ProductRecord", "REAGENTS", "SITE_CLASSES", "UnsupportedReagent", "VERDICTS", "check_reagent",
    "explain", "parse_hydrocarbon", "perceive", "quiet_rdkit", "summarise", "to_mol", "weigh", "__version__",
]

# Library-level names load on first use, so `import engine` stays light for
# callers that only explain single structures.
_LAZY = {
    "Cancelled": "engine.parallel",
    "perceive_batch": "engine.parallel",
    "Library": "engine.library",
    "RESULT_COLUMNS": "engine.library",
    "RESULT_DOCS": "engine.library",
    "load_library": "engine.library",
    "screen": "engine.library",
    "LibraryError": "engine.io",
}
__all__ += list(_LAZY)


def __getattr__(name: str):
    if name in _LAZY:
        import importlib

        return getattr(importlib.import_module(_LAZY[name]), name)
    raise AttributeError(f"module 'engine' has no attribute {name!r}")

"""halosift's selectivity engine: pure computation, no user interface.

Perceive once (:func:`perceive`, RDKit), weigh many (:func:`weigh`,
:func:`summarise`, numpy/pandas only).
"""

from halosift.engine.conditions import REAGENTS, Conditions
from halosift.engine.explain import Explanation, ProductRecord, explain
from halosift.engine.molecules import Parsed, parse_hydrocarbon, quiet_rdkit, to_mol
from halosift.engine.perception import Perception, perceive
from halosift.engine.reagents import EXPLAIN_REAGENTS, NOT_PREDICTED, UnsupportedReagent, check_reagent
from halosift.engine.safety import CAUTION
from halosift.engine.site_classes import ABSTRACTABLE, SITE_CLASSES
from halosift.engine.special_sites import FLAGS
from halosift.engine.weigh import VERDICTS, summarise, weigh

from halosift._version import __version__

__all__ = [
    "ABSTRACTABLE", "CAUTION", "Conditions", "EXPLAIN_REAGENTS", "Explanation", "FLAGS", "NOT_PREDICTED", "Parsed",
    "Perception", "ProductRecord", "REAGENTS", "SITE_CLASSES", "UnsupportedReagent", "VERDICTS", "check_reagent",
    "explain", "parse_hydrocarbon", "perceive", "quiet_rdkit", "summarise", "to_mol", "weigh", "__version__",
]

# Library-level names load on first use, so `from halosift import engine` stays light for
# callers that only explain single structures.
_LAZY = {
    "Cancelled": "halosift.engine.parallel",
    "perceive_batch": "halosift.engine.parallel",
    "Library": "halosift.engine.library",
    "RESULT_COLUMNS": "halosift.engine.library",
    "RESULT_DOCS": "halosift.engine.library",
    "load_library": "halosift.engine.library",
    "screen": "halosift.engine.library",
    "LibraryError": "halosift.engine.io",
}
__all__ += list(_LAZY)


def __getattr__(name: str) -> object:
    if name in _LAZY:
        import importlib

        return getattr(importlib.import_module(_LAZY[name]), name)
    raise AttributeError(f"module 'halosift.engine' has no attribute {name!r}")

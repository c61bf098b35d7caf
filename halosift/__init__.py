"""halosift: which hydrocarbons free-radical halogenation turns into one predictable alkyl halide.

The documented API (typed; see docs/engine-api.md)::

    import halosift as hs
    result = hs.screen(frame_or_path, hs.Conditions(cl2_temp_c=25.0))
    library = hs.load_library("catalogue.csv")
    print(hs.explain("CC(C)C").products)

Everything is one import name. In the repository the engine, the app and the sample
catalogue keep their own top-level folders (``engine/``, ``tui/``,
``sample_libraries/``); installed, they are the subpackages ``halosift.engine``,
``halosift.tui`` and ``halosift.sample_libraries``. Names below load on first use, so
``import halosift`` (and the command line's ``--help``) stays light.
"""

from __future__ import annotations

import os as _os
from typing import TYPE_CHECKING, Any

from halosift._version import __version__

# Run from a source checkout without an editable install (python -m halosift in the
# repository), the subpackages' folders sit beside this one, not inside it: let the
# package look there too. Installed, they are inside and this adds nothing. Either
# way each module has exactly one name, halosift.<sub>.<module>.
_here = _os.path.dirname(_os.path.abspath(__file__))
if not _os.path.isdir(_os.path.join(_here, "engine")):
    _root = _os.path.dirname(_here)
    if _os.path.isfile(_os.path.join(_root, "engine", "__init__.py")):
        __path__.append(_root)  # noqa: F821  (a package's __path__)

if TYPE_CHECKING:
    from halosift.engine import CAUTION as CAUTION
    from halosift.engine import Conditions as Conditions
    from halosift.engine import Explanation as Explanation
    from halosift.engine import Library as Library
    from halosift.engine import LibraryError as LibraryError
    from halosift.engine import UnsupportedReagent as UnsupportedReagent
    from halosift.engine import explain as explain
    from halosift.engine import load_library as load_library
    from halosift.engine import screen as screen

_API = {
    "Conditions": "halosift.engine.conditions",
    "explain": "halosift.engine.explain",
    "Explanation": "halosift.engine.explain",
    "screen": "halosift.engine.library",
    "load_library": "halosift.engine.library",
    "Library": "halosift.engine.library",
    "LibraryError": "halosift.engine.io",
    "UnsupportedReagent": "halosift.engine.reagents",
    "CAUTION": "halosift.engine.safety",
}

__all__ = ["__version__", *_API]


def __getattr__(name: str) -> Any:
    if name in _API:
        import importlib

        value = getattr(importlib.import_module(_API[name]), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'halosift' has no attribute {name!r}")


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(_API))

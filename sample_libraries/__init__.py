"""Bundled sample data: the catalogue of an invented supplier, "Wrenfield
Saturates", and a file of deliberately bad rows. See README.md in this folder;
``build_catalogue.py`` rebuilds every file."""

from __future__ import annotations

from importlib import resources
from pathlib import Path

DEFAULT = "catalogue.parquet"
"""The sample library a new user is pointed at first."""

CATALOGUE_CSV = "catalogue.csv"
"""The same catalogue rows as ``DEFAULT``, as CSV."""

BAD_ROWS = "bad_rows.csv"
"""Rows showing every kind of input the engine rejects, with a ``note`` column."""

FILES = (CATALOGUE_CSV, DEFAULT, BAD_ROWS)
"""Every bundled data file."""


def sample_path(name: str = CATALOGUE_CSV) -> Path:
    """Path of the bundled sample file ``name`` (one of ``FILES``).

    Raises ``ValueError`` for a name that is not a bundled file, so a typo
    gives a one-line message instead of a confusing missing-file error later.
    """
    if name not in FILES:
        raise ValueError(f"no bundled sample file {name!r}; choose one of {', '.join(FILES)}")
    # The package is installed as plain files (setuptools package-data), so the
    # resource is a real path on disk; fall back to __file__ for odd loaders.
    try:
        path = Path(str(resources.files(__name__) / name))
    except (ModuleNotFoundError, TypeError):
        path = Path(__file__).resolve().parent / name
    if not path.is_file():
        raise FileNotFoundError(f"bundled sample file {name} is missing from {path.parent}; "
                                "rebuild it with: python -m halosift.sample_libraries.build_catalogue")
    return path

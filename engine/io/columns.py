"""Finding the SMILES and ID columns among a table's column names."""

from __future__ import annotations

from collections.abc import Hashable, Sequence
from typing import TypeVar

from .errors import LibraryError

SMILES_NAMES: tuple[str, ...] = (
    "smiles",
    "canonical_smiles",
    "isomeric_smiles",
    "smi",
    "structure_smiles",
    "mol_smiles",
)
"""Column names taken to hold SMILES, in order of preference (case-insensitive)."""

ID_NAMES: tuple[str, ...] = (
    "id",
    "catalog_id",
    "catalogue_id",
    "compound_id",
    "name",
    "title",
    "mol_id",
    "identifier",
)
"""Column names taken to hold compound identifiers, in order of preference (case-insensitive)."""

Name = TypeVar("Name", bound=Hashable)
"""A column name: str for text files, any hashable for a DataFrame's columns."""

_LISTED = 20  # columns named in an error message before "and N more"


def _key(name: Hashable) -> str:
    """Comparison key: case-insensitive, surrounding spaces ignored."""
    return str(name).strip().lower()


def detect(columns: Sequence[Name], preferred: Sequence[str], skip: Hashable | None = None) -> Name | None:
    """First column (by preference order, then file order) whose name matches preferred."""
    keys = [_key(c) for c in columns]
    for wanted in preferred:
        for column, key in zip(columns, keys):
            if key == wanted and column != skip:
                return column
    return None


def resolve(columns: Sequence[Name], given: str, where: str) -> Name:
    """The column the user named: exact match, else a unique case-insensitive match."""
    for column in columns:
        if column == given or str(column) == given:
            return column
    matches = [c for c in columns if _key(c) == _key(given)]
    if len(matches) == 1:
        return matches[0]
    if len(matches) > 1:
        raise LibraryError(
            f"column name {given!r} is ambiguous in {where}: {describe(matches)} differ only in case"
        )
    raise LibraryError(f"no column named {given!r} in {where}; columns found: {describe(columns)}")


def describe(columns: Sequence[Hashable]) -> str:
    """Comma-joined column names for an error message, shortened when there are many."""
    if not columns:
        return "(none)"
    shown = ", ".join(str(c) for c in columns[:_LISTED])
    if len(columns) > _LISTED:
        shown += f" and {len(columns) - _LISTED} more"
    return shown


def choose(
    columns: Sequence[Name],
    where: str,
    smiles_column: str | None,
    id_column: str | None,
    hint: str = "use --smiles-column",
) -> tuple[Name, Name | None]:
    """(smiles column, id column or None) for a table, raising LibraryError when no SMILES column fits."""
    smiles: Name | None
    if smiles_column is not None:
        smiles = resolve(columns, smiles_column, where)
    else:
        smiles = detect(columns, SMILES_NAMES)
        if smiles is None:
            raise LibraryError(
                f"no SMILES column in {where}; columns found: {describe(columns)} ({hint})"
            )
    ident: Name | None
    if id_column is not None:
        ident = resolve(columns, id_column, where)
    else:
        ident = detect(columns, ID_NAMES, skip=smiles)
    return smiles, ident


def unique_names(names: Sequence[str]) -> list[str]:
    """Header names made unique and non-empty: blanks become column_N, repeats get .1, .2 ..."""
    out: list[str] = []
    seen: set[str] = set()
    for position, name in enumerate(names, start=1):
        base = name if name.strip() else f"column_{position}"
        candidate, n = base, 0
        while candidate in seen:
            n += 1
            candidate = f"{base}.{n}"
        seen.add(candidate)
        out.append(candidate)
    return out

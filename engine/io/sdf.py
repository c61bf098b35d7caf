"""SD files: records read into rows (molblock -> SMILES, title, properties) and rows written as records."""

from __future__ import annotations

import math
import re
from collections.abc import Hashable, Iterator, Mapping
from pathlib import Path

import pandas as pd
from halosift.engine.rdkit_log import quiet_rdkit
from rdkit import Chem
from rdkit.Chem import rdDepictor

from .columns import ID_NAMES, SMILES_NAMES, choose, detect
from .errors import LibraryError
from .metadata import METADATA_PREFIX
from .source import LibrarySource, RawBatch
from .textfile import UNDECODABLE, MarkedLines, open_output_text, open_text, probe_encoding, read_errors

STRUCTURE_COLUMN = "smiles"
"""Column holding the isomeric SMILES RDKit derives from each molblock ("" when none)."""

TITLE_COLUMN = "name"
"""Column holding each record's title line."""

UNREADABLE = "unreadable molblock"
"""row_errors text for a record RDKit cannot read as a molecule."""

RESULT_MARKS: tuple[str, ...] = (METADATA_PREFIX + "version", METADATA_PREFIX + "halosift_version")
"""Properties that mark a screen's SDF result on its first record: the version key, and the
doubled name halosift 0.2.0 wrote on every record (still read, never written)."""

RESULT_STRUCTURE_COLUMN = "canonical_smiles"
"""In a screen's SDF result, the column the molblock is read back into: the one it was written from."""

MAX_RECORD_LINES = 100_000
"""A record longer than this without a $$$$ line is cut off there (bounds memory on garbage input)."""

_TAG = re.compile(r"<([^>]*)>")
_RESERVED = {STRUCTURE_COLUMN, TITLE_COLUMN}


def _records(lines: MarkedLines) -> Iterator[tuple[list[str], str, bool]]:
    """(lines of one record, error, ended by $$$$) in file order. Runs of blank lines between
    $$$$ markers are not records; a final record without $$$$ still counts."""
    current: list[str] = []
    first = 1
    number = 0
    for number, line in enumerate(lines, start=1):
        ended = line.startswith("$$$$")
        if not ended:
            current.append(line)
            if len(current) < MAX_RECORD_LINES:
                continue
        bad = lines.claim_bad(first, number)
        if any(text.strip() for text in current):
            error = "" if ended else f"record has no $$$$ line within {MAX_RECORD_LINES} lines"
            yield current, "; ".join(r for r in (error, UNDECODABLE if bad else "") if r), ended
        current, first = [], number + 1
    if any(text.strip() for text in current):
        yield current, UNDECODABLE if lines.claim_bad(first, number) else "", False


def _split(record: list[str]) -> tuple[str, str, dict[str, str], bool]:
    """(molblock, title, properties, has "M  END") for one record's lines."""
    end = next((i for i, line in enumerate(record) if line.startswith("M  END")), None)
    if end is None:
        # No end marker: properties, if any, start at the first data header after
        # the three header lines.
        cut = next(
            (i for i in range(3, len(record)) if record[i].startswith(">") and _TAG.search(record[i])),
            len(record),
        )
        block, rest = record[:cut], record[cut:]
    else:
        block, rest = record[: end + 1], record[end + 1 :]
    props: dict[str, str] = {}
    i = 0
    while i < len(rest):
        line = rest[i]
        i += 1
        if not line.startswith(">"):
            continue
        match = _TAG.search(line)
        values = []
        while i < len(rest) and rest[i].strip():
            values.append(rest[i].rstrip("\n"))
            i += 1
        if match:
            props[match.group(1)] = "\n".join(values)
    title = record[0].rstrip("\n") if record else ""
    return "".join(block), title, props, end is not None


def _structure(block: str) -> tuple[str | None, str]:
    """(isomeric SMILES or None, error) for a molblock; call inside quiet_rdkit()."""
    # RDKit raises assorted exception types on malformed input, hence the broad catches.
    try:
        mol = Chem.MolFromMolBlock(block)
        if mol is not None:
            return Chem.MolToSmiles(mol) or None, ""
    except Exception:
        pass
    try:
        raw = Chem.MolFromMolBlock(block, sanitize=False, removeHs=False)
    except Exception:
        raw = None
    if raw is None:
        return None, UNREADABLE
    try:
        Chem.SanitizeMol(raw)
    except Exception as exc:
        detail = (str(exc).strip().splitlines() or ["fails RDKit's checks"])[0]
        return None, f"molblock structure is invalid ({detail})"
    return None, UNREADABLE


class _Columns:
    """Maps SDF property names to column names, growing as new properties appear.

    A property whose name clashes with the generated smiles/name columns (any case)
    or with an earlier column is renamed with an "sdf_" prefix (and a number if needed).
    """

    def __init__(self, generated: tuple[str, ...] = (STRUCTURE_COLUMN, TITLE_COLUMN)) -> None:
        self.names: list[str] = list(generated)
        self._lower = {n.lower() for n in self.names}
        self._of: dict[str, str] = {}

    def column(self, prop: str) -> str:
        """Column name for property prop (allocating one on first sight)."""
        found = self._of.get(prop)
        if found is not None:
            return found
        base = prop if prop.strip() else "unnamed_property"
        name = base
        if name.lower() in self._lower:
            name = f"sdf_{base}"
        n = 1
        while name.lower() in self._lower:
            n += 1
            name = f"sdf_{base}_{n}"
        self._of[prop] = name
        self.names.append(name)
        self._lower.add(name.lower())
        return name


def open_sdf(
    path: Path, gzipped: bool, smiles_column: str | None, id_column: str | None
) -> LibrarySource:
    """Check an SD file (first record readable as SDF text) and return its source."""
    encoding = probe_encoding(path, gzipped)
    with read_errors(path), open_text(path, gzipped, encoding, newline=None) as text:
        first = next(_records(MarkedLines(text)), None)
    if first is None:
        raise LibraryError(f"{path} is empty")
    record, _, ended = first
    _, _, props, has_end = _split(record)
    if not has_end and not ended:
        raise LibraryError(f"{path} does not look like an SD file (no 'M  END' or '$$$$' line found)")
    result = any(mark in props for mark in RESULT_MARKS)
    columns = _Columns(_generated(result))
    for prop in props:
        if not (result and prop.startswith(METADATA_PREFIX)):
            columns.column(prop)
    names = tuple(columns.names)
    smiles, ident = choose(list(names), str(path), smiles_column, id_column)

    def read(batch_rows: int) -> Iterator[RawBatch]:
        return _batches(path, gzipped, encoding, smiles, batch_rows, result)

    return LibrarySource(
        path=path,
        format="sdf",
        columns=names,
        smiles_column=smiles,
        id_column=ident,
        total_rows=None,
        _read=read,
    )


def _generated(result: bool) -> tuple[str, ...]:
    """Columns made from the record itself rather than its properties.

    A screen's SDF result is read back as the table it was written from: its properties
    are that table's columns, the molblock its canonical SMILES, and the title (derived
    from the ID column) and the earlier run's provenance are left out, so re-screening
    it gives the same columns every time.
    """
    return (RESULT_STRUCTURE_COLUMN,) if result else (STRUCTURE_COLUMN, TITLE_COLUMN)


def _batches(
    path: Path, gzipped: bool, encoding: str, smiles_column: str, batch_rows: int, result: bool = False
) -> Iterator[RawBatch]:
    """Stream RawBatches; each frame has every column seen so far (``result``: a screen's SDF result)."""
    columns = _Columns(_generated(result))
    structure_column = RESULT_STRUCTURE_COLUMN if result else STRUCTURE_COLUMN
    start = 0
    rows: list[dict[str, str]] = []
    smiles: list[str | None] = []
    errors: list[str] = []
    with read_errors(path), open_text(path, gzipped, encoding, newline=None) as text, quiet_rdkit():
        for record, read_error, _ in _records(MarkedLines(text)):
            block, title, props, _ = _split(record)
            structure, structure_error = _structure(block)
            row = {structure_column: structure or ""}
            if not result:
                row[TITLE_COLUMN] = title
            for prop, value in props.items():
                if not (result and prop.startswith(METADATA_PREFIX)):
                    row[columns.column(prop)] = value
            reasons = "; ".join(r for r in (read_error, structure_error) if r)
            if smiles_column != structure_column:
                structure = row.get(smiles_column, "").strip() or None
            rows.append(row)
            smiles.append(None if reasons else structure)
            errors.append(reasons)
            if len(rows) == batch_rows:
                yield _batch(start, rows, smiles, errors, columns.names)
                start += len(rows)
                rows, smiles, errors = [], [], []
    if rows:
        yield _batch(start, rows, smiles, errors, columns.names)


def _batch(
    start: int, rows: list[dict[str, str]], smiles: list[str | None], errors: list[str], names: list[str]
) -> RawBatch:
    """One RawBatch with every known column ("" where a record lacks the property)."""
    table = [[row.get(name, "") for name in names] for row in rows]
    frame = pd.DataFrame(table, columns=list(names), dtype=str)
    return RawBatch(start_row=start, frame=frame, smiles=smiles, row_errors=errors)


def _cell_text(value: object) -> str:
    """Property text for a cell: "" for missing values, else str()."""
    if value is None or value is pd.NA or value is pd.NaT:
        return ""
    if isinstance(value, float) and math.isnan(value):
        return ""
    return str(value)


def _prop_name(name: Hashable) -> str:
    """A property name that cannot break the data header line."""
    return re.sub(r"[<>\r\n]", "_", str(name))


def _prop_block(name: str, value: str) -> str:
    """Data header and value lines. Blank lines would end the value early, so they are
    dropped; a line starting $$$$ would end the record, so it gets a leading space."""
    lines = [(" " + line if line.startswith("$$$$") else line) for line in value.splitlines() if line.strip()]
    return f">  <{name}>\n" + "".join(f"{line}\n" for line in lines) + "\n"


def _molecule(smiles: object, title: str) -> Chem.Mol:
    """A molecule with 2D coordinates for smiles, or an empty molecule when there is no valid structure."""
    mol = None
    if isinstance(smiles, str) and smiles.strip():
        try:
            mol = Chem.MolFromSmiles(smiles.strip())
            if mol is not None:
                rdDepictor.Compute2DCoords(mol)
        except Exception:  # RDKit can raise on exotic input; the row still gets a record
            mol = None
    if mol is None:
        mol = Chem.Mol()
    mol.SetProp("_Name", title)
    return mol


def write_sdf(
    frame: pd.DataFrame, target: Path, gzipped: bool, smiles_column: str, metadata: Mapping[str, str]
) -> None:
    """Write one record per row: 2D molecule from smiles_column (empty molecule when missing or
    invalid), title from the ID column or the 1-based row number, every other column as properties.

    ``metadata`` (keys as given, already namespaced by :func:`.metadata.file_metadata`) is written
    once, as properties of the first record after its own: an SD file has no file-level header,
    and every record of a large file repeating the same paragraphs only made it larger."""
    columns = list(frame.columns)
    if smiles_column in columns:
        smiles_at: int | None = columns.index(smiles_column)
    else:
        found = detect(columns, SMILES_NAMES)
        smiles_at = None if found is None else columns.index(found)
    skip = None if smiles_at is None else columns[smiles_at]
    ident = detect(columns, ID_NAMES, skip=skip)
    id_at = None if ident is None else columns.index(ident)
    props = [(i, _prop_name(c)) for i, c in enumerate(columns) if i != smiles_at]
    trailer = "".join(_prop_block(_prop_name(k), str(v)) for k, v in metadata.items())
    with open_output_text(target, gzipped) as out, quiet_rdkit():
        for number, row in enumerate(frame.itertuples(index=False, name=None), start=1):
            title = _cell_text(row[id_at]) if id_at is not None else ""
            title = " ".join(title.split()) or str(number)
            mol = _molecule(row[smiles_at] if smiles_at is not None else None, title)
            try:
                block = Chem.MolToMolBlock(mol)
            except Exception:  # e.g. kekulization trouble: keep the row as an empty record
                block = Chem.MolToMolBlock(_molecule(None, title))
            out.write(block)
            for i, name in props:
                out.write(_prop_block(name, _cell_text(row[i])))
            if number == 1:
                out.write(trailer)
            out.write("$$$$\n")

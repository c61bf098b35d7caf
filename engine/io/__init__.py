"""File reading and writing for halosift libraries (pandas, pyarrow and RDKit only).

Reading: open_library() checks a CSV/TSV/Parquet/SMI/SDF file up front (one-line
LibraryError for whole-file problems) and returns a LibrarySource whose
iter_batches() streams RawBatch objects in input order; every input row appears,
and rows that cannot be read carry a reason in row_errors. open_frame() does the
same for an in-memory DataFrame.

Writing: write_table() writes CSV/TSV/Parquet/SDF atomically via atomic_path().
"""

from .atomic import atomic_path
from .columns import ID_NAMES, SMILES_NAMES
from .errors import LibraryError
from .formats import INPUT_FORMATS, OUTPUT_FORMATS, output_format
from .readers import open_frame, open_library
from .source import LibrarySource, RawBatch, concat_batches
from .writers import about_path, check_output, guard_output, write_table

__all__ = [
    "ID_NAMES",
    "INPUT_FORMATS",
    "OUTPUT_FORMATS",
    "SMILES_NAMES",
    "LibraryError",
    "LibrarySource",
    "RawBatch",
    "about_path",
    "atomic_path",
    "check_output",
    "concat_batches",
    "guard_output",
    "open_frame",
    "open_library",
    "output_format",
    "write_table",
]

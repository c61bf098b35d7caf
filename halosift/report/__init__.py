"""Printable HTML reports of a screened library: summary charts and one drawn entry per substrate.

Pure Python, RDKit drawing and string templates: no UI library, no scripts,
nothing fetched. :func:`render_report` builds the page, :func:`write_report`
writes it atomically; the CLI (`halosift report`) and the app's export use both.
"""

from halosift.report.html import DEFAULT_MAX_PAGES, Report, render_report
from halosift.report.output import REPORT_SUFFIXES, check_report_output, is_report_path, write_report
from halosift.report.selection import Selection, read_ids, select_rows

__all__ = [
    "DEFAULT_MAX_PAGES", "REPORT_SUFFIXES", "Report", "Selection", "check_report_output", "is_report_path",
    "read_ids", "render_report", "select_rows", "write_report",
]

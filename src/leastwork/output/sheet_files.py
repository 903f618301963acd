"""The calculation sheet from Python: written to a file (HTML, or Markdown with its
diagrams beside it) without overwriting anything unless asked, or returned as Markdown."""

from __future__ import annotations

import pathlib

from ..errors import CaseError

__all__ = ["write_report", "steps_markdown"]


def write_report(sol, path, cases: list[str] | None = None, *, force: bool = False) -> None:
    """Write the calculation sheet of ``cases`` (default: all) to ``path`` by its suffix:
    ``.html`` (one file) or ``.md`` (its diagrams as SVG files beside it)."""
    from ..io.writing import write_files
    from .html import default_meta, report_html, report_markdown_files

    out = pathlib.Path(path)
    suffix = out.suffix.lower()
    if suffix in (".html", ".htm"):
        files: dict = {out: report_html(sol, cases, meta=default_meta())}
    elif suffix in (".md", ".markdown"):
        files = report_markdown_files(sol, out, cases, meta=default_meta())
    else:
        raise CaseError(f'cannot write a sheet to "{out.name}": name it .html or .md',
                        source=sol.structure.source)
    write_files(files, force=force, case=sol.structure.source, where="report(path)")


def steps_markdown(sol, cases: list[str] | None = None) -> str:
    """The whole audit trail of ``cases`` (default: all) as Markdown text."""
    from .audit import audit_sheet
    from .documents import sheet_markdown
    from .html import default_meta

    names = list(sol.cases) if cases is None else cases
    return sheet_markdown(audit_sheet(sol, names, meta=default_meta()))

"""The calculation report as one self-contained HTML file (inline CSS and SVG, nothing
fetched) that prints well, and as Markdown with one diagram file per load case beside it.

No I/O here: the functions return text (and file names); the command line writes them.
Every text of the sheet and of the case (names, load cases, ids, warnings) is escaped:
HTML by :func:`_e` (control characters escaped by :func:`leastwork.plaintext.literal`, then
``& < > " '`` as entities), Markdown by :func:`leastwork.output.documents.md_text`.
"""

from __future__ import annotations

import datetime
import html
import pathlib
import re
from urllib.parse import quote

from ..errors import CaseError
from ..plaintext import literal
from .conventions import moment_convention
from .mathml import latex_mathml
from .quantities import quantities
from .reported import case_numbers, redundants_shown
from .sheet import Formula, Grid, Para, Sheet, fmt, shown, split_grid

__all__ = ["report_html", "title_block_html", "page_css", "report_markdown_files", "image_names", "default_meta", "summary_grids", "CSS",
           "HTML_TABLE_WIDTH"]

#: Widest table (characters) before it is split into parts repeating its key columns.
HTML_TABLE_WIDTH = 120

CSS = """
:root { --ink: #1b1b1b; --muted: #5a5a5a; --rule: #b9b9b9; --head: #ececec;
        --warn: #7a4d00; --warn-bg: #fff4dc; --warn-edge: #c98a00;
        --alarm: #9b1010; --alarm-bg: #fde9e9; }
html { -webkit-text-size-adjust: 100%; }
body { font: 10.5pt/1.45 "DejaVu Sans", "Liberation Sans", Arial, sans-serif;
       color: var(--ink); background: #fff; max-width: 200mm; margin: 10mm auto;
       padding: 0 6mm; }
h1 { font-size: 17pt; margin: 0 0 2mm; }
h2 { font-size: 13pt; margin: 8mm 0 2mm; padding-bottom: 1mm;
     border-bottom: 1px solid var(--rule); }
h3 { font-size: 11pt; margin: 5mm 0 1.5mm; }
p { margin: 1.5mm 0; }
.meta { color: var(--muted); margin: 0 0 4mm; }
.meta span { margin-right: 6mm; white-space: nowrap; }
.scroll { overflow-x: auto; }
table { border-collapse: collapse; margin: 1.5mm 0 4mm; font-size: 8.5pt;
        font-variant-numeric: tabular-nums; }
.tt { font-weight: bold; margin: 3mm 0 0; }
th, td { border: 1px solid #c8c8c8; padding: 0.5mm 1.8mm; vertical-align: top; }
th { background: var(--head); text-align: left; font-weight: bold; }
td.num { text-align: right; white-space: nowrap; }
tr.total td { font-weight: bold; border-top: 2px solid #555; }
tr.total td.zero { font-weight: normal; }
.formula { font-size: 10.5pt; background: #f6f6f6; border-left: 3px solid #c8c8c8;
           padding: 1mm 2.5mm; margin: 1.5mm 0; overflow-x: auto; }
.formula math { font-size: 11pt; margin: 0; }
.formula.text { font-family: "DejaVu Sans Mono", "Liberation Mono", Consolas, monospace;
                font-size: 9pt; white-space: pre-wrap; }
table.titleblock { font-size: 9pt; width: 100%; table-layout: fixed; margin: 0 0 4mm; }
table.titleblock th { width: 16%; font-weight: normal; color: var(--muted); }
table.titleblock td { width: 34%; }
.tone-note { color: var(--muted); }
.tone-warning { background: var(--warn-bg); border-left: 4px solid var(--warn-edge);
                color: var(--warn); padding: 1.5mm 3mm; }
.tone-alarm { background: var(--alarm-bg); border: 2px solid var(--alarm);
              color: var(--alarm); font-weight: bold; padding: 2mm 3mm; }
.ok { color: #1d5a2a; font-weight: bold; }
.bad { color: var(--alarm); font-weight: bold; }
figure { margin: 3mm 0 6mm; }
figure svg { display: block; width: 100%; height: auto; }
figcaption { color: var(--muted); font-size: 9pt; margin-top: 1mm; }
.caution { border: 1px solid var(--ink); padding: 2mm 3mm; font-weight: bold; }
footer { margin-top: 8mm; color: var(--muted); font-size: 9pt;
         border-top: 1px solid var(--rule); padding-top: 2mm; }
@page { size: A4; margin: 14mm 12mm 16mm; }
@media print {
  body { max-width: none; margin: 0; padding: 0; font-size: 9pt; line-height: 1.35; }
  table { font-size: 8pt; margin: 1mm 0 2.5mm; }
  h2 { margin: 5mm 0 1.5mm; }
  h2, h3, .tt { break-after: avoid; }
  tr, .formula, .tone-warning, .tone-alarm, figure, .caution { break-inside: avoid; }
  table.short { break-inside: avoid; }
  thead { display: table-header-group; }
  .scroll, .formula { overflow: visible; }
  figure svg { max-height: 235mm; }
  a { color: inherit; text-decoration: none; }
}
""".strip()

_TONE = {"plain": "", "note": "Note: ", "warning": "Warning: ", "alarm": "FAILED: "}


def default_meta() -> dict[str, str]:
    """Tool version and today's date, as the command line puts them on a sheet."""
    from .. import __version__

    return {"Prepared with": f"leastwork {__version__}",
            "Date": datetime.date.today().isoformat()}


def _cases(sol, case_names) -> list[str]:
    names = list(case_names or sol.cases)
    for c in names:
        if c not in sol.cases:
            raise CaseError(f'unknown load case "{c}"; the cases are {", ".join(sol.cases)}',
                            where="case")
    return names


def _e(text) -> str:
    """Text shown literally in HTML (element content or a quoted attribute)."""
    return html.escape(literal(text), quote=True)


# ---------------------------------------------------------------------------- blocks


def _para(b: Para) -> str:
    prefix = _TONE.get(b.tone, "")
    if prefix and b.text.lower().startswith(prefix.strip().lower()):
        prefix = ""  # the text says it already
    cls = f' class="tone-{_e(b.tone)}"' if b.tone != "plain" else ""
    role = ' role="alert"' if b.tone == "alarm" else ""
    lead = f"<strong>{_e(prefix.strip())}</strong> " if prefix else ""
    return f"<p{cls}{role}>{lead}{_e(b.text)}</p>"


def _table(g: Grid) -> str:
    out = []
    for part in split_grid(shown(g), HTML_TABLE_WIDTH):
        numeric = [not all(isinstance(r[k], str) for r in part.rows) and k >= part.keys
                   for k in range(len(part.headers))]
        nrows = len(part.rows) + (1 if part.total else 0)
        cls = "short" if nrows <= 14 else "long"
        rows = [f'<div class="tt">{_e(part.title)}</div>',
                f'<div class="scroll"><table class="{cls}">', "<thead><tr>"
                + "".join(f"<th>{_e(h)}</th>" for h in part.headers) + "</tr></thead>",
                "<tbody>"]
        for r in part.rows:
            rows.append("<tr>" + "".join(_cell(c, numeric[k]) for k, c in enumerate(r))
                        + "</tr>")
        if part.total:
            rows.append('<tr class="total">' + "".join(_cell(c, numeric[k]) for k, c
                                                       in enumerate(part.total)) + "</tr>")
        rows += ["</tbody></table></div>"]
        out.append("\n".join(rows))
    return "\n".join(out)


def _cell(value, numeric: bool) -> str:
    number = not isinstance(value, str)
    cls = (' class="num zero"' if number and value == 0 else ' class="num"') \
        if numeric and number else ""
    return f"<td{cls}>{_e(fmt(value))}</td>"


def _blocks(blocks) -> str:
    out = []
    for b in blocks:
        if isinstance(b, Para):
            out.append(_para(b))
        elif isinstance(b, Formula):
            out.append(f'<div class="formula">{latex_mathml(b.latex, b.text)}</div>'
                       if b.latex else f'<div class="formula text">{_e(b.text)}</div>')
        else:
            out.append(_table(b))
    return "\n".join(out)


# ---------------------------------------------------------------------------- sections


def _redundant_unit(sol, j: int) -> str:
    return quantities(sol.units).column_unit(sol.topology.columns[j])


def summary_grids(sol, cases: list[str]) -> list[Grid]:
    """The redundants of every case, and the checks (equilibrium and the direct-stiffness
    cross-check), as tables in the output units (:mod:`leastwork.output.reported`)."""
    numbers = {c: case_numbers(sol, c) for c in cases}
    grids = []
    names = sol.redundant_names
    shown_x = {c: redundants_shown(sol, c) for c in cases}
    if names:
        rows = tuple((f"X{i + 1}", n, _redundant_unit(sol, j),
                      *[shown_x[c][n] for c in cases])
                     for i, (n, j) in enumerate(zip(names, sol.redundant_columns,
                                                    strict=True)))
        grids.append(Grid("The redundants", ("X", "redundant", "unit", *cases), rows, keys=3))
    rows = []
    for c in cases:
        ch = numbers[c].checks
        res = sol.cases[c]
        sc = res.stiffness
        if sc is None:
            cross, where, verdict = "-", "-", "not run"
        elif sc.difference is None:
            cross, where, verdict = "no answer", sc.failure, "FAILED"
        else:
            cross, where = fmt(sc.difference, 2), sc.where or "-"
            verdict = "OK" if sc.ok else "FAILED"
        rows.append((c, ch["equilibrium_residual"], ch["equilibrium_tolerance"],
                     "OK" if ch["equilibrium_ok"] else "FAILED", cross, where, verdict))
    grids.append(Grid("Checks: equilibrium, and the independent direct-stiffness method",
                      ("case", f"residual [{sol.units.force}]", "tolerance",
                       "equilibrium", "difference (relative)", "at", "cross-check"),
                      tuple(rows)))
    grids.append(_reactions_summary(sol, cases, numbers))
    grids.append(_governing_summary(sol, cases, numbers))
    return grids


def _reactions_summary(sol, cases: list[str], numbers) -> Grid:
    """Every support's reaction components in every load case (output units)."""
    q = quantities(sol.units)
    dirs = [d for d in ("x", "y", "rz", "n")
            if any(d in comps for c in cases for comps in numbers[c].reactions.values())]
    unit = {"x": q.force_unit, "y": q.force_unit, "rz": q.moment_unit, "n": q.force_unit}
    name = {"x": "x", "y": "y", "rz": "moment rz", "n": "normal n"}
    rows = tuple((c, node, *[comps.get(d, "-") for d in dirs])
                 for c in cases for node, comps in numbers[c].reactions.items())
    return Grid("Reactions (forces the supports apply to the structure; x right, y up, "
                "moments counter-clockwise +)",
                ("case", "support", *[f"{name[d]} [{unit[d]}]" for d in dirs]), rows, keys=2)


def _governing_summary(sol, cases: list[str], numbers) -> Grid:
    """Per load case: the largest axial force, shear force, sagging and hogging moment
    (where and at what distance from the member's start), and the largest beam deflection
    with its limit ratio when the case gives limits; round-off as zero."""
    q = quantities(sol.units)
    fu, mu, du, lu = q.force_unit, q.moment_unit, q.displacement_unit, q.length_unit
    rows = []
    for c in cases:
        members = numbers[c].members
        if not members:
            continue
        ends = [(mj[e][k], mid, mj_at, k) for mid, mj in members.items()
                for e, mj_at in (("start", 0.0), ("end", None)) for k in ("n", "v")]
        for k, label in (("n", "axial force n (tension +)"), ("v", "shear force v")):
            vals = [(v, mid, at) for v, mid, at, kk in ends if kk == k and v is not None]
            if k == "v" and not any(sol.structure.members[m].is_beam for m in members):
                continue
            if vals:
                v, mid, at = max(vals, key=lambda t: abs(t[0]))
                end = "start" if at == 0.0 else "end"
                rows.append((c, label, v, fu, mid if v != 0 else "-", end if v != 0 else "-"))
        beams = [mid for mid in members if sol.structure.members[mid].is_beam]
        if beams:
            hi = max(((members[m]["m_max"]["value"], m, members[m]["m_max"]["at"])
                      for m in beams), key=lambda t: t[0])
            lo = min(((members[m]["m_min"]["value"], m, members[m]["m_min"]["at"])
                      for m in beams), key=lambda t: t[0])
            for label, (v, mid, at) in (("largest moment m (most positive)", hi),
                                        ("smallest moment m (most negative)", lo)):
                rows.append((c, label, v, mu, mid if v != 0 else "-",
                             f"{fmt(at)} {lu}" if v != 0 else "-"))
            d = max(((members[m]["deflection"]["value"] or 0.0, m) for m in beams),
                    key=lambda t: t[0])
            if d[0]:
                info = members[d[1]]["deflection"]
                ratio = "" if info.get("ratio") is None else \
                    f"; {fmt(info['ratio'], 3)} of the limit" + (
                        " — OVER THE LIMIT" if info["ratio"] > 1 else "")
                rows.append((c, "largest beam deflection (from the chord)", d[0], du, d[1],
                             f"{fmt(info['at'])} {lu}{ratio}"))
    return Grid("Governing section forces and deflection (on members; ends for n and v, "
                "extremes along the member for m)",
                ("case", "quantity", "value", "unit", "member", "where"), tuple(rows), keys=2)


def _inputs(sol) -> str:
    st = sol.structure
    lu = st.units.length
    q = quantities(sol.units)
    named = "".join(f", {k}s in {_e(q.unit(k))}" for k in ("displacement", "moment")
                    if q.named(k))
    out = [f"<p>Units of the case: forces in {_e(st.units.force)}, lengths in {_e(lu)}"
           f"{named}; every number below is in these units.</p>"]
    lf = quantities(st.units).factor("length")
    from .audit.structure import support_kind

    rows = tuple((n.id, n.x / lf, n.y / lf,
                  support_kind(st.supports[n.id]) if n.id in st.supports else "-")
                 for n in st.nodes.values())
    out.append(_table(Grid("Nodes", ("node", f"x [{lu}]", f"y [{lu}]", "support"), rows)))
    opts = [("redundants", ", ".join(sol.redundant_names) or "none (statically determinate)"),
            ("chosen by", "the user" if sol.chosen_by_user else "the tool"),
            ("shear energy", "included" if st.shear else "not included"),
            ("displacements asked", ", ".join(st.displacements) or "none"),
            ("load cases", ", ".join(sol.cases))]
    out.append(_table(Grid("Analysis", ("item", "value"), tuple(opts))))
    out.append("<p>Members, supports and loads: see step 1.</p>")
    return "\n".join(out)


#: Tallest drawing on a printed page (inches): the figure's largest height in print
#: (``figure svg { max-height }``, 235 mm). A taller figure would be shrunk, its 9 pt text
#: with it, so it is drawn one panel at a time instead.
PAGE_FIGURE_HEIGHT = 235 / 25.4


def _svg_height(svg: str) -> float:
    """The height of an SVG drawing in inches (from its ``height="...pt"``; 0 if none)."""
    m = re.search(r'<svg[^>]*\bheight="([0-9.]+)pt"', svg)
    return float(m.group(1)) / 72.0 if m else 0.0


def case_drawings(sol, case: str) -> list[str]:
    """The drawings of one load case as SVG texts: all panels in one figure when it fits a
    printed page at full size, otherwise consecutive panels gathered into as few figures
    as fit a page each (a panel taller than a page alone)."""
    from .plot import figure_svg
    from .plot.data import DIAGRAMS

    svg = figure_svg(sol, case)
    if _svg_height(svg) <= PAGE_FIGURE_HEIGHT:
        return [svg]
    beams = any(m.is_beam for m in sol.structure.members.values())
    shown = [d for d in DIAGRAMS if beams or d not in ("v", "m")]
    out: list[str] = []
    group, drawn = [shown[0]], figure_svg(sol, case, (shown[0],))
    for d in shown[1:]:
        more = figure_svg(sol, case, (*group, d))
        if _svg_height(more) <= PAGE_FIGURE_HEIGHT:
            group, drawn = [*group, d], more
        else:
            out.append(drawn)
            group, drawn = [d], figure_svg(sol, case, (d,))
    return [*out, drawn]


def _diagrams(sol, cases: list[str]) -> str:
    out = []
    for k, c in enumerate(cases, 1):
        drawings = case_drawings(sol, c)
        for i, svg in enumerate(drawings, 1):
            label = f"Diagrams of load case {c}" + (f", part {i}" if len(drawings) > 1 else "")
            body = _inline_svg(svg, label, f"fig{k}-{i}-")
            caption = ("" if i < len(drawings) else
                       f"<figcaption>Load case {_e(c)}: the structure "
                       "with its loads and redundants, the axial force n, shear force v and "
                       f"bending moment m along each member ({moment_convention()}), and "
                       "the deflected shape, magnified as stated.</figcaption>")
            out.append(f'<figure class="case">{body}{caption}</figure>')
    return "\n".join(out)


#: Control characters that must not reach the page raw (the line breaks and tabs of the SVG
#: text itself are kept): C0 but tab, newline and carriage return; DEL and C1;
#: bidirectional overrides and isolates.
_SVG_CONTROL = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\x7f-\x9f\u2028\u2029"
                          "\u202a-\u202e\u2066-\u2069]")


def _inline_svg(svg: str, label: str, prefix: str) -> str:
    """SVG text made fit to sit inside HTML: no XML prolog, doctype or metadata, its ids
    prefixed (several figures share one document), labelled for screen readers, and any
    control character left in its text shown escaped (:func:`leastwork.plaintext.literal`)."""
    start = svg.find("<svg")
    body = svg[start:] if start >= 0 else svg
    body = _SVG_CONTROL.sub(lambda m: literal(m.group()), body)
    body = re.sub(r"<metadata>.*?</metadata>\s*", "", body, flags=re.S)
    body = re.sub(r'\bid="', f'id="{prefix}', body)
    body = re.sub(r"url\(#", f"url(#{prefix}", body)
    body = re.sub(r'href="#', f'href="#{prefix}', body)
    return body.replace("<svg", f'<svg role="img" aria-label="{_e(label)}"', 1)


def report_html(sol, case_names=None, meta: dict[str, str] | None = None) -> str:
    """The whole calculation as one HTML document: title, summary of the redundants and
    checks, inputs, assumptions, diagrams (inline SVG), the eight steps of the audit
    trail, cautions, tool version and date (``meta``; default: this tool and today)."""
    from .audit import audit_sheet

    cases = _cases(sol, case_names)
    sheet = audit_sheet(sol, cases, meta=default_meta() if meta is None else meta)
    return _document(sol, sheet, cases)


def title_block_html(sheet: Sheet) -> str:
    """The title block (:meth:`Sheet.title_block`) as a two-pairs-a-row table."""
    rows = sheet.title_block()
    cells = [f"<th>{_e(k)}</th><td>{_e(v)}</td>" for k, v in rows]
    if len(cells) % 2:
        cells.append("<th></th><td></td>")
    trs = "".join(f"<tr>{cells[i]}{cells[i + 1]}</tr>" for i in range(0, len(cells), 2))
    return f'<table class="titleblock short" aria-label="title block"><tbody>{trs}</tbody></table>'


def _css_string(text: str) -> str:
    """Text as a CSS string literal inside a <style> element: quotes, backslashes, line
    breaks and the HTML characters < > & ' written as CSS escapes (so that "</style>" in a
    name cannot end the style sheet)."""
    body = "".join(ch if ch.isprintable() and ch not in '"\\<>&\'' else f"\\{ord(ch):x} "
                   for ch in literal(text, 80))
    return f'"{body}"'


def page_css(sheet: Sheet) -> str:
    """Printed pages: the job and structure at the top of each page, and "Sheet n of N"
    with the date at its foot (CSS page margin boxes)."""
    p = sheet.project
    top = " · ".join(x for x in (p.get("job"), p.get("title") or sheet.title) if x)
    date = sheet.meta.get("Date", "")
    rev = p.get("revision")
    foot = " · ".join(x for x in (sheet.source, f"rev. {rev}" if rev else "", date) if x)
    return ("@page { @top-left { content: " + _css_string(top) + "; font-size: 8pt; "
            "color: #5a5a5a; } @bottom-left { content: " + _css_string(foot)
            + "; font-size: 8pt; color: #5a5a5a; } @bottom-right { content: \"Sheet \" "
            "counter(page) \" of \" counter(pages); font-size: 8pt; } }")


def _document(sol, sheet: Sheet, cases: list[str]) -> str:
    head = ['<!DOCTYPE html>', '<html lang="en">', "<head>", '<meta charset="utf-8"/>',
            '<meta name="viewport" content="width=device-width, initial-scale=1"/>',
            f"<title>{_e(sheet.title)} — calculation report</title>",
            f"<style>\n{CSS}\n{page_css(sheet)}\n</style>", "</head>", "<body>"]
    body = ["<header>", f"<h1>{_e(sheet.project.get('title') or sheet.title)}</h1>",
            title_block_html(sheet), "</header>"]
    body += ['<section class="summary">', "<h2>Summary</h2>"]
    body += [_table(g) for g in summary_grids(sol, cases)]
    if not sol.equilibrium_ok or not sol.cross_check_ok:
        body.append(_para(Para("A check failed (see the table above and step 8): these "
                               "results must not be used before the cause is found.",
                               "alarm")))
    body += [_para(Para(w, "warning")) for w in sol.warnings]
    body += ["</section>", '<section class="inputs">', "<h2>Inputs</h2>", _inputs(sol),
             "</section>", '<section class="assumptions">', "<h2>Assumptions</h2>", "<ul>"]
    body += [f"<li>{_e(a)}</li>" for a in sheet.assumptions]
    body += ["</ul>", "</section>", '<section class="diagrams">', "<h2>Diagrams</h2>",
             _diagrams(sol, cases), "</section>"]
    for step in sheet.steps:
        body += [f'<section class="step" id="step-{step.number}">',
                 f"<h2>Step {step.number}. {_e(step.title)}</h2>", _blocks(step.blocks),
                 "</section>"]
    body += ['<section class="cautions">', "<h2>Caution</h2>"]
    body += [f'<p class="caution">{_e(c)}</p>' for c in sheet.cautions]
    body += ["</section>", "<footer>"
             + " · ".join(_e(f"{k}: {v}") for k, v in sheet.meta.items()) + "</footer>",
             "</body>", "</html>"]
    return "\n".join(head + body) + "\n"


# ---------------------------------------------------------------------------- Markdown


#: Longest part of an image's file name taken from a load case's name (file systems allow
#: 255 bytes for a whole name).
IMAGE_NAME_CASE_LIMIT = 60


def image_names(md_path, cases) -> dict[str, str]:
    """File name of each load case's diagram, beside the Markdown file:
    ``STEM-CASE.svg`` with anything but letters, digits, '-', '_' and '.' in the case name
    replaced by '_' and cut to :data:`IMAGE_NAME_CASE_LIMIT` characters (a number is added
    when two names would clash).

    >>> image_names("out/calc.md", ["dead", "wind/left", "wind left"])
    {'dead': 'calc-dead.svg', 'wind/left': 'calc-wind_left.svg', 'wind left': 'calc-wind_left-2.svg'}
    """
    stem = pathlib.Path(md_path).stem
    out: dict[str, str] = {}
    taken: set[str] = set()
    for c in cases:
        part = re.sub(r'[^A-Za-z0-9_.-]+', '_', c).strip('.')[:IMAGE_NAME_CASE_LIMIT]
        base = f"{stem}-{part or 'case'}"
        name, k = f"{base}.svg", 2
        while name.lower() in taken:
            name, k = f"{base}-{k}.svg", k + 1
        taken.add(name.lower())
        out[c] = name
    return out


def report_markdown_files(sol, md_path, case_names=None,
                          meta: dict[str, str] | None = None) -> dict[pathlib.Path, bytes | str]:
    """The Markdown report (the audit trail with a summary of the checks and the diagrams
    linked) and one SVG diagram per load case beside it: {path: content}, the Markdown
    file first. Nothing is written here."""
    from .audit import audit_sheet
    from .documents import md_text, sheet_markdown
    from .plot import figure_svg

    md_path = pathlib.Path(md_path)
    cases = _cases(sol, case_names)
    sheet = audit_sheet(sol, cases, meta=default_meta() if meta is None else meta)
    names = image_names(md_path, cases)
    images: dict[pathlib.Path, bytes | str] = {}
    lines = []
    for c in cases:
        images[md_path.with_name(names[c])] = figure_svg(sol, c)
        lines += [f"![Diagrams of load case {md_text(c)}]({quote(names[c])})", "",
                  f"*Load case {md_text(c)}: structure, loads and redundants; n, v, m "
                  "(m on the tension side); deflected shape, magnified as stated.*", ""]
    checks = []
    for g in summary_grids(sol, cases):
        checks += [f"**{g.title}**", "",
                   "| " + " | ".join(md_text(h) for h in g.headers) + " |",
                   "|" + "|".join("---" for _ in g.headers) + "|"]
        checks += ["| " + " | ".join(md_text(fmt(c)) for c in r) + " |" for r in g.rows]
        checks.append("")
    text = sheet_markdown(sheet, extra=[("Summary of the redundants and checks", checks),
                                        ("Diagrams", lines)])
    return {md_path: text, **images}

"""A calculation sheet as a document: Markdown or LaTeX text (no I/O here; the command
line writes the file).

Every piece of text is shown literally: control characters escaped
(:func:`leastwork.plaintext.literal`), then, in Markdown, the characters that would format
or become HTML escaped (:func:`md_text`: ``<`` ``>`` ``&`` as entities, emphasis, link,
code, table and math marks with a backslash, block marks at the start of a line), and in
LaTeX the special characters (:func:`tex_escape`). So a name such as
``<script>alert(1)</script>`` or ``*draft* [link](x)`` reads as written.
"""

from __future__ import annotations

import re
import textwrap

from ..plaintext import literal
from .mathml import tex_number
from .sheet import Formula, Grid, Para, Sheet, fmt, shown, split_grid

__all__ = ["sheet_markdown", "sheet_latex", "FORMATS", "md_text", "md_block", "md_code",
           "tex_escape"]

#: Document formats by name, with the file suffixes that select them.
FORMATS = {"md": (".md", ".markdown"), "latex": (".tex",)}

_TONE_MD = {"plain": "", "note": "*Note:* ", "warning": "**Warning:** ", "alarm": "**FAILED:** "}


#: HTML characters, written as entities (a backslash does not stop HTML in every renderer).
_MD_ENTITIES = {"&": "&amp;", "<": "&lt;", ">": "&gt;"}
#: Inline marks (emphasis, code, links, tables, strike-through, math), escaped by a backslash.
_MD_INLINE = re.compile(r"([\\`*_\[\]|~$])")
#: Marks that begin a block at the start of a line: heading, list, setext underline, and
#: the "." or ")" after the number of an ordered list.
_MD_BLOCK_MARK = re.compile(r"^( *)([#+=-]|\d+(?=[.)]))")


def md_text(text: object, limit: int | None = None) -> str:
    r"""``text`` as literal Markdown inline text (also safe in a table cell): control
    characters escaped, HTML characters as entities, Markdown marks backslash-escaped.

    >>> print(md_text("<b>*x*</b> | a_b"))
    &lt;b&gt;\*x\*&lt;/b&gt; \| a\_b
    """
    s = _MD_INLINE.sub(r"\\\1", literal(text, limit))
    return "".join(_MD_ENTITIES.get(ch, ch) for ch in s)


def md_block(text: object, limit: int | None = None) -> str:
    r"""``text`` as literal Markdown at the start of a line (a paragraph, a list item, a
    quote): :func:`md_text`, and a leading block mark escaped so that it cannot start a
    heading, list or code block.

    >>> print(md_block("# 1. draft"), md_block("2) b"), md_block("    code"), sep=" / ")
    \# 1. draft / 2\) b / &#32;   code
    """
    s = md_text(text, limit)
    m = _MD_BLOCK_MARK.match(s)
    if m:
        mark = m.group(2)
        if mark[0].isdigit():
            s = s[:m.end()] + "\\" + s[m.end():]
        else:
            s = s[:m.start(2)] + "\\" + s[m.start(2):]
    if s.startswith("    "):  # four spaces would make an indented code block
        s = "&#32;" + s[1:]
    return s


def md_code(text: object, in_table: bool = True) -> str:
    """``text`` as a Markdown code span, literal (control characters escaped), with a
    delimiter longer than any run of backticks inside; ``in_table``: a pipe is escaped, as
    a table cell needs even inside code."""
    s = literal(text)
    if in_table:
        s = s.replace("|", "\\|")
    runs = [len(r) for r in re.findall(r"`+", s)]
    fence = "`" * (max(runs, default=0) + 1)
    pad = " " if s.startswith("`") or s.endswith("`") or not s.strip() else ""
    return f"{fence}{pad}{s}{pad}{fence}"


def _md_fence(text: str) -> list[str]:
    """A fenced code block holding ``text`` (literal) with a fence no line can close."""
    runs = [len(r) for r in re.findall(r"`{3,}", text)]
    fence = "`" * max(3, max(runs, default=0) + 1)
    return [f"{fence}text", literal(text), fence]


def _md_cell(x) -> str:
    return md_text(fmt(x))


def sheet_markdown(sheet: Sheet, extra: list[tuple[str, list[str]]] | None = None) -> str:
    """The sheet as Markdown: headings per step, pipe tables, formulas as code lines.
    Every text of the sheet is escaped by :func:`md_text`; ``extra`` adds sections (title,
    Markdown lines already escaped by the caller) before the cautions."""
    out = [f"# {md_text(sheet.project.get('title') or sheet.title)}", "",
           "| title block | |", "|:---|:---|"]
    out += [f"| {md_text(k)} | {md_text(v)} |" for k, v in sheet.title_block()]
    out += ["", "## Assumptions", ""]
    out += [f"- {md_block(a)}" for a in sheet.assumptions]
    for step in sheet.steps:
        out += ["", f"## Step {step.number}. {md_text(step.title)}", ""]
        for b in step.blocks:
            if isinstance(b, Para):
                out += [(_TONE_MD[b.tone] + md_text(b.text)) if b.tone != "plain"
                        else md_block(b.text), ""]
            elif isinstance(b, Formula):
                out += [*_md_fence(b.text), ""]
            else:
                out += _md_table(b)
    for title, lines in extra or []:
        out += ["", f"## {md_text(title)}", "", *lines]
    out += ["", "## Caution", ""]
    for c in sheet.cautions:  # one quote each (consecutive "> " lines would merge)
        out += [f"> {md_block(c)}", ""]
    return "\n".join(out).rstrip() + "\n"


def _md_table(g: Grid) -> list[str]:
    g = shown(g)
    out = [f"**{md_text(g.title)}**", ""]
    out.append("| " + " | ".join(_md_cell(h) for h in g.headers) + " |")
    out.append("|" + "|".join(":---" if k < g.keys or all(isinstance(r[k], str) for r in g.rows)
                              else "---:" for k in range(len(g.headers))) + "|")
    for r in g.rows:
        out.append("| " + " | ".join(_md_cell(c) for c in r) + " |")
    if g.total:
        out.append("| " + " | ".join(f"**{_md_cell(c)}**" if fmt(c) not in ("", "0") else
                                     _md_cell(c) for c in g.total) + " |")
    return [*out, ""]


_TEX_SPECIAL = {"\\": r"\textbackslash{}", "&": r"\&", "%": r"\%", "$": r"\$", "#": r"\#",
                "_": r"\_", "{": r"\{", "}": r"\}", "~": r"\textasciitilde{}",
                "^": r"\^{}"}
_TEX_UNICODE = {"δ": r"$\delta$", "Δ": r"$\Delta$", "Σ": r"$\Sigma$", "∫": r"$\int$",
                "∂": r"$\partial$", "·": r"$\cdot$", "α": r"$\alpha$", "—": "---",
                "−": "-", "²": r"$^2$", "³": r"$^3$", "⁴": r"$^4$", "⁵": r"$^5$",
                "≤": r"$\le$", "≥": r"$\ge$", "→": r"$\to$", "×": r"$\times$",
                "ε": r"$\varepsilon$", "κ": r"$\kappa$", "σ": r"$\sigma$", "±": r"$\pm$",
                "⁻": r"$^{-}$", "⁰": r"$^0$", "¹": r"$^1$", "⁶": r"$^6$", "⁷": r"$^7$",
                "⁸": r"$^8$", "⁹": r"$^9$"}


_TEX_POWER = re.compile(r"(-?[0-9.]+)×10([⁻⁰¹²³⁴⁵⁶⁷⁸⁹]+)")


def tex_escape(text: str) -> str:
    """Plain text (Unicode) as LaTeX text, literal: control characters escaped first
    (:func:`leastwork.plaintext.literal`; their backslashes then become ``\\textbackslash{}``).

    >>> tex_escape("δ12 = 5% of M_0")
    '$\\\\delta$12 = 5\\\\% of M\\\\_0'
    """
    parts = []
    last = 0
    lit = literal(text)
    for m in _TEX_POWER.finditer(lit):  # 3.071×10⁻⁶ as math
        parts.append(_tex_chars(lit[last:m.start()]))
        parts.append(f"${tex_number(m.group(0))}$")
        last = m.end()
    parts.append(_tex_chars(lit[last:]))
    return "".join(parts)


def _tex_chars(text: str) -> str:
    return "".join(_TEX_SPECIAL.get(ch) or _TEX_UNICODE.get(ch) or ch for ch in text)


def _tex_table(g: Grid, max_cols: int = 7) -> list[str]:
    g = shown(g)
    out = []
    for part in split_grid(g, 10 ** 6) if len(g.headers) <= max_cols else _chunks(g, max_cols):
        align = "".join("l" if k < part.keys or all(isinstance(r[k], str) for r in part.rows)
                        else "r" for k in range(len(part.headers)))
        out += [r"\begin{center}\small", rf"\textbf{{{tex_escape(part.title)}}}\\[2pt]",
                rf"\fitwidth{{\begin{{tabular}}{{{align}}}", r"\hline",
                " & ".join(_tex_head(h, a) for h, a in zip(part.headers, align, strict=True)) + r" \\ \hline"]
        for r in part.rows:
            out.append(" & ".join(tex_escape(fmt(c)) for c in r) + r" \\")
        if part.total:
            out.append(r"\hline " + " & ".join(tex_escape(fmt(c)) for c in part.total) + r" \\")
        out += [r"\hline", r"\end{tabular}}", r"\end{center}", ""]
    return out


#: Longest line of a column heading in a LaTeX table (characters); a longer heading is set
#: on several lines, its unit on a line of its own, so a wide table fits the page.
TEX_HEAD_WIDTH = 14


def _tex_head(text: str, align: str = "l") -> str:
    """A column heading, on one line when short, otherwise stacked (a nested tabular whose
    lines are aligned as the column, ``align``: "l" or "r").

    >>> _tex_head("member")
    'member'
    """
    if len(text) <= TEX_HEAD_WIDTH:
        return tex_escape(text)
    name, bracket, unit = text.partition(" [")
    lines = textwrap.wrap(name, TEX_HEAD_WIDTH, break_long_words=False) or [name]
    if bracket:
        lines.append("[" + unit)
    # \relax: a line starting with "[" is not read as the optional argument of \\
    return (rf"\begin{{tabular}}[b]{{@{{}}{align}@{{}}}}" + r" \\ \relax ".join(tex_escape(t) for t in lines)
            + r"\end{tabular}")


def _chunks(g: Grid, max_cols: int) -> list[Grid]:
    keys, rest = list(range(g.keys)), list(range(g.keys, len(g.headers)))
    size = max(1, max_cols - g.keys)
    groups = [rest[i:i + size] for i in range(0, len(rest), size)]
    return [Grid(f"{g.title} (part {n} of {len(groups)})",
                 tuple(g.headers[c] for c in keys + grp),
                 tuple(tuple(r[c] for c in keys + grp) for r in g.rows), keys=g.keys,
                 total=tuple(g.total[c] for c in keys + grp) if g.total else None)
            for n, grp in enumerate(groups, 1)]


def sheet_latex(sheet: Sheet, extra: list[tuple[str, list[str]]] | None = None) -> str:
    """The sheet as a standalone LaTeX article (pdflatex). ``extra`` adds sections
    (title, LaTeX lines) before the cautions, e.g. closed forms in symbolic mode."""
    p = sheet.project
    head = tex_escape(" · ".join(x for x in (p.get("job"), p.get("title") or sheet.title) if x))
    foot = tex_escape(" · ".join(x for x in (sheet.source, p.get("revision") and
                                             f"rev. {p['revision']}",
                                             sheet.meta.get("Date")) if x))
    out = [r"\documentclass[a4paper,10pt]{article}", r"\usepackage[utf8]{inputenc}",
           r"\usepackage[T1]{fontenc}", r"\usepackage{amsmath}",
           r"\usepackage[margin=18mm,headheight=14pt]{geometry}",
           r"\usepackage{fancyhdr}", r"\usepackage{graphicx}",
           # a table wider than the text (a long polynomial in a cell) is scaled to fit
           r"\newsavebox{\sheetbox}",
           r"\newcommand{\fitwidth}[1]{\sbox{\sheetbox}{#1}\ifdim\wd\sheetbox>\linewidth"
           r"\resizebox{\linewidth}{!}{\usebox{\sheetbox}}\else\usebox{\sheetbox}\fi}",
           r"\setlength{\parindent}{0pt}", rf"\title{{{tex_escape(sheet.title)}}}",
           r"\pagestyle{fancy}", r"\fancyhf{}",
           rf"\lhead{{\small {head}}}", rf"\lfoot{{\small {foot}}}",
           r"\rfoot{\small Sheet \thepage\ of \pageref{sheet-last-page}}",
           r"\begin{document}", r"\thispagestyle{fancy}",
           rf"{{\Large\bfseries {tex_escape(p.get('title') or sheet.title)}}}\par\medskip",
           r"\begin{tabular}{|l|l|}", r"\hline"]
    out += [rf"{tex_escape(k)} & {tex_escape(v)} \\ \hline" for k, v in sheet.title_block()]
    out += [r"\end{tabular}\par\bigskip"]
    out += [r"\section*{Assumptions}", r"\begin{itemize}"]
    out += [rf"\item {tex_escape(a)}" for a in sheet.assumptions]
    out += [r"\end{itemize}"]
    for step in sheet.steps:
        out.append(rf"\section*{{Step {step.number}. {tex_escape(step.title)}}}")
        for b in step.blocks:
            if isinstance(b, Para):
                text = tex_escape(b.text)
                if b.tone in ("warning", "alarm"):
                    text = rf"\textbf{{{text}}}"
                out += [text, ""]
            elif isinstance(b, Formula):
                out += ([r"\begin{equation*}", b.latex, r"\end{equation*}"] if b.latex
                        else [rf"\texttt{{{tex_escape(b.text)}}}\\", ""])
            else:
                out += _tex_table(b)
    for title, lines in extra or []:
        out += [rf"\section*{{{tex_escape(title)}}}", *lines]
    out.append(r"\section*{Caution}")
    out += [rf"\textbf{{{tex_escape(c)}}}" for c in sheet.cautions]
    out += [r"\label{sheet-last-page}", r"\end{document}"]  # "of N" on the second run
    return "\n".join(out) + "\n"

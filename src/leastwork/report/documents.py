"""A calculation sheet as a document: Markdown or LaTeX text (no I/O here; the command
line writes the file)."""

from __future__ import annotations

from ..sheet import Formula, Grid, Para, Sheet, fmt, split_grid

__all__ = ["sheet_markdown", "sheet_latex", "FORMATS"]

#: Document formats by name, with the file suffixes that select them.
FORMATS = {"md": (".md", ".markdown"), "latex": (".tex",)}

_TONE_MD = {"plain": "", "note": "*Note:* ", "warning": "**Warning:** ", "alarm": "**FAILED:** "}


def _md_cell(x) -> str:
    return fmt(x).replace("|", "\\|")


def sheet_markdown(sheet: Sheet, extra: list[tuple[str, list[str]]] | None = None) -> str:
    """The sheet as Markdown: headings per step, pipe tables, formulas as code lines.
    ``extra`` adds sections (title, Markdown lines) before the cautions."""
    out = [f"# {sheet.title}", "", f"Case file: `{sheet.source}`"]
    for k, v in sheet.meta.items():
        out.append(f"  \n{k}: {v}")
    out += ["", "## Assumptions", ""]
    out += [f"- {a}" for a in sheet.assumptions]
    for step in sheet.steps:
        out += ["", f"## Step {step.number}. {step.title}", ""]
        for b in step.blocks:
            if isinstance(b, Para):
                out += [_TONE_MD[b.tone] + b.text, ""]
            elif isinstance(b, Formula):
                out += ["```text", b.text, "```", ""]
            else:
                out += _md_table(b)
    for title, lines in extra or []:
        out += ["", f"## {title}", "", *lines]
    out += ["", "## Caution", ""]
    out += [f"> {c}" for c in sheet.cautions]
    return "\n".join(out).rstrip() + "\n"


def _md_table(g: Grid) -> list[str]:
    out = [f"**{g.title}**", ""]
    out.append("| " + " | ".join(_md_cell(h) for h in g.headers) + " |")
    out.append("|" + "|".join(":---" if k < g.keys or all(isinstance(r[k], str) for r in g.rows)
                              else "---:" for k in range(len(g.headers))) + "|")
    for r in g.rows:
        out.append("| " + " | ".join(_md_cell(c) for c in r) + " |")
    if g.total:
        out.append("| " + " | ".join(f"**{_md_cell(c)}**" if fmt(c) else "" for c in g.total)
                   + " |")
    return [*out, ""]


_TEX_SPECIAL = {"\\": r"\textbackslash{}", "&": r"\&", "%": r"\%", "$": r"\$", "#": r"\#",
                "_": r"\_", "{": r"\{", "}": r"\}", "~": r"\textasciitilde{}",
                "^": r"\^{}"}
_TEX_UNICODE = {"δ": r"$\delta$", "Δ": r"$\Delta$", "Σ": r"$\Sigma$", "∫": r"$\int$",
                "∂": r"$\partial$", "·": r"$\cdot$", "α": r"$\alpha$", "—": "---",
                "−": "-", "²": r"$^2$", "³": r"$^3$", "⁴": r"$^4$", "⁵": r"$^5$",
                "≤": r"$\le$", "≥": r"$\ge$", "→": r"$\to$"}


def tex_escape(text: str) -> str:
    """Plain text (Unicode) as LaTeX text.

    >>> tex_escape("δ12 = 5% of M_0")
    '$\\\\delta$12 = 5\\\\% of M\\\\_0'
    """
    out = []
    for ch in str(text):
        out.append(_TEX_SPECIAL.get(ch) or _TEX_UNICODE.get(ch) or ch)
    return "".join(out)


def _tex_table(g: Grid, max_cols: int = 7) -> list[str]:
    out = []
    for part in split_grid(g, 10 ** 6) if len(g.headers) <= max_cols else _chunks(g, max_cols):
        align = "".join("l" if k < part.keys or all(isinstance(r[k], str) for r in part.rows)
                        else "r" for k in range(len(part.headers)))
        out += [r"\begin{center}\small", rf"\textbf{{{tex_escape(part.title)}}}\\[2pt]",
                rf"\begin{{tabular}}{{{align}}}", r"\hline",
                " & ".join(tex_escape(h) for h in part.headers) + r" \\ \hline"]
        for r in part.rows:
            out.append(" & ".join(tex_escape(fmt(c)) for c in r) + r" \\")
        if part.total:
            out.append(r"\hline " + " & ".join(tex_escape(fmt(c)) for c in part.total) + r" \\")
        out += [r"\hline", r"\end{tabular}", r"\end{center}", ""]
    return out


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
    out = [r"\documentclass[a4paper,10pt]{article}", r"\usepackage[utf8]{inputenc}",
           r"\usepackage[T1]{fontenc}", r"\usepackage{amsmath}",
           r"\usepackage[margin=18mm]{geometry}", r"\setlength{\parindent}{0pt}",
           rf"\title{{{tex_escape(sheet.title)}}}", r"\date{}", r"\begin{document}",
           r"\maketitle", rf"Case file: \texttt{{{tex_escape(sheet.source)}}}\\"]
    for k, v in sheet.meta.items():
        out.append(rf"{tex_escape(k)}: {tex_escape(v)}\\")
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
    out.append(r"\end{document}")
    return "\n".join(out) + "\n"

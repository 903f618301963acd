"""The sheet's formulas as MathML (which browsers render offline, no script) from the
small LaTeX subset the audit trail writes, and numbers written for LaTeX.

The subset: ``\\frac{a}{b}``, ``\\sum``, ``\\int``, ``_`` and ``^`` with one character or a
``{group}``, ``\\text{...}``, ``\\mathrm{...}``, the Greek letters and operators in
:data:`SYMBOLS`, spacing commands, letters, digits and the ASCII operators. Anything else
is shown as text (escaped), never dropped.
"""

from __future__ import annotations

import html
import re

__all__ = ["latex_mathml", "tex_number", "SYMBOLS"]

#: LaTeX command -> (MathML element, character).
SYMBOLS = {
    "delta": ("mi", "δ"), "Delta": ("mi", "Δ"), "alpha": ("mi", "α"), "sigma": ("mi", "σ"),
    "partial": ("mi", "∂"), "theta": ("mi", "θ"), "varepsilon": ("mi", "ε"), "epsilon": ("mi", "ε"), "phi": ("mi", "φ"), "kappa": ("mi", "κ"),
    "cdot": ("mo", "·"), "times": ("mo", "×"), "pm": ("mo", "±"), "to": ("mo", "→"),
    "le": ("mo", "≤"), "ge": ("mo", "≥"), "approx": ("mo", "≈"), "sum": ("mo", "∑"),
    "int": ("mo", "∫"), "quad": ("mspace", ""), "ldots": ("mo", "…"),
}
_SPACES = {",", ";", "!", " ", ":"}
_TOKEN = re.compile(r"\\(?:text|mathrm)\{[^{}]*\}|\\[A-Za-z]+|\\.|[0-9]+(?:\.[0-9]+)?|\s+|.", re.S)
_SUPERSCRIPT_TEX = str.maketrans("⁻⁰¹²³⁴⁵⁶⁷⁸⁹", "-0123456789")


def _esc(text: str) -> str:
    return html.escape(text, quote=True)


class _Parser:
    def __init__(self, tex: str):
        self.toks = [t for t in _TOKEN.findall(tex) if not t.isspace()]
        self.k = 0

    def peek(self) -> str | None:
        return self.toks[self.k] if self.k < len(self.toks) else None

    def take(self) -> str:
        tok = self.toks[self.k]
        self.k += 1
        return tok

    def sequence(self, closing: str | None = None) -> list[str]:
        out: list[str] = []
        while (tok := self.peek()) is not None and tok != closing:
            atom = self.atom()
            if atom:
                out.append(self.scripts(atom))
        if closing is not None and self.peek() == closing:
            self.take()
        return out

    def group(self) -> str:
        """One argument: a {group} or a single token."""
        if self.peek() == "{":
            self.take()
            items = self.sequence("}")
            return items[0] if len(items) == 1 else f"<mrow>{''.join(items)}</mrow>"
        if self.peek() is None:
            return "<mrow></mrow>"
        return self.atom() or "<mrow></mrow>"

    def scripts(self, base: str) -> str:
        sub = sup = None
        while self.peek() in ("_", "^"):
            which = self.take()
            arg = self.group()
            if which == "_":
                sub = arg
            else:
                sup = arg
        if sub is not None and sup is not None:
            return f"<msubsup>{base}{sub}{sup}</msubsup>"
        if sub is not None:
            return f"<msub>{base}{sub}</msub>"
        if sup is not None:
            return f"<msup>{base}{sup}</msup>"
        return base

    def atom(self) -> str:
        tok = self.take()
        if tok == "{":
            items = self.sequence("}")
            return f"<mrow>{''.join(items)}</mrow>"
        if tok == "}":
            return ""
        if tok.startswith("\\"):
            name = tok[1:]
            if name == "frac":
                return f"<mfrac>{self.group()}{self.group()}</mfrac>"
            if name.startswith(("text{", "mathrm{")):
                return f"<mtext>{_esc(name.split('{', 1)[1][:-1])}</mtext>"
            if name in _SPACES or name == "quad":
                return '<mspace width="0.2em"/>'
            if name in ("left", "right"):
                return ""
            if name in SYMBOLS:
                kind, ch = SYMBOLS[name]
                if kind == "mspace":
                    return '<mspace width="1em"/>'
                if name in ("sum", "int"):
                    return f'<mo largeop="true" movablelimits="false">{ch}</mo>'
                return f"<{kind}>{ch}</{kind}>"
            return f"<mtext>{_esc(name)}</mtext>"
        if tok[0].isdigit():
            return f"<mn>{tok}</mn>"
        if tok.isalpha():
            return f"<mi>{_esc(tok)}</mi>"
        return f"<mo>{_esc(tok)}</mo>"


def latex_mathml(tex: str, alt: str = "") -> str:
    """``tex`` (the subset above) as a block MathML element; ``alt``: the plain-text form
    for readers that show no MathML (the ``alttext`` attribute).

    >>> latex_mathml(r"\\delta_{11} = \\frac{L}{EA}")
    '<math display="block"><mrow><msub><mi>δ</mi><mn>11</mn></msub><mo>=</mo><mfrac><mi>L</mi><mrow><mi>E</mi><mi>A</mi></mrow></mfrac></mrow></math>'
    """
    body = "".join(_Parser(tex).sequence())
    alt_attr = f' alttext="{_esc(alt)}"' if alt else ""
    return f'<math display="block"{alt_attr}><mrow>{body}</mrow></math>'


def tex_number(text: str) -> str:
    """A number as :func:`leastwork.output.sheet.fmt` writes it (``3.071×10⁻⁶``), in LaTeX
    math (``3.071\\times10^{-6}``).

    >>> tex_number("-3.071×10⁻⁶"), tex_number("45.00")
    ('-3.071\\\\times10^{-6}', '45.00')
    """
    if "×10" not in text:
        return text
    mant, _, exp = text.partition("×10")
    return f"{mant}\\times10^{{{exp.translate(_SUPERSCRIPT_TEX)}}}"

"""Aperture templates of the Gerber reader: standard apertures and aperture macros.

Shapes come out as ``(dark, ring)`` parts in millimetres relative to the aperture
origin (see :class:`fluxshadow.io.records.ApertureRecord`). Macro arithmetic follows the
Gerber Layer Format Specification rev 2023.08, section 4.5.4.2 ("the standard
arithmetic precedence rules apply": ``x`` and ``/`` bind tighter than ``+`` and ``-``,
both left-associative, unary minus, parentheses).
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable, Sequence
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from fluxshadow.io._gerber_geom import (
    annulus_parts,
    circle_ring,
    obround_ring,
    polygon_ring,
    rect_ring,
    segment_rect_ring,
    thermal_rings,
)

__all__ = [
    "MacroError",
    "MacroTemplate",
    "compile_expression",
    "macro_parts",
    "parse_macro",
    "standard_parts",
]

FloatArray = npt.NDArray[np.float64]
Part = tuple[bool, FloatArray]
Expr = Callable[[dict[int, float]], float]


class MacroError(ValueError):
    """A macro or aperture definition is malformed (turned into ParseError by the caller).

    ``limit`` is true when a configured limit (nesting depth) was exceeded.
    """

    def __init__(self, message: str, *, limit: bool = False) -> None:
        super().__init__(message)
        self.limit = limit


_TOKEN = re.compile(
    r"\s*(?:(\d+\.?\d*(?:[eE][+-]?\d+)?|\.\d+(?:[eE][+-]?\d+)?)|\$(\d+)|([-+xX/()]))"
)


def _tokenise(text: str) -> list[tuple[str, str]]:
    out: list[tuple[str, str]] = []
    pos = 0
    n = len(text)
    while pos < n:
        m = _TOKEN.match(text, pos)
        if m is None or m.end() == pos:
            if text[pos:].strip() == "":
                break
            msg = f"macro expression must use numbers, $n, + - x / and parentheses; got {text!r}"
            raise MacroError(msg)
        num, var, op = m.groups()
        if num is not None:
            out.append(("n", num))
        elif var is not None:
            out.append(("v", var))
        else:
            out.append(("o", op.lower() if op in "xX" else op))
        pos = m.end()
    return out


def compile_expression(text: str, *, max_depth: int = 64) -> Expr:
    """Compile a macro arithmetic expression into a function of the variables.

    Parameters
    ----------
    text : str
        Expression such as ``"$1x2+$2"`` or ``"-($3-0.1)/2"``.
    max_depth : int
        Deepest nesting of parentheses and unary signs accepted.

    Returns
    -------
    callable
        ``f(variables) -> float`` where ``variables`` maps ``n`` to the value of ``$n``
        (an unset variable is 0).

    Raises
    ------
    MacroError
        On a syntax error or when the nesting exceeds ``max_depth``.
    """
    toks = _tokenise(text)
    if not toks:
        msg = f"macro expression must not be empty; got {text!r}"
        raise MacroError(msg)
    pos = 0

    def peek() -> tuple[str, str] | None:
        return toks[pos] if pos < len(toks) else None

    def expr(depth: int) -> Expr:
        nonlocal pos
        left = term(depth)
        while (t := peek()) is not None and t[0] == "o" and t[1] in "+-":
            pos += 1
            right = term(depth)
            left = _binary(t[1], left, right)
        return left

    def term(depth: int) -> Expr:
        nonlocal pos
        left = unary(depth)
        while (t := peek()) is not None and t[0] == "o" and t[1] in "x/":
            pos += 1
            right = unary(depth)
            left = _binary(t[1], left, right)
        return left

    def unary(depth: int) -> Expr:
        nonlocal pos
        if depth > max_depth:
            shown = text if len(text) <= 40 else text[:37] + "..."
            msg = f"macro expression nesting must be at most {max_depth} deep; got {shown!r}"
            raise MacroError(msg, limit=True)
        t = peek()
        if t is not None and t[0] == "o" and t[1] in "+-":
            pos += 1
            inner = unary(depth + 1)
            if t[1] == "-":
                return lambda v: -inner(v)
            return inner
        return primary(depth)

    def primary(depth: int) -> Expr:
        nonlocal pos
        t = peek()
        if t is None:
            msg = f"macro expression must not end after an operator; got {text!r}"
            raise MacroError(msg)
        pos += 1
        if t[0] == "n":
            value = float(t[1])
            return lambda v: value
        if t[0] == "v":
            idx = int(t[1])
            return lambda v: v.get(idx, 0.0)
        if t[1] == "(":
            inner = expr(depth + 1)
            close = peek()
            if close is None or close != ("o", ")"):
                msg = f"macro expression parentheses must balance; got {text!r}"
                raise MacroError(msg)
            pos += 1
            return inner
        msg = f"macro expression must have an operand where {t[1]!r} is; got {text!r}"
        raise MacroError(msg)

    result = expr(0)
    if pos != len(toks):
        msg = f"macro expression must be one arithmetic expression; got {text!r}"
        raise MacroError(msg)
    return result


def _binary(op: str, a: Expr, b: Expr) -> Expr:
    if op == "+":
        return lambda v: a(v) + b(v)
    if op == "-":
        return lambda v: a(v) - b(v)
    if op == "x":
        return lambda v: a(v) * b(v)

    def div(v: dict[int, float]) -> float:
        d = b(v)
        if d == 0.0:
            msg = "macro expression divisor must not be zero; got a division by 0"
            raise MacroError(msg)
        return a(v) / d

    return div


# Primitive code -> (name, minimum parameter count incl. exposure where it has one).
_PRIMITIVES: dict[int, tuple[str, int]] = {
    1: ("circle", 4),
    2: ("vector line", 7),
    20: ("vector line", 7),
    21: ("center line", 6),
    22: ("lower-left line", 6),
    4: ("outline", 5),
    5: ("polygon", 6),
    6: ("moire", 9),
    7: ("thermal", 6),
}


@dataclass(frozen=True)
class MacroTemplate:
    """A parsed ``%AM`` aperture macro.

    ``statements`` holds ``("=", n, expr)`` variable assignments and
    ``("p", code, (expr, ...))`` primitives in file order.
    """

    name: str
    statements: tuple[tuple[str, int, Expr | tuple[Expr, ...]], ...]


def parse_macro(name: str, blocks: Sequence[str], *, max_depth: int = 64) -> MacroTemplate:
    """Parse the body blocks of ``%AM<name>*<block>*...%`` into a template.

    Parameters
    ----------
    name : str
        Macro name.
    blocks : sequence of str
        The ``*``-separated blocks after the name, whitespace already handled
        (comment blocks start with ``0``).
    max_depth : int
        Expression nesting limit.

    Raises
    ------
    MacroError
        On an unknown primitive code or a malformed block.
    """
    stmts: list[tuple[str, int, Expr | tuple[Expr, ...]]] = []
    for raw in blocks:
        block = raw.strip()
        if not block:
            continue
        if block[0] == "0" and (len(block) == 1 or not block[1].isdigit()) and "," not in block[:2]:
            continue  # comment primitive: "0 text"
        block = re.sub(r"\s+", "", block)
        if block.startswith("$"):
            m = re.fullmatch(r"\$(\d+)=(.+)", block)
            if m is None:
                msg = f"macro variable definition must look like $n=expression; got {block!r}"
                raise MacroError(msg)
            stmts.append(
                ("=", int(m.group(1)), compile_expression(m.group(2), max_depth=max_depth))
            )
            continue
        fields = block.split(",")
        try:
            code = int(fields[0])
        except ValueError:
            msg = f"macro primitive code must be an integer; got {fields[0]!r} in {block!r}"
            raise MacroError(msg) from None
        if code == 0:
            continue
        if code not in _PRIMITIVES:
            msg = (
                "macro primitive code must be one of 0, 1, 2, 4, 5, 6, 7, 20, 21, 22; "
                f"got {code} in macro {name!r}"
            )
            raise MacroError(msg)
        exprs = tuple(compile_expression(f, max_depth=max_depth) for f in fields[1:] if f != "")
        stmts.append(("p", code, exprs))
    return MacroTemplate(name, tuple(stmts))


def _rotate(ring: FloatArray, deg: float) -> FloatArray:
    if deg == 0.0 or len(ring) == 0:
        return ring
    a = math.radians(deg)
    c = math.cos(a)
    s = math.sin(a)
    return np.column_stack([c * ring[:, 0] - s * ring[:, 1], s * ring[:, 0] + c * ring[:, 1]])


def _need(code: int, vals: Sequence[float], n: int, macro: str) -> None:
    if len(vals) < n:
        pname = _PRIMITIVES[code][0]
        msg = (
            f"macro {macro!r} primitive {code} ({pname}) must have at least {n} parameters; "
            f"got {len(vals)}"
        )
        raise MacroError(msg)


def macro_parts(template: MacroTemplate, args: Sequence[float], unit_mm: float) -> list[Part]:
    """Evaluate a macro with the ``%AD`` parameters into aperture parts.

    Parameters
    ----------
    template : MacroTemplate
        The parsed macro.
    args : sequence of float
        ``$1, $2, ...`` as given by the aperture definition, in file units.
    unit_mm : float
        Millimetres per file unit (1 or 25.4); lengths are scaled by it, angles not.

    Returns
    -------
    list of (bool, ndarray (n, 2))
        ``(dark, ring)`` in drawing order; exposure off gives a clear part.
    """
    var: dict[int, float] = {i + 1: float(a) for i, a in enumerate(args)}
    parts: list[Part] = []
    u = unit_mm
    for kind, num, payload in template.statements:
        if kind == "=":
            assert callable(payload)
            var[num] = payload(var)
            continue
        assert isinstance(payload, tuple)
        vals = [e(var) for e in payload]
        code = num
        name = template.name
        if code == 1:
            _need(code, vals, 4, name)
            dark = vals[0] >= 0.5
            rot = vals[4] if len(vals) > 4 else 0.0
            d = abs(vals[1]) * u
            if d > 0.0:
                parts.append((dark, _rotate(circle_ring(vals[2] * u, vals[3] * u, 0.5 * d), rot)))
        elif code in (2, 20):
            _need(code, vals, 7, name)
            ring = segment_rect_ring(
                vals[2] * u, vals[3] * u, vals[4] * u, vals[5] * u, vals[1] * u
            )
            if len(ring):
                parts.append((vals[0] >= 0.5, _rotate(ring, vals[6])))
        elif code == 21:
            _need(code, vals, 6, name)
            w, h = vals[1] * u, vals[2] * u
            if w > 0.0 and h > 0.0:
                ring = rect_ring(vals[3] * u, vals[4] * u, w, h)
                parts.append((vals[0] >= 0.5, _rotate(ring, vals[5])))
        elif code == 22:
            _need(code, vals, 6, name)
            w, h = vals[1] * u, vals[2] * u
            if w > 0.0 and h > 0.0:
                ring = rect_ring(vals[3] * u + 0.5 * w, vals[4] * u + 0.5 * h, w, h)
                parts.append((vals[0] >= 0.5, _rotate(ring, vals[5])))
        elif code == 4:
            _need(code, vals, 5, name)
            n = round(vals[1])
            if n < 1:
                msg = f"macro {name!r} outline vertex count must be >= 1; got {vals[1]}"
                raise MacroError(msg)
            need = 2 + 2 * (n + 1)
            _need(code, vals, need, name)
            rot = vals[need] if len(vals) > need else 0.0
            pts = np.asarray(vals[2:need], dtype=np.float64).reshape(-1, 2) * u
            if not np.array_equal(pts[0], pts[-1]):
                pts = np.vstack([pts, pts[:1]])
            parts.append((vals[0] >= 0.5, _rotate(pts, rot)))
        elif code == 5:
            _need(code, vals, 6, name)
            n = round(vals[1])
            if not 3 <= n <= 12:
                msg = f"macro {name!r} polygon vertex count must be 3..12; got {vals[1]}"
                raise MacroError(msg)
            rot = vals[5]
            ring = polygon_ring(vals[2] * u, vals[3] * u, abs(vals[4]) * u, n, 0.0)
            parts.append((vals[0] >= 0.5, _rotate(ring, rot)))
        elif code == 6:
            _need(code, vals, 9, name)
            parts.extend((True, _rotate(r, vals[8])) for r in _moire(vals, u))
        else:  # 7, thermal
            _need(code, vals, 6, name)
            cx, cy, od, idia, gap, rot = vals[:6]
            if not (od > idia >= 0.0 and gap >= 0.0):
                msg = (
                    f"macro {name!r} thermal must have outer > inner >= 0 and gap >= 0; "
                    f"got outer {od}, inner {idia}, gap {gap}"
                )
                raise MacroError(msg)
            for ring in thermal_rings(cx * u, cy * u, od * u, idia * u, gap * u):
                parts.append((True, _rotate(ring, rot)))
    return parts


def _moire(vals: Sequence[float], u: float) -> list[FloatArray]:
    """Moiré primitive (deprecated): concentric rings plus a cross hair, not rotated."""
    cx, cy = vals[0] * u, vals[1] * u
    outer = vals[2] * u
    thick = vals[3] * u
    gap = vals[4] * u
    max_rings = round(vals[5])
    ch_thick = vals[6] * u
    ch_len = vals[7] * u
    rings: list[FloatArray] = []
    d = outer
    for _ in range(max(max_rings, 0)):
        if d <= 0.0:
            break
        rings.extend(annulus_parts(cx, cy, d, max(d - 2.0 * thick, 0.0)))
        d -= 2.0 * (thick + gap)
    if ch_thick > 0.0 and ch_len > 0.0:
        rings.append(rect_ring(cx, cy, ch_len, ch_thick))
        rings.append(rect_ring(cx, cy, ch_thick, ch_len))
    return rings


def standard_parts(
    template: str, params: Sequence[float], unit_mm: float
) -> tuple[list[Part], float | None, bool]:
    """Parts of a standard aperture ``C``, ``R``, ``O`` or ``P``.

    Parameters
    ----------
    template : {"C", "R", "O", "P"}
        Standard template name.
    params : sequence of float
        Parameters of the ``%AD`` statement in file units (``P``: outer diameter,
        vertices, rotation in degrees, hole).
    unit_mm : float
        Millimetres per file unit.

    Returns
    -------
    parts : list of (bool, ndarray (n, 2))
        Dark outline, then the clear hole if any.
    circle_diameter_mm : float or None
        Diameter of a hole-less circle, else None.
    legacy_hole : bool
        True when a rectangular hole (two hole parameters, deprecated) was given.

    Raises
    ------
    MacroError
        On a wrong parameter count or negative sizes.
    """
    u = unit_mm
    p = list(params)
    counts = {"C": (1, 3), "R": (2, 4), "O": (2, 4), "P": (2, 5)}
    lo, hi = counts[template]
    if not lo <= len(p) <= hi:
        msg = f"aperture template {template} must have {lo} to {hi} parameters; got {len(p)}"
        raise MacroError(msg)
    if any(v < 0.0 for i, v in enumerate(p) if not (template == "P" and i == 2)):
        msg = f"aperture template {template} sizes must not be negative; got {p}"
        raise MacroError(msg)
    parts: list[Part] = []
    if template == "C":
        d = p[0] * u
        hole = p[1:]
        if d > 0.0:
            parts.append((True, circle_ring(0.0, 0.0, 0.5 * d)))
    elif template in ("R", "O"):
        w, h = p[0] * u, p[1] * u
        hole = p[2:]
        if w > 0.0 and h > 0.0:
            parts.append(
                (True, rect_ring(0.0, 0.0, w, h) if template == "R" else obround_ring(w, h))
            )
    else:
        d = p[0] * u
        n = round(p[1])
        if not 3 <= n <= 12:
            msg = f"polygon aperture vertex count must be 3..12; got {p[1]}"
            raise MacroError(msg)
        rot = p[2] if len(p) > 2 else 0.0
        hole = p[3:]
        if d > 0.0:
            parts.append((True, polygon_ring(0.0, 0.0, d, n, rot)))
    legacy = len(hole) == 2
    if len(hole) == 1 and hole[0] > 0.0:
        parts.append((False, circle_ring(0.0, 0.0, 0.5 * hole[0] * u)))
    elif legacy and hole[0] > 0.0 and hole[1] > 0.0:
        parts.append((False, rect_ring(0.0, 0.0, hole[0] * u, hole[1] * u)))
    circle_d = p[0] * u if template == "C" and not any(h > 0.0 for h in hole) else None
    return parts, circle_d, legacy

"""Layer identification: what each Gerber file is, and the copper order top to bottom.

Pure functions over plain inputs (file name, file attributes, first comments, an optional
layer map from the configuration); nothing here reads files.

Evidence is taken in this order, the first that speaks deciding (the configuration map
overrides all of them when it names the file):

1. ``x2-attribute``: a real ``%TF.FileFunction`` attribute;
2. ``x2-comment``: the same attribute written inside a ``G04 #@! TF.FileFunction,...``
   comment (files written in the "X1-compatible" way);
3. ``layer-comment``: a ``G04 Layer: <name>*`` comment naming the layer in words
   (e.g. ``TopLayer``, ``BottomSolderMaskLayer``), or an ``%IN``/``%LN`` name statement
   passed in as the comment ``"IN <name>"``/``"LN <name>"``;
4. ``physical-order-comment``: ``G04 Layer_Physical_Order=<n>*`` (copper only, 1 = top);
5. ``extension``: the three-letter extension convention (``.gtl`` top copper, ``.gbl``
   bottom copper, ``.g<n>`` inner copper n, ``.gp<n>`` negative plane n, ``.gko`` outline,
   ``.gts``/``.gbs`` mask, ``.gtp``/``.gbp`` paste, ``.gto``/``.gbo`` legend, ``.gm<n>``
   mechanical, ``.gpt``/``.gpb`` pad masters, ...);
6. ``file-name``: words in the file name (``F_Cu``, ``In1_Cu``, ``Top Layer``, ``Int2``,
   ``Edge_Cuts``, ``drl_map`` ...);
7. ``config``: the ``[layers]`` map (overrides everything when it names the file).

Extension numbers and inner-layer numbers in names give only a *relative* order of the
inner layers (one generator numbers the first inner layer ``.g1``, another ``.g2``);
:func:`order_copper_layers` turns the evidence of all files into consecutive physical
indices, top = 1.
"""

from __future__ import annotations

import re
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, replace
from fnmatch import fnmatchcase
from pathlib import PurePosixPath
from typing import Literal

from fluxshadow.errors import ConfigError, Notice

__all__ = [
    "IDENTIFIED_BY",
    "IdentifiedBy",
    "LayerFunction",
    "LayerIdentity",
    "LayerSpec",
    "Polarity",
    "PolarityFrom",
    "Side",
    "identify_layer",
    "match_layer_spec",
    "order_copper_layers",
    "parse_file_function",
    "parse_layer_spec",
]

LayerFunction = Literal[
    "copper", "outline", "soldermask", "paste", "legend", "drill-map", "mechanical", "other"
]
Side = Literal["top", "inner", "bottom"]
Polarity = Literal["positive", "negative"]
IdentifiedBy = Literal[
    "x2-attribute",
    "x2-comment",
    "layer-comment",
    "physical-order-comment",
    "extension",
    "file-name",
    "config",
]
PolarityFrom = Literal["x2-attribute", "x2-comment", "extension", "config", "default", "geometry"]
"""How polarity was decided; ``"geometry"`` is left for the board model, which detects
unmarked negative planes from their artwork."""

IDENTIFIED_BY: tuple[IdentifiedBy, ...] = (
    "config",
    "x2-attribute",
    "x2-comment",
    "layer-comment",
    "physical-order-comment",
    "extension",
    "file-name",
)
"""All ``identified_by`` values, strongest evidence first (the order used to settle
conflicts between files)."""

_STRENGTH = {by: i for i, by in enumerate(IDENTIFIED_BY)}

_FUNCTIONS: tuple[LayerFunction, ...] = (
    "copper",
    "outline",
    "soldermask",
    "paste",
    "legend",
    "drill-map",
    "mechanical",
    "other",
)


@dataclass(frozen=True, kw_only=True)
class LayerIdentity:
    """What one Gerber file is.

    Attributes
    ----------
    file : str
        The file as given (usually the path relative to the package root).
    function : {"copper", "outline", "soldermask", "paste", "legend", "drill-map", \
"mechanical", "other"}
    side : {"top", "inner", "bottom"} or None
        For copper: position class; for masks, paste and legend: the board side;
        ``None`` when unknown or not applicable.
    index : int or None
        Copper only: physical index, 1 = top, when known. :func:`order_copper_layers`
        fills it in (consecutively) for every copper layer it keeps.
    polarity : {"positive", "negative"}
        ``"negative"`` means the artwork shows where copper is *absent* (a negative plane:
        clearances drawn dark, the fabricator inverts it).
    polarity_from : str
        How polarity was decided: ``"x2-attribute"``, ``"x2-comment"`` (FilePolarity),
        ``"extension"`` (``.gp<n>``), ``"config"`` or ``"default"`` (nothing said; the board
        model may still detect an unmarked negative plane and report ``"geometry"``).
    identified_by : str
        One of :data:`IDENTIFIED_BY`: the evidence that decided ``function``/``side``/
        ``index``.
    detail : str
        Human-readable account of the evidence, for ``fluxshadow stack``.
    rank : int or None
        Relative order of an inner copper layer from its extension or name number
        (``.g2``, ``In1_Cu``, ``Int3``), kept even when stronger evidence decided ``index``.
    notices : tuple of Notice
        Contradictions found in this file's evidence, or (after ordering) with other files.
    """

    file: str
    function: LayerFunction
    side: Side | None
    index: int | None
    polarity: Polarity
    polarity_from: PolarityFrom
    identified_by: IdentifiedBy
    detail: str
    rank: int | None = None
    notices: tuple[Notice, ...] = ()


@dataclass(frozen=True, kw_only=True)
class LayerSpec:
    """A parsed ``[layers]`` configuration value such as ``"copper:2, negative"``.

    ``function`` is ``None`` for ``"ignore"`` (the file is then reported as ``other``).
    """

    function: LayerFunction | None
    side: Side | None = None
    index: int | None = None
    polarity: Polarity | None = None
    text: str = ""


@dataclass(frozen=True, kw_only=True)
class _Claim:
    """What one piece of evidence says about a file."""

    function: LayerFunction
    side: Side | None
    index: int | None
    by: IdentifiedBy
    detail: str
    rank: int | None = None
    negative: bool | None = None


# --------------------------------------------------------------------------- parsing


def parse_layer_spec(text: str) -> LayerSpec:
    """Parse a ``[layers]`` value.

    Grammar: ``<function>[:<where>][, <polarity>]`` where ``<function>`` is one of
    ``copper``, ``outline``, ``soldermask``, ``paste``, ``legend``, ``drill-map``,
    ``mechanical``, ``other`` or ``ignore``; ``<where>`` is a copper index (``1`` = top),
    ``top`` or ``bottom``; ``<polarity>`` is ``negative`` or ``positive``. Copper needs a
    ``<where>``.

    Raises
    ------
    ConfigError
        When the text does not follow the grammar (message without file prefix; the
        configuration reader adds the key path and file).
    """
    raw = text
    words = [w for w in re.split(r"[,\s]+", text.strip().lower()) if w]
    polarity: Polarity | None = None
    rest: list[str] = []
    for w in words:
        if w in ("negative", "positive"):
            if polarity is not None:
                msg = f"layer spec must give polarity at most once; got {raw!r}"
                raise ConfigError(msg)
            polarity = "negative" if w == "negative" else "positive"
        else:
            rest.append(w)
    expected = (
        '"copper:<n>", "copper:top", "copper:bottom", "outline", "soldermask:top", ... '
        'or "ignore", optionally followed by ", negative"'
    )
    if len(rest) != 1:
        msg = f"layer spec must be {expected}; got {raw!r}"
        raise ConfigError(msg)
    head, _, where = rest[0].partition(":")
    if head == "ignore":
        if where or polarity is not None:
            msg = f"layer spec 'ignore' must stand alone; got {raw!r}"
            raise ConfigError(msg)
        return LayerSpec(function=None, text=raw)
    function = next((f for f in _FUNCTIONS if f == head), None)
    if function is None:
        msg = f"layer spec must be {expected}; got {raw!r}"
        raise ConfigError(msg)
    side: Side | None = None
    index: int | None = None
    if where in ("top", "bottom"):
        side = "top" if where == "top" else "bottom"
        index = 1 if side == "top" and function == "copper" else None
    elif where.isdigit() and function == "copper":
        index = int(where)
        if index < 1:
            msg = f"copper layer index must be a whole number >= 1 (1 = top); got {raw!r}"
            raise ConfigError(msg)
        side = "top" if index == 1 else None
    elif where:
        msg = f"layer spec place must be top, bottom or (for copper) a number; got {raw!r}"
        raise ConfigError(msg)
    if function == "copper" and not where:
        msg = (
            'copper layer spec must say where: "copper:<n>", "copper:top" or '
            f'"copper:bottom"; got {raw!r}'
        )
        raise ConfigError(msg)
    return LayerSpec(function=function, side=side, index=index, polarity=polarity, text=raw)


def match_layer_spec(file: str, config_map: Mapping[str, str] | None) -> tuple[str, str] | None:
    """Find the ``[layers]`` entry that names ``file``.

    An exact (case-insensitive) match of the whole relative path or of the base name wins;
    otherwise the first glob pattern (in map order) that matches either. Returns
    ``(key, value)`` or ``None``.
    """
    if not config_map:
        return None
    path = file.replace("\\", "/").lower()
    base = PurePosixPath(path).name
    for key, value in config_map.items():
        k = key.replace("\\", "/").lower()
        if k in (path, base):
            return key, value
    for key, value in config_map.items():
        k = key.replace("\\", "/").lower()
        if fnmatchcase(path, k) or fnmatchcase(base, k):
            return key, value
    return None


def parse_file_function(value: str) -> tuple[LayerFunction, Side | None, int | None]:
    """Map a ``.FileFunction`` value to (function, side, copper index).

    Follows the standard file attribute ``.FileFunction`` of the Gerber Layer Format
    Specification (values such as ``Copper,L2,Inr,Plane``, ``Profile,NP``,
    ``Soldermask,Top``, ``Legend,Bot``, ``Paste,Top``, ``Drillmap``,
    ``AssemblyDrawing,Top``, ``Other,Comment``).
    """
    fields = [f.strip() for f in value.split(",")]
    kind = fields[0].lower() if fields else ""
    pos = {"top": "top", "bot": "bottom", "inr": "inner"}
    if kind == "copper":
        index: int | None = None
        side: Side | None = None
        for f in fields[1:]:
            m = re.fullmatch(r"[Ll](\d+)", f)
            if m and index is None:
                index = int(m.group(1))
            elif f.lower() in pos:
                side = "top" if f.lower() == "top" else "bottom" if f.lower() == "bot" else "inner"
        return "copper", side, index
    side2: Side | None = None
    if len(fields) > 1 and fields[1].lower() in ("top", "bot"):
        side2 = "top" if fields[1].lower() == "top" else "bottom"
    if kind in ("profile", "keepout"):
        return "outline", None, None
    if kind == "soldermask":
        return "soldermask", side2, None
    if kind == "paste":
        return "paste", side2, None
    if kind == "legend":
        return "legend", side2, None
    if kind == "drillmap":
        return "drill-map", None, None
    if kind in (
        "assemblydrawing",
        "fabricationdrawing",
        "arraydrawing",
        "otherdrawing",
        "vcutmap",
        "vcut",
        "depthrout",
        "component",
    ):
        return "mechanical", side2, None
    return "other", side2, None


# --------------------------------------------------------------------------- evidence


def _clean_comment(text: str) -> str:
    """Strip ``G04`` and the closing ``*`` so comments compare the same however given."""
    s = text.strip()
    if s[:3].upper() == "G04":
        s = s[3:]
    s = s.strip()
    return s.removesuffix("*").strip()


_RE_X2_COMMENT = re.compile(r"^#@!\s*TF\.?([A-Za-z_][\w.]*)\s*,?\s*(.*)$")
_RE_LAYER_COMMENT = re.compile(r"^Layer(?:[ _]?Name)?\s*[:=]\s*(\S.*)$", re.IGNORECASE)
# Image/layer name statements (%IN..*%, %LN..*%) as a header reader reports them.
_RE_NAME_STATEMENT = re.compile(r"^%?(?:IN|LN)\s+(\S.*?)\*?%?$")
_RE_PHYSICAL = re.compile(r"^Layer_Physical_Order\s*=\s*(\d+)", re.IGNORECASE)


def _attributes(
    file_attributes: Mapping[str, str] | None, comments: Sequence[str]
) -> dict[str, tuple[str, IdentifiedBy]]:
    """Merge real and comment X2 file attributes, remembering where each came from."""
    from_comments: dict[str, str] = {}
    for c in comments:
        m = _RE_X2_COMMENT.match(c)
        if m:
            from_comments.setdefault(m.group(1).lstrip("."), m.group(2).strip())
    out: dict[str, tuple[str, IdentifiedBy]] = {}
    for name, value in (file_attributes or {}).items():
        key = name.lstrip(".")
        by: IdentifiedBy = "x2-comment" if key in from_comments else "x2-attribute"
        out[key] = (value, by)
    for key, value in from_comments.items():
        out.setdefault(key, (value, "x2-comment"))
    return out


def _camel_words(text: str) -> str:
    """Lower-case words of a name: camel case and separators split, digits kept on words."""
    s = re.sub(r"(?<=[a-z])(?=[A-Z])", " ", text)
    s = re.sub(r"[^A-Za-z0-9]+", " ", s)
    return " " + s.lower().strip() + " "


def _words_claim(text: str, by: IdentifiedBy, what: str) -> _Claim | None:
    """Classify a layer name given in words (a layer comment or part of a file name)."""
    w = _camel_words(text)

    def has(*patterns: str) -> bool:
        return any(re.search(rf" {p} ", w) for p in patterns)

    side: Side | None = None
    if has("top", "front", "f"):
        side = "top"
    if has("bottom", "bot", "back", "b"):
        side = "bottom" if side is None else None
    detail = f"{what} {text.strip()!r}"
    if has(r"drl map", r"drill map", "drillmap", r"drill drawing", r"drill guide"):
        return _Claim(function="drill-map", side=None, index=None, by=by, detail=detail)
    if has(r"edge cuts", r"edge", "outline", "profile", r"board edge", "keepout", r"keep out"):
        return _Claim(function="outline", side=None, index=None, by=by, detail=detail)
    if has("paste", "cream", "stencil"):
        return _Claim(function="paste", side=side, index=None, by=by, detail=detail)
    if has("mask", "soldermask", "solder", "resist"):
        return _Claim(function="soldermask", side=side, index=None, by=by, detail=detail)
    if has("silk", "silks", "silkscreen", "legend", "overlay"):
        return _Claim(function="legend", side=side, index=None, by=by, detail=detail)
    if has(
        "mechanical",
        r"mech\d*",
        "document",
        "documentation",
        "fab",
        "fabrication",
        "assembly",
        "courtyard",
        "crtyd",
        "drawing",
        "notes",
        "dwgs",
        "cmts",
        "user",
    ):
        return _Claim(function="mechanical", side=side, index=None, by=by, detail=detail)
    m = re.search(r" (?:in|inner|int|internal|mid|midlayer|inner layer|mid layer)(\d+) ", w)
    if m is None:
        m = re.search(r" (?:inner|internal|mid) (?:layer )?(\d+) ", w)
    copperish = has("cu", "copper", "signal", "layer", "plane", "route", "conductor")
    if m is not None and (copperish or re.search(r" (?:in|int|inner)\d+ ", w)):
        n = int(m.group(1))
        return _Claim(function="copper", side="inner", index=None, by=by, detail=detail, rank=n)
    if side is not None and copperish:
        return _Claim(function="copper", side=side, index=_side_index(side), by=by, detail=detail)
    return None


def _side_index(side: Side) -> int | None:
    """Physical index implied by a copper side alone (1 for top; otherwise unknown)."""
    return 1 if side == "top" else None


_EXT_SIMPLE: dict[str, tuple[LayerFunction, Side | None, str]] = {
    "gtl": ("copper", "top", "top copper"),
    "gbl": ("copper", "bottom", "bottom copper"),
    "cmp": ("copper", "top", "component-side copper"),
    "sol": ("copper", "bottom", "solder-side copper"),
    "gko": ("outline", None, "keep-out layer, taken as the board outline"),
    "gts": ("soldermask", "top", "top solder mask"),
    "gbs": ("soldermask", "bottom", "bottom solder mask"),
    "stc": ("soldermask", "top", "top solder mask"),
    "sts": ("soldermask", "bottom", "bottom solder mask"),
    "gtp": ("paste", "top", "top paste"),
    "gbp": ("paste", "bottom", "bottom paste"),
    "crc": ("paste", "top", "top paste"),
    "crs": ("paste", "bottom", "bottom paste"),
    "gto": ("legend", "top", "top legend"),
    "gbo": ("legend", "bottom", "bottom legend"),
    "plc": ("legend", "top", "top legend"),
    "pls": ("legend", "bottom", "bottom legend"),
    "gpt": ("other", "top", "top pad master (not copper)"),
    "gpb": ("other", "bottom", "bottom pad master (not copper)"),
    "gml": ("mechanical", None, "multi-layer/mill drawing (not used as outline)"),
    "gdl": ("mechanical", None, "document/drawing layer"),
}


def _extension_claim(name: str) -> _Claim | None:
    """Classify by the extension convention."""
    suffix = PurePosixPath(name).suffix.lower().lstrip(".")
    stem = PurePosixPath(name).stem
    shown = f"extension .{PurePosixPath(name).suffix.lstrip('.')}"
    if suffix in _EXT_SIMPLE:
        function, side, what = _EXT_SIMPLE[suffix]
        return _Claim(
            function=function,
            side=side,
            index=1 if (function == "copper" and side == "top") else None,
            by="extension",
            detail=f"{shown} ({what})",
        )
    m = re.fullmatch(r"g(\d+)", suffix)
    if m:
        n = int(m.group(1))
        return _Claim(
            function="copper",
            side="inner",
            index=None,
            by="extension",
            detail=f"{shown} (inner copper, relative order {n})",
            rank=n,
        )
    m = re.fullmatch(r"gp(\d+)", suffix)
    if m:
        n = int(m.group(1))
        return _Claim(
            function="copper",
            side="inner",
            index=None,
            by="extension",
            detail=f"{shown} (negative inner plane {n})",
            rank=n,
            negative=True,
        )
    m = re.fullmatch(r"gm(\d+)", suffix)
    if m:
        words = _camel_words(stem)
        if re.search(r" (edge cuts|outline|profile|board edge) ", words):
            return _Claim(
                function="outline",
                side=None,
                index=None,
                by="extension",
                detail=f"{shown} with an outline name",
            )
        return _Claim(
            function="mechanical",
            side=None,
            index=None,
            by="extension",
            detail=f"{shown} (mechanical layer {m.group(1)}; name the outline in [layers] "
            "if it is one)",
        )
    m = re.fullmatch(r"g[dg](\d+)", suffix)
    if m:
        return _Claim(
            function="drill-map",
            side=None,
            index=None,
            by="extension",
            detail=f"{shown} (drill drawing/guide)",
        )
    return None


def _name_claim(name: str) -> _Claim | None:
    """Classify by words in the file name: the part after the last ``-`` first."""
    stem = PurePosixPath(name).stem
    if "-" in stem:
        tail = stem.rsplit("-", 1)[1]
        claim = _words_claim(tail, "file-name", "file name part")
        if claim is not None:
            return claim
    return _words_claim(stem, "file-name", "file name")


def _config_claim(file: str, config_map: Mapping[str, str] | None) -> _Claim | None:
    hit = match_layer_spec(file, config_map)
    if hit is None:
        return None
    key, value = hit
    spec = parse_layer_spec(value)
    detail = f"[layers] {key!r} = {value!r}"
    if spec.function is None:
        return _Claim(
            function="other", side=None, index=None, by="config", detail=detail + " (ignored)"
        )
    negative = None if spec.polarity is None else spec.polarity == "negative"
    return _Claim(
        function=spec.function,
        side=spec.side,
        index=spec.index,
        by="config",
        detail=detail,
        negative=negative,
    )


def _describe(c: _Claim) -> str:
    if c.function != "copper":
        return c.function + (f" ({c.side})" if c.side else "")
    where = f"L{c.index}" if c.index is not None else (c.side or "position unknown")
    return f"copper {where}"


def _contradiction(chosen: _Claim, other: _Claim) -> str | None:
    """Say how ``other`` contradicts ``chosen`` (copper-relevant differences only)."""
    if (chosen.function == "copper") != (other.function == "copper"):
        return f"{other.by} says {_describe(other)}"
    if chosen.function != "copper":
        return None
    if chosen.index is not None and other.index is not None and chosen.index != other.index:
        return f"{other.by} says {_describe(other)}"
    if chosen.side is not None and other.side is not None and chosen.side != other.side:
        return f"{other.by} says {_describe(other)}"
    if (chosen.index == 1 and other.side in ("inner", "bottom")) or (
        other.index == 1 and chosen.side in ("inner", "bottom")
    ):
        return f"{other.by} says {_describe(other)}"
    return None


def identify_layer(
    file: str,
    *,
    file_attributes: Mapping[str, str] | None = None,
    comments: Sequence[str] = (),
    config_map: Mapping[str, str] | None = None,
) -> LayerIdentity:
    """Decide what one Gerber file is.

    Parameters
    ----------
    file : str
        File path as it should be reported (relative to the package root is best); its
        base name and extension are evidence.
    file_attributes : mapping of str to str, optional
        X2 file attributes, names without the leading dot (``{"FileFunction":
        "Copper,L2,Inr", "FilePolarity": "Negative"}``), from real ``%TF`` or from
        ``G04 #@!`` comments.
    comments : sequence of str
        The first ``G04`` comments, with or without the ``G04``/``*`` framing.
    config_map : mapping of str to str, optional
        The ``[layers]`` map: file name or glob -> spec (see :func:`parse_layer_spec`).

    Returns
    -------
    LayerIdentity
        With ``notices`` for contradictions between pieces of evidence (the strongest
        evidence is kept).

    Raises
    ------
    ConfigError
        When the matching ``[layers]`` value is malformed.
    """
    name = PurePosixPath(file.replace("\\", "/")).name
    clean = tuple(_clean_comment(c) for c in comments)
    attrs = _attributes(file_attributes, clean)
    claims: list[_Claim] = []

    if "FileFunction" in attrs:
        value, by = attrs["FileFunction"]
        function, side, index = parse_file_function(value)
        where = "%TF attribute" if by == "x2-attribute" else "G04 #@! comment"
        claims.append(
            _Claim(
                function=function,
                side=side,
                index=index,
                by=by,
                detail=f"FileFunction {value} ({where})",
            )
        )
    for c in clean:
        m = _RE_LAYER_COMMENT.match(c)
        if m and not c.lower().startswith(("layer_color", "layer_physical")):
            claim = _words_claim(m.group(1), "layer-comment", "layer comment")
        else:
            m = _RE_NAME_STATEMENT.match(c)
            claim = _words_claim(m.group(1), "layer-comment", "layer name") if m else None
        if claim is not None:
            claims.append(claim)
            break
    for c in clean:
        m = _RE_PHYSICAL.match(c)
        if m:
            n = int(m.group(1))
            claims.append(
                _Claim(
                    function="copper",
                    side="top" if n == 1 else None,
                    index=n,
                    by="physical-order-comment",
                    detail=f"Layer_Physical_Order={n}",
                )
            )
            break
    ext = _extension_claim(name)
    named = _name_claim(name)
    if ext is not None:
        if (
            named is not None
            and ext.function == "copper"
            and ext.side == "inner"
            and named.function == "copper"
            and named.rank is not None
        ):
            # ".g2" with "In1_Cu" in the name: the name's number is the layer's own.
            claims.append(
                replace(
                    named,
                    negative=ext.negative,
                    detail=f"{ext.detail}; inner order {named.rank} from {named.detail}",
                )
            )
        claims.append(ext)
    if named is not None:
        claims.append(named)

    config = _config_claim(file, config_map)
    if config is not None:
        claims.insert(0, config)

    notices: list[Notice] = []
    if not claims:
        chosen = _Claim(
            function="other",
            side=None,
            index=None,
            by="file-name",
            detail="no attribute, comment, extension or name says what this file is",
        )
    else:
        chosen = claims[0]
        if chosen.by != "config":
            seen: set[str] = set()
            for other in claims[1:]:
                why = _contradiction(chosen, other)
                if why and why not in seen:
                    seen.add(why)
                    notices.append(
                        Notice(
                            file=file,
                            line=None,
                            message=f"layer evidence disagrees: {chosen.by} says "
                            f"{_describe(chosen)} but {why}; kept {chosen.by}",
                        )
                    )
    rank = next((c.rank for c in claims if c.rank is not None), None)
    agreeing = [
        c.by
        for c in claims[1:]
        if c.by != chosen.by and _contradiction(chosen, c) is None and c.function == chosen.function
    ]
    detail = chosen.detail
    if agreeing:
        detail += "; agrees: " + ", ".join(dict.fromkeys(agreeing))

    polarity, polarity_from, pol_notice = _polarity(file, chosen, claims, attrs)
    if pol_notice is not None:
        notices.append(pol_notice)
    side = chosen.side
    index = chosen.index if chosen.function == "copper" else None
    return LayerIdentity(
        file=file,
        function=chosen.function,
        side=side,
        index=index,
        polarity=polarity,
        polarity_from=polarity_from,
        identified_by=chosen.by,
        detail=detail,
        rank=rank if chosen.function == "copper" else None,
        notices=tuple(notices),
    )


def _polarity(
    file: str,
    chosen: _Claim,
    claims: Sequence[_Claim],
    attrs: Mapping[str, tuple[str, IdentifiedBy]],
) -> tuple[Polarity, PolarityFrom, Notice | None]:
    """Decide polarity: config, then FilePolarity, then a ``.gp<n>`` extension."""
    ext_negative = any(c.by == "extension" and c.negative for c in claims)
    if chosen.by == "config" and chosen.negative is not None:
        return ("negative" if chosen.negative else "positive"), "config", None
    if "FilePolarity" in attrs:
        value, by = attrs["FilePolarity"]
        negative = value.strip().lower().startswith("neg")
        notice = None
        if ext_negative and not negative:
            notice = Notice(
                file=file,
                line=None,
                message=f"polarity evidence disagrees: FilePolarity {value} but the "
                ".gp<n> extension marks a negative plane; kept FilePolarity",
            )
        src: PolarityFrom = "x2-attribute" if by == "x2-attribute" else "x2-comment"
        return ("negative" if negative else "positive"), src, notice
    if ext_negative:
        return "negative", "extension", None
    return "positive", "default", None


# --------------------------------------------------------------------------- ordering


def _claims_slots(layer: LayerIdentity) -> set[str]:
    slots: set[str] = set()
    if layer.index is not None:
        slots.add(f"L{layer.index}")
    elif layer.side == "top":
        slots.add("L1")
    if layer.side == "bottom":
        slots.add("bottom")
    if layer.index is None and layer.side in ("inner", None) and layer.rank is not None:
        slots.add(f"rank{layer.rank}")
    return slots


def _strength_key(layer: LayerIdentity) -> tuple[int, str]:
    return (_STRENGTH[layer.identified_by], layer.file)


def order_copper_layers(identities: Sequence[LayerIdentity]) -> list[LayerIdentity]:
    """Copper layers top to bottom with consecutive indices (1 = top).

    Non-copper identities are ignored. Files that claim the same place (two files both
    top, both ``L2``, both bottom, or both the same relative inner number) are settled by
    the stronger evidence (:data:`IDENTIFIED_BY` order, then file name); the other file is
    left out and a notice on the kept one names both. Places given absolutely (X2 index,
    physical-order comment, config, top/bottom) are kept; inner layers known only by a
    relative number fill the remaining places in that order.

    Parameters
    ----------
    identities : sequence of LayerIdentity

    Returns
    -------
    list of LayerIdentity
        Copies with ``index`` set to 1..n and ``side`` set from the position (top, inner,
        bottom; a one-layer board is top), notices appended.
    """
    copper = sorted((i for i in identities if i.function == "copper"), key=_strength_key)
    if not copper:
        return []
    extra: dict[str, list[Notice]] = {c.file: [] for c in copper}
    kept: list[LayerIdentity] = []
    taken: dict[str, LayerIdentity] = {}
    for layer in copper:
        clash = next((taken[s] for s in sorted(_claims_slots(layer)) if s in taken), None)
        if clash is not None:
            where = sorted(_claims_slots(layer) & _claims_slots(clash))
            extra[clash.file].append(
                Notice(
                    file=clash.file,
                    line=None,
                    message=f"{clash.file} and {layer.file} both claim copper "
                    f"{', '.join(where)}; kept {clash.file} ({clash.identified_by}), left out "
                    f"{layer.file} ({layer.identified_by})",
                )
            )
            continue
        for s in _claims_slots(layer):
            taken[s] = layer
        kept.append(layer)

    n = len(kept)
    slot_of: dict[str, int] = {}
    order_notices: list[Notice] = []
    absolute = [k for k in kept if k.index is not None or k.side == "top"]
    bottoms = [k for k in kept if k.index is None and k.side == "bottom"]
    relative = [k for k in kept if k not in absolute and k not in bottoms]
    used: set[int] = set()
    consistent = True
    for k in absolute:
        idx = k.index if k.index is not None else 1
        if idx < 1 or idx > n or idx in used:
            consistent = False
            break
        if k.side == "bottom" and idx != n:
            consistent = False
            break
        slot_of[k.file] = idx
        used.add(idx)
    if consistent:
        for k in bottoms:
            if n in used:
                consistent = False
                break
            slot_of[k.file] = n
            used.add(n)
    if consistent:
        free = [i for i in range(1, n + 1) if i not in used]
        rel_sorted = sorted(relative, key=lambda k: (k.rank is None, k.rank or 0, k.file))
        for k, idx in zip(rel_sorted, free, strict=True):
            slot_of[k.file] = idx
        if relative:
            names = ", ".join(k.file for k in rel_sorted)
            order_notices.append(
                Notice(
                    file="",
                    line=None,
                    message=f"inner copper order of {names} assumed from extension or name "
                    "numbers (no attribute or physical-order comment gives it)",
                )
            )
    else:
        given = sorted(
            f"L{k.index}" if k.index is not None else (k.side or "?") + f"({k.file})" for k in kept
        )

        def fallback_key(k: LayerIdentity) -> tuple[float, int, str]:
            if k.index is not None:
                return (float(k.index), 0, k.file)
            if k.side == "top":
                return (1.0, 0, k.file)
            if k.side == "bottom":
                return (float("inf"), 0, k.file)
            return ((k.rank or 0) + 1.0, 1, k.file)

        for pos, k in enumerate(sorted(kept, key=fallback_key), start=1):
            slot_of[k.file] = pos
        order_notices.append(
            Notice(
                file="",
                line=None,
                message=f"copper layer places must be 1..{n} without gaps; got "
                f"{', '.join(given)}; renumbered in order (a copper file may be missing)",
            )
        )

    # Physical order versus extension numbers, for information.
    both = sorted(
        (k for k in kept if k.rank is not None and k.index is not None), key=lambda k: k.index or 0
    )
    ranks = [k.rank or 0 for k in both]
    if len(both) > 1 and ranks != sorted(ranks):
        order_notices.append(
            Notice(
                file="",
                line=None,
                message="inner copper extension/name numbers do not follow the physical "
                "order; physical order used ("
                + ", ".join(f"{k.file} = L{k.index}" for k in both)
                + ")",
            )
        )

    out: list[LayerIdentity] = []
    for k in sorted(kept, key=lambda k: slot_of[k.file]):
        idx = slot_of[k.file]
        side: Side = "top" if idx == 1 else "bottom" if idx == n else "inner"
        notes = list(k.notices) + extra[k.file]
        if k.side is not None and k.side != side:
            notes.append(
                Notice(
                    file=k.file,
                    line=None,
                    message=f"copper layer side must match its place; {k.identified_by} says "
                    f"{k.side} but it is copper {idx} of {n}; taken as {side}",
                )
            )
        if idx == 1:
            notes.extend(order_notices)
        out.append(replace(k, index=idx, side=side, notices=tuple(notes)))
    return out

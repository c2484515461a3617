"""Plain summaries of a board for the ``stack`` and ``parts`` commands.

These turn a :class:`~fluxshadow.board.model.Board` into JSON-ready dictionaries (numbers,
strings, lists); the reporters in :mod:`fluxshadow.report.inventory` only format them.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from typing import Any

from fluxshadow import __version__
from fluxshadow.board.model import Board

__all__ = ["SCHEMA_VERSION", "parts_summary", "stack_summary"]

SCHEMA_VERSION = 1


def _num(x: float | None, nd: int = 4) -> float | None:
    if x is None or not math.isfinite(x):
        return None
    return round(float(x), nd)


def _common(board: Board, command: str) -> dict[str, Any]:
    return {
        "schema_version": SCHEMA_VERSION,
        "tool": {"name": "fluxshadow", "version": __version__},
        "command": command,
        "package": board.package,
        "notices": [str(n) for n in board.notices],
        "assumptions": list(board.assumptions),
    }


def stack_summary(board: Board, *, progress: Callable[[str], None] | None = None) -> dict[str, Any]:
    """Layers as identified, with copper area, primitive count and stack-up heights.

    Parameters
    ----------
    board : Board
    progress : callable, optional
        Called with a message before each layer's (whole-layer) composition.

    Returns
    -------
    dict
        JSON-ready; lengths in mm, areas in mm^2.
    """
    say = progress or (lambda _m: None)
    layers = []
    for lay, art in zip(board.layers, board.artworks, strict=True):
        say(f"composing {lay.name}")
        layers.append(
            {
                "name": lay.name,
                "index": lay.index,
                "side": lay.side,
                "source": lay.source,
                "identified_by": lay.identified_by,
                "detail": lay.detail,
                "polarity": lay.polarity,
                "polarity_from": lay.polarity_from,
                "copper_area_mm2": _num(art.copper_area_mm2(), 2),
                "primitives": art.n_objects,
                "z_top_mm": _num(lay.z_top_mm),
                "thickness_mm": _num(lay.thickness_mm),
            }
        )
    st = board.stackup
    out = _common(board, "stack")
    out["route"] = {"name": board.route, "why": board.route_detail}
    out["layers"] = layers
    out["stackup"] = {
        "source": st.source,
        "board_thickness_mm": _num(st.board_thickness_mm),
        "dielectrics": [
            {
                "above": f"L{i + 1}",
                "below": f"L{i + 2}",
                "thickness_mm": _num(gap),
                "epsilon_r": _num(eps, 3),
            }
            for i, (gap, eps) in enumerate(zip(st.gap_mm, st.epsilon_r, strict=False))
        ],
    }
    out["outline"] = (
        None
        if board.outline is None
        else {
            "source": board.outline.source,
            "bounds_mm": [_num(v) for v in board.outline.board.bounds],
            "area_mm2": _num(board.outline.board.area, 2),
            "cutouts": len(board.outline.cutouts),
        }
    )
    out["files"] = [{"file": f.file, "kind": f.kind, "use": f.use} for f in board.files]
    return out


def parts_summary(board: Board) -> dict[str, Any]:
    """Magnetics found and excluded, in the artwork frame, and the frame fit.

    Returns
    -------
    dict
        JSON-ready; positions and outlines in mm (artwork frame), inductance in H.
    """
    fit = board.frame_fit
    out = _common(board, "parts")
    out["frame_fit"] = {
        "method": fit.method,
        "dx_mm": _num(fit.dx_mm),
        "dy_mm": _num(fit.dy_mm),
        "bottom_mirror": fit.bottom_mirror,
        "bottom_mirror_c_mm": _num(fit.bottom_mirror_c_mm),
        "residual_mm": _num(fit.residual_mm),
        "matched": fit.matched,
        "total": fit.total,
        "score": _num(fit.score, 3),
        "identity_score": _num(fit.identity_score, 3),
    }
    out["magnetics"] = [
        {
            "ref": m.ref,
            "kind": m.kind,
            "value_h": m.value_h,
            "value_text": m.value_text,
            "package": m.package,
            "side": m.side,
            "x_mm": _num(m.x_mm),
            "y_mm": _num(m.y_mm),
            "rotation_deg": _num(m.rotation_deg, 2),
            "body_mm": [_num(v) for v in m.body_mm],
            "height_mm": _num(m.height_mm),
            "body_from": m.body_from,
            "outline_mm": [[_num(float(x)), _num(float(y))] for x, y in m.outline],
            "reasons": list(m.reasons),
        }
        for m in board.magnetics
    ]
    out["excluded"] = [
        {"ref": e.ref, "value_text": e.value_text, "package": e.package, "reason": e.reason}
        for e in board.excluded
    ]
    return out

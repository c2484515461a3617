"""Register the placement frame to the artwork (Gerber) frame.

A placement file and the copper artwork of the same board do not always share a frame: the
placement may be relative to an auxiliary origin while the artwork uses absolute page
coordinates, and some exporters negate X for bottom-side parts. This module fits

- a translation ``(dx, dy)`` for top-side parts: ``x_art = x + dx``, ``y_art = y + dy``;
- for bottom-side parts either the same translation, or a mirror of X about ``x = c``:
  ``x_art = c - x``, ``y_art = y + dy``;

or takes a transform given by the configuration and reports how well it fits.

Method
------
A part's centroid is normally the centre of its pads, not a pad: the centroid of a two-pad
resistor lies between its pads. Parts are therefore matched against *symmetric pad pairs*:
for a centroid ``q`` (after the trial transform) and each of its few nearest pads ``a``,
the pad ``b`` nearest to the mirror point ``2 q - a`` is found; the pair centre
``(a + b) / 2`` is the part centre the pads suggest, and its distance to ``q`` is the part's
residual. Point-symmetric footprints (chip passives, power inductors, most ICs, a centre pad
that is its own mirror) give residuals of a few micrometres under the right transform, while
a wrong transform only matches by chance.

1. Candidate translations: every pad and every midpoint of a pad with one of its nearest
   neighbours is a candidate part centre; the differences between candidate centres and
   (a sample of) part centroids are voted in a 2-D histogram of 0.5 mm bins. The best
   few bins, the identity and (for the bottom side) the top side's result are refined.
2. Refinement: the translation moves by the median residual vector of the parts that
   match within a shrinking tolerance (0.75, 0.3, 0.1 mm).
3. Score: fraction of the parts of a side whose residual is within ``match_tol_mm``.
   For the bottom side the unmirrored and mirrored hypotheses are both scored and the
   mirrored one is kept only when it scores clearly better. Both sides share the Y shift,
   and the X shift too unless the bottom is mirrored, so when the top side has been fitted
   the bottom hypotheses are scored under those constraints (a bottom side that alone
   prefers another shift is reported in a notice).
4. A joint refinement over all matched parts gives the final ``dx``, ``dy`` and ``c``.
5. The identity is preferred whenever it scores as well as the fit (within noise), so a
   fit of a few micrometres never replaces the exact identity.

Outliers (parts far off the board, fiducials without paste, unpopulated parts, asymmetric
footprints) simply do not match; they lower the score but not the fit.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Literal

import numpy as np
import numpy.typing as npt
from scipy.spatial import cKDTree

from fluxshadow.errors import InputError, Notice

__all__ = [
    "FrameFit",
    "FrameOverride",
    "apply_fit",
    "fit_frame",
    "invert_fit",
]

FloatArray = npt.NDArray[np.float64]

_K_OWN = 4
"""Nearest pads of a centroid tried as one pad of the part's symmetric pair."""
_OWN_RADIUS_MM = 12.0
"""Farthest pad (mm) from a centroid that may still belong to the part."""
_VOTE_NEIGHBOURS = 3
"""Nearest neighbours of each pad whose midpoints become candidate part centres."""
_VOTE_PAIR_MAX_MM = 10.0
"""Largest pad spacing (mm) of a candidate pair in the vote."""
_VOTE_BIN_MM = 0.5
"""Bin size (mm) of the translation vote."""
_MAX_DIFFS = 4_000_000
"""Cap on centroid x candidate-centre differences in one vote (memory and time)."""
_VOTE_MIN_PARTS = 48
"""Fewest part centroids sampled into the vote (candidate centres are thinned instead)."""
_N_CANDIDATES = 8
"""Best vote bins refined per hypothesis."""
_REFINE_TOLS_MM = (0.75, 0.3, 0.1, 0.1)
"""Match tolerances (mm) of the successive refinement steps."""
_WEAK_SCORE = 0.3
"""Below this fraction of matched parts the fit is reported as weak."""


@dataclass(frozen=True, kw_only=True)
class FrameOverride:
    """A placement-to-artwork transform given by the user (configuration).

    Attributes
    ----------
    dx_mm, dy_mm : float
        Translation added to placement coordinates (mm).
    bottom_mirror : bool
        Bottom-side X is mirrored: ``x_art = bottom_mirror_c_mm - x``.
    bottom_mirror_c_mm : float or None
        Mirror constant (mm); ``None`` means ``dx_mm`` (mirror of the placement X, then the
        same shift), the usual convention of mirrored placement files.
    """

    dx_mm: float = 0.0
    dy_mm: float = 0.0
    bottom_mirror: bool = False
    bottom_mirror_c_mm: float | None = None


@dataclass(frozen=True, kw_only=True)
class FrameFit:
    """The transform from the placement frame to the artwork frame, with its quality.

    ``x_art = x + dx_mm`` and ``y_art = y + dy_mm`` for top-side parts (and for bottom-side
    parts unless ``bottom_mirror``); with ``bottom_mirror`` bottom-side parts use
    ``x_art = bottom_mirror_c_mm - x``, ``y_art = y + dy_mm``.

    Attributes
    ----------
    dx_mm, dy_mm : float
        Translation (mm).
    bottom_mirror : bool
        Bottom-side X mirrored about ``x = bottom_mirror_c_mm``.
    bottom_mirror_c_mm : float or None
        Mirror constant (mm); ``None`` when not mirrored.
    residual_mm : float
        Median distance between a matched part's centroid (transformed) and the centre of
        its symmetric pad pair (mm); ``nan`` when nothing matched.
    matched, total : int
        Parts matched within the tolerance, out of the parts checked (those on a side that
        has pads).
    method : str
        ``"identity"``, ``"fitted"``, ``"config"`` or ``"identity (no pads)"``.
    identity_score : float
        Fraction of checked parts matched under the identity transform.
    score : float
        Fraction of checked parts matched under this transform.
    notices : tuple of Notice
        Assumptions and doubts about the fit, for the report.
    """

    dx_mm: float
    dy_mm: float
    bottom_mirror: bool
    bottom_mirror_c_mm: float | None
    residual_mm: float
    matched: int
    total: int
    method: str
    identity_score: float
    score: float
    notices: tuple[Notice, ...] = ()

    @property
    def is_identity(self) -> bool:
        """True when the transform leaves every coordinate unchanged."""
        return self.dx_mm == 0.0 and self.dy_mm == 0.0 and not self.bottom_mirror


# ----------------------------------------------------------------------------- inputs


def _as_xy(name: str, value: npt.ArrayLike) -> FloatArray:
    """Return ``value`` as a finite (n, 2) float array (non-finite rows dropped)."""
    arr = np.asarray(value, dtype=np.float64)
    if arr.size == 0:
        return np.zeros((0, 2), dtype=np.float64)
    if arr.ndim != 2 or arr.shape[1] != 2:
        msg = f"{name} must be an (n, 2) array of coordinates in mm; got shape {arr.shape}"
        raise InputError(msg)
    keep = np.all(np.isfinite(arr), axis=1)
    return np.ascontiguousarray(arr[keep])


def _bottom_mask(side: object, shape: tuple[int, ...]) -> npt.NDArray[np.bool_]:
    """Boolean mask of bottom-side entries from a side name or an array of names/flags."""
    if isinstance(side, str):
        if side not in ("top", "bottom"):
            msg = f"side must be 'top' or 'bottom'; got {side!r}"
            raise InputError(msg)
        return np.full(shape, side == "bottom", dtype=bool)
    arr = np.asarray(side)
    if arr.dtype.kind == "b":
        mask = arr.astype(bool)
    else:
        names = arr.astype(str)
        bad = ~np.isin(names, ("top", "bottom"))
        if np.any(bad):
            msg = f"side must be 'top' or 'bottom'; got {str(names[bad][0])!r}"
            raise InputError(msg)
        mask = names == "bottom"
    return np.broadcast_to(mask, shape)


# ----------------------------------------------------------------------------- transforms


def apply_fit(
    fit: FrameFit,
    x_mm: npt.ArrayLike,
    y_mm: npt.ArrayLike,
    side: Literal["top", "bottom"] | npt.ArrayLike,
) -> tuple[FloatArray, FloatArray]:
    """Map placement-frame coordinates to the artwork frame.

    Parameters
    ----------
    fit : FrameFit
        The transform.
    x_mm, y_mm : array_like, shape (n,) or scalar
        Placement-frame coordinates (mm).
    side : {"top", "bottom"} or array_like of str or bool, shape (n,)
        Side of each point; a boolean array means "is bottom".

    Returns
    -------
    x_art, y_art : ndarray, shape (n,)
        Artwork-frame coordinates (mm).
    """
    x, y = np.broadcast_arrays(np.asarray(x_mm, dtype=np.float64), np.asarray(y_mm, float))
    bottom = _bottom_mask(side, x.shape)
    c = fit.dx_mm if fit.bottom_mirror_c_mm is None else fit.bottom_mirror_c_mm
    mirrored = bottom & fit.bottom_mirror
    x_art = np.where(mirrored, c - x, x + fit.dx_mm)
    return x_art.astype(np.float64), (y + fit.dy_mm).astype(np.float64)


def invert_fit(
    fit: FrameFit,
    x_art_mm: npt.ArrayLike,
    y_art_mm: npt.ArrayLike,
    side: Literal["top", "bottom"] | npt.ArrayLike,
) -> tuple[FloatArray, FloatArray]:
    """Map artwork-frame coordinates back to the placement frame (inverse of `apply_fit`).

    Parameters
    ----------
    fit : FrameFit
        The transform.
    x_art_mm, y_art_mm : array_like, shape (n,) or scalar
        Artwork-frame coordinates (mm).
    side : {"top", "bottom"} or array_like of str or bool, shape (n,)
        Side the points belong to (decides whether the bottom mirror applies).

    Returns
    -------
    x, y : ndarray, shape (n,)
        Placement-frame coordinates (mm).
    """
    xa, ya = np.broadcast_arrays(
        np.asarray(x_art_mm, dtype=np.float64), np.asarray(y_art_mm, float)
    )
    bottom = _bottom_mask(side, xa.shape)
    c = fit.dx_mm if fit.bottom_mirror_c_mm is None else fit.bottom_mirror_c_mm
    mirrored = bottom & fit.bottom_mirror
    x = np.where(mirrored, c - xa, xa - fit.dx_mm)
    return x.astype(np.float64), (ya - fit.dy_mm).astype(np.float64)


# ----------------------------------------------------------------------------- matching


@dataclass(frozen=True)
class _Side:
    """Centroids of one side (mirrored in X for the mirrored hypothesis) and its pads."""

    q: FloatArray
    pads: FloatArray
    tree: cKDTree


def _pair_centres(side: _Side, t: FloatArray) -> tuple[FloatArray, FloatArray]:
    """Residual vectors and lengths of each centroid against its best symmetric pad pair.

    Parameters
    ----------
    side : _Side
        Centroids (n, 2) and pads (m, 2), mm.
    t : ndarray, shape (2,)
        Trial translation (mm) added to the centroids.

    Returns
    -------
    v : ndarray, shape (n, 2)
        Pair centre minus transformed centroid (mm); zeros where nothing was found.
    r : ndarray, shape (n,)
        Length of ``v`` (mm); ``inf`` where no pad lies within the part radius.
    """
    q = side.q + t
    n = q.shape[0]
    k = min(_K_OWN, side.pads.shape[0])
    dist, idx = side.tree.query(q, k=k, distance_upper_bound=_OWN_RADIUS_MM)
    dist = np.asarray(dist, dtype=np.float64).reshape(n, k)
    idx = np.asarray(idx, dtype=np.int64).reshape(n, k)
    valid = np.isfinite(dist)
    a = side.pads[np.where(valid, idx, 0)]
    target = 2.0 * q[:, None, :] - a
    _d, j = side.tree.query(target.reshape(-1, 2), k=1)
    b = side.pads[np.asarray(j, dtype=np.int64)].reshape(n, k, 2)
    v_all = 0.5 * (a + b) - q[:, None, :]
    r_all = np.where(valid, np.hypot(v_all[..., 0], v_all[..., 1]), np.inf)
    best = np.argmin(r_all, axis=1)
    rows = np.arange(n)
    r = r_all[rows, best]
    v = np.where(np.isfinite(r)[:, None], v_all[rows, best], 0.0)
    return v, r


def _refine(side: _Side, t0: FloatArray) -> FloatArray:
    """Move a translation to the median residual of the parts matching it."""
    t = np.array(t0, dtype=np.float64)
    for tol in _REFINE_TOLS_MM:
        v, r = _pair_centres(side, t)
        ok = r <= tol
        if not np.any(ok):
            break
        t = t + np.median(v[ok], axis=0)
    return t


def _vote(side: _Side, rng: np.random.Generator) -> list[FloatArray]:
    """Best candidate translations from a histogram of candidate-centre offsets."""
    pads = side.pads
    k = min(_VOTE_NEIGHBOURS + 1, pads.shape[0])
    centres = [pads]
    if k > 1:
        dist, idx = side.tree.query(pads, k=k, distance_upper_bound=_VOTE_PAIR_MAX_MM)
        dist = np.asarray(dist).reshape(pads.shape[0], k)[:, 1:]
        idx = np.asarray(idx).reshape(pads.shape[0], k)[:, 1:]
        ok = np.isfinite(dist)
        i_rows = np.nonzero(ok)[0]
        centres.append(0.5 * (pads[i_rows] + pads[idx[ok]]))
    cand = np.concatenate(centres, axis=0)
    max_cand = _MAX_DIFFS // _VOTE_MIN_PARTS
    if cand.shape[0] > max_cand:
        cand = cand[rng.choice(cand.shape[0], max_cand, replace=False)]
    n_q = min(side.q.shape[0], max(_VOTE_MIN_PARTS, _MAX_DIFFS // cand.shape[0]))
    qs = side.q
    if n_q < qs.shape[0]:
        qs = qs[rng.choice(qs.shape[0], n_q, replace=False)]
    diff = (cand[None, :, :] - qs[:, None, :]).reshape(-1, 2)
    kb = np.floor(diff / _VOTE_BIN_MM).astype(np.int64)
    off = np.int64(1 << 30)
    keys = (kb[:, 0] + off) * (off * 2) + (kb[:, 1] + off)
    uniq, counts = np.unique(keys, return_counts=True)
    order = np.argsort(-counts, kind="stable")
    out: list[FloatArray] = []
    for i in order[: 8 * _N_CANDIDATES]:
        key = int(uniq[i])
        kx = key // int(off * 2) - int(off)
        ky = key % int(off * 2) - int(off)
        t = (np.array([kx, ky], dtype=np.float64) + 0.5) * _VOTE_BIN_MM
        if all(np.hypot(*(t - o)) > 1.0 for o in out):
            out.append(t)
        if len(out) >= _N_CANDIDATES:
            break
    return out


def _count(side: _Side, t: FloatArray, tol: float) -> tuple[int, FloatArray]:
    """Matched parts and their residuals (mm) under translation ``t``."""
    _v, r = _pair_centres(side, t)
    ok = r <= tol
    return int(np.count_nonzero(ok)), r[ok]


def _best_translation(
    side: _Side,
    extra: list[FloatArray],
    tol: float,
    rng: np.random.Generator,
    *,
    fix_dy: float | None = None,
) -> tuple[FloatArray, int]:
    """Refine the vote's candidates plus ``extra`` and keep the best-scoring translation.

    With ``fix_dy`` each refined candidate is scored with its Y shift replaced by
    ``fix_dy`` (and X re-centred), as when the other side already fixed the shared Y shift.
    """
    best_t = np.zeros(2)
    best_n = -1
    for t0 in [*extra, *_vote(side, rng)]:
        t = _refine(side, t0)
        if fix_dy is not None:
            t = np.array([t[0], fix_dy])
            v, r = _pair_centres(side, t)
            ok = r <= _REFINE_TOLS_MM[1]
            if np.any(ok):
                t[0] += float(np.median(v[ok, 0]))
        n, _ = _count(side, t, tol)
        if n > best_n or (n == best_n and np.hypot(*t) < np.hypot(*best_t)):
            best_t, best_n = t, n
    return best_t, best_n


def _make_side(q: FloatArray, pads: FloatArray, *, mirror: bool) -> _Side:
    qq = q.copy()
    if mirror:
        qq[:, 0] = -qq[:, 0]
    return _Side(q=qq, pads=pads, tree=cKDTree(pads))


def _evaluate(sides: list[tuple[_Side, FloatArray]], tol: float) -> tuple[int, int, float]:
    """Matched count, total and median residual (mm) over several (side, translation)."""
    matched = 0
    total = 0
    res: list[FloatArray] = []
    for side, t in sides:
        n, r = _count(side, t, tol)
        matched += n
        total += side.q.shape[0]
        res.append(r)
    allr = np.concatenate(res) if res else np.zeros(0)
    median = float(np.median(allr)) if allr.size else float("nan")
    return matched, total, median


def _joint_refine(
    top: _Side | None, bottom: _Side | None, params: FloatArray, *, mirror: bool
) -> FloatArray:
    """Refine ``[dx, dy, c]`` with all parts at once (dy shared; dx shared unless mirrored)."""
    p = np.array(params, dtype=np.float64)
    for tol in _REFINE_TOLS_MM[1:]:
        vx_shift: list[FloatArray] = []
        vx_c: list[FloatArray] = []
        vy: list[FloatArray] = []
        if top is not None:
            v, r = _pair_centres(top, p[[0, 1]])
            ok = r <= tol
            vx_shift.append(v[ok, 0])
            vy.append(v[ok, 1])
        if bottom is not None:
            v, r = _pair_centres(bottom, p[[2, 1]] if mirror else p[[0, 1]])
            ok = r <= tol
            (vx_c if mirror else vx_shift).append(v[ok, 0])
            vy.append(v[ok, 1])
        ys = np.concatenate(vy) if vy else np.zeros(0)
        if ys.size == 0:
            break
        p[1] += float(np.median(ys))
        xs = np.concatenate(vx_shift) if vx_shift else np.zeros(0)
        if xs.size:
            p[0] += float(np.median(xs))
        cs = np.concatenate(vx_c) if vx_c else np.zeros(0)
        if cs.size:
            p[2] += float(np.median(cs))
    return p


# ----------------------------------------------------------------------------- fit


def fit_frame(
    top_xy: npt.ArrayLike,
    bottom_xy: npt.ArrayLike,
    pads_top_xy: npt.ArrayLike,
    pads_bottom_xy: npt.ArrayLike,
    *,
    override: FrameOverride | None = None,
    match_tol_mm: float = 0.1,
    seed: int = 0,
) -> FrameFit:
    """Fit the placement-to-artwork transform by matching part centroids to pad pairs.

    Parameters
    ----------
    top_xy, bottom_xy : array_like, shape (n, 2)
        Part centroids of each side in the placement frame (mm); may be empty.
    pads_top_xy, pads_bottom_xy : array_like, shape (m, 2)
        Pad centres of each side in the artwork frame (mm), from the paste layers if
        present, else from the copper pads; may be empty.
    override : FrameOverride, optional
        A transform given by the user: it is used as is, scored, and compared with a fit.
    match_tol_mm : float
        Largest residual (mm) for a part to count as matched.
    seed : int
        Seed of the sub-sampling in the vote (results are deterministic for a seed).

    Returns
    -------
    FrameFit
        The transform, its scores and notices. Bottom-side parts are only checked when
        bottom pads are given; otherwise they follow the top side's transform unmirrored,
        and a notice says so.

    Raises
    ------
    InputError
        An array is not (n, 2) or ``match_tol_mm`` is not positive.

    Notes
    -----
    See the module docstring for the method. The identity is returned whenever it matches
    as many parts as the fit, within ``max(2 %, 1 part)``.
    """
    if not (match_tol_mm > 0.0 and np.isfinite(match_tol_mm)):
        msg = f"match_tol_mm must be a positive number of mm; got {match_tol_mm!r}"
        raise InputError(msg)
    q_top = _as_xy("top_xy", top_xy)
    q_bot = _as_xy("bottom_xy", bottom_xy)
    p_top = _as_xy("pads_top_xy", pads_top_xy)
    p_bot = _as_xy("pads_bottom_xy", pads_bottom_xy)
    rng = np.random.default_rng(seed)
    notices: list[Notice] = []

    top = _make_side(q_top, p_top, mirror=False) if len(q_top) and len(p_top) else None
    bot_u = _make_side(q_bot, p_bot, mirror=False) if len(q_bot) and len(p_bot) else None
    bot_m = _make_side(q_bot, p_bot, mirror=True) if bot_u is not None else None
    if len(q_top) and not len(p_top):
        notices.append(
            Notice(
                file="",
                line=None,
                message=f"no top-side pads to register {len(q_top)} top-side parts against",
            )
        )
    if len(q_bot) and not len(p_bot):
        notices.append(
            Notice(
                file="",
                line=None,
                message=(
                    f"no bottom-side pads to register {len(q_bot)} bottom-side parts "
                    "against; assumed they share the top side's frame, not mirrored"
                ),
            )
        )

    zero = np.zeros(2)
    identity_sides: list[tuple[_Side, FloatArray]] = []
    if top is not None:
        identity_sides.append((top, zero))
    if bot_u is not None:
        identity_sides.append((bot_u, zero))
    id_matched, total, id_res = _evaluate(identity_sides, match_tol_mm)
    identity_score = id_matched / total if total else 0.0

    if total == 0:
        dx, dy = (override.dx_mm, override.dy_mm) if override else (0.0, 0.0)
        mirror = override.bottom_mirror if override else False
        if len(q_top) + len(q_bot):
            how = "configured transform used" if override else "assumed identical"
            notices.append(
                Notice(
                    file="",
                    line=None,
                    message=f"placement frame could not be checked against pads; {how}",
                )
            )
        return FrameFit(
            dx_mm=dx,
            dy_mm=dy,
            bottom_mirror=mirror,
            bottom_mirror_c_mm=_mirror_c(override) if override and mirror else None,
            residual_mm=float("nan"),
            matched=0,
            total=0,
            method="config" if override else "identity (no pads)",
            identity_score=0.0,
            score=0.0,
            notices=tuple(notices),
        )

    # --- per-side fits. One shift is shared by both sides unless the bottom is mirrored
    # (then it has its own X constant), and Y is always shared, so with top-side evidence
    # the bottom hypotheses are scored under those constraints.
    t_top: FloatArray | None = None
    if top is not None:
        t_top, _ = _best_translation(top, [zero], match_tol_mm, rng)
    mirror = False
    t_bot: FloatArray | None = None
    free_shift: tuple[FloatArray, int, int] | None = None
    if bot_u is not None and bot_m is not None:
        noise = max(1, int(np.ceil(0.02 * bot_u.q.shape[0])))
        if t_top is None:
            t_bu, n_bu = _best_translation(bot_u, [zero], match_tol_mm, rng)
            t_bm, n_bm = _best_translation(bot_m, [zero], match_tol_mm, rng)
        else:
            t_bu = t_top
            n_bu, _ = _count(bot_u, t_top, match_tol_mm)
            t_bm, n_bm = _best_translation(
                bot_m, [zero, t_top], match_tol_mm, rng, fix_dy=float(t_top[1])
            )
        mirror = n_bm > n_bu + noise
        t_bot = t_bm if mirror else t_bu
        if t_top is not None and not mirror:
            t_free, n_free = _best_translation(bot_u, [zero, t_top], match_tol_mm, rng)
            if n_free > n_bu + noise:
                free_shift = (t_free - t_top, n_free, n_bu)

    # --- joint parameters [dx, dy, c]
    if t_top is not None:
        params = np.array([t_top[0], t_top[1], t_bot[0] if (mirror and t_bot is not None) else 0.0])
    else:
        assert t_bot is not None
        params = np.array([t_bot[0], t_bot[1], t_bot[0]])
    params = _joint_refine(top, bot_m if mirror else bot_u, params, mirror=mirror)
    if top is None and mirror:
        params[0] = params[2]  # no top-side evidence: the usual "mirror, then shift" convention
    fit_sides: list[tuple[_Side, FloatArray]] = []
    if top is not None:
        fit_sides.append((top, params[[0, 1]]))
    if bot_u is not None and bot_m is not None:
        fit_sides.append((bot_m, params[[2, 1]]) if mirror else (bot_u, params[[0, 1]]))
    fit_matched, _t, fit_res = _evaluate(fit_sides, match_tol_mm)
    fit_score = fit_matched / total

    if free_shift is not None:
        delta, n_free, n_shared = free_shift
        notices.append(
            Notice(
                file="",
                line=None,
                message=(
                    f"bottom side alone fits a shift {float(np.hypot(*delta)):.2f} mm away "
                    f"from the top side's ({n_free} bottom parts match it, {n_shared} match "
                    "the shared shift); one shared shift used, state the transform in the "
                    "config if bottom parts look misplaced"
                ),
            )
        )

    noise_all = max(1, int(np.ceil(0.02 * total)))
    if override is not None:
        o_c = _mirror_c(override)
        o_sides: list[tuple[_Side, FloatArray]] = []
        if top is not None:
            o_sides.append((top, np.array([override.dx_mm, override.dy_mm])))
        if bot_u is not None and bot_m is not None:
            if override.bottom_mirror:
                o_sides.append((bot_m, np.array([o_c, override.dy_mm])))
            else:
                o_sides.append((bot_u, np.array([override.dx_mm, override.dy_mm])))
        o_matched, _t, o_res = _evaluate(o_sides, match_tol_mm)
        if fit_matched > o_matched + noise_all:
            notices.append(
                Notice(
                    file="",
                    line=None,
                    message=(
                        f"configured placement transform matches {o_matched} of {total} "
                        f"parts; a fit (dx {params[0]:.3f} mm, dy {params[1]:.3f} mm"
                        + (f", bottom mirrored about x = {params[2]:.3f} mm" if mirror else "")
                        + f") matches {fit_matched}"
                    ),
                )
            )
        return FrameFit(
            dx_mm=float(override.dx_mm),
            dy_mm=float(override.dy_mm),
            bottom_mirror=override.bottom_mirror,
            bottom_mirror_c_mm=o_c if override.bottom_mirror else None,
            residual_mm=o_res,
            matched=o_matched,
            total=total,
            method="config",
            identity_score=identity_score,
            score=o_matched / total,
            notices=tuple(notices),
        )

    if id_matched >= fit_matched - noise_all:
        fit = FrameFit(
            dx_mm=0.0,
            dy_mm=0.0,
            bottom_mirror=False,
            bottom_mirror_c_mm=None,
            residual_mm=id_res,
            matched=id_matched,
            total=total,
            method="identity",
            identity_score=identity_score,
            score=identity_score,
            notices=tuple(notices),
        )
    else:
        fit = FrameFit(
            dx_mm=float(params[0]),
            dy_mm=float(params[1]),
            bottom_mirror=mirror,
            bottom_mirror_c_mm=float(params[2]) if mirror else None,
            residual_mm=fit_res,
            matched=fit_matched,
            total=total,
            method="fitted",
            identity_score=identity_score,
            score=fit_score,
            notices=tuple(notices),
        )
    if fit.score < _WEAK_SCORE:
        fit = _with_notice(
            fit,
            f"placement frame fit is weak: {fit.matched} of {fit.total} parts match a "
            f"symmetric pad pair within {match_tol_mm} mm; set the transform in the config "
            "if the parts look misplaced",
        )
    return fit


def _mirror_c(override: FrameOverride) -> float:
    return override.dx_mm if override.bottom_mirror_c_mm is None else override.bottom_mirror_c_mm


def _with_notice(fit: FrameFit, message: str) -> FrameFit:
    return replace(fit, notices=(*fit.notices, Notice(file="", line=None, message=message)))

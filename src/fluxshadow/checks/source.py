"""The source model of a magnetic: its winding as filament loops, for the physics figures.

A power magnetic is modelled by its winding (vertical or horizontal axis) as a few
filament loops at the winding's mean radius and real heights, carrying the winding current
scaled by a *construction factor* k_ext: the share of the winding's dipole moment that
reaches outside the part's own core (physics reference section 2(a)). Everything the
configuration does not state is assumed, and each assumption says how to state it.

Local frame
-----------
Origin at the part centre on the mounting copper surface (the outer copper surface of the
side the part sits on); +z away from the board, into the part; the copper layers lie at
z = -depth (depth below the mounting surface, as :func:`fluxshadow.checks.analysis.
layer_depths_mm` gives it). x and y are the artwork frame's, shifted to the part centre.
For a bottom part the same (x, y) with z pointing down out of the board is the mirror image
of the real arrangement: magnitudes (fields, |M|, ΔL, shielding) are unchanged, signs of
circulation are flipped, so only magnitudes are reported.

Defaults (engineering judgement, not from a source)
---------------------------------------------------
- construction: from the description or package text ("shielded", "semi", "unshielded",
  "non-shielded", "drum", "toroid", "air core"), else semi-shielded;
- k_ext: air-core 1, unshielded 1, semi-shielded 0.3, shielded 0.1. A shielded part's
  external field is leakage at the sleeve gap and the faces, "tens of dB" below the
  unshielded dipole (physics reference 2(a), from memory); 0.1 (-20 dB) is a
  conservative middle. A toroid's external field is that of one turn of its mean radius
  (the winding advances once around the core), so it is modelled as a one-turn loop with
  k_ext = 1;
- body height: the configured or package height, else 0.6 x the body's smaller side (a
  typical power-inductor aspect);
- winding bottom: 0.15 x the body height (base flange or bobbin); winding height (vertical
  axis): 0.85 x the body height minus the bottom; for a horizontal axis the winding
  length along its axis is 0.7 x the body's longer side and the lowest turn sits at the
  winding bottom;
- turns: from the inductance and the winding size with the long-solenoid formula
  L = μ0 μ_eff N² π a² / ℓ, so N = √(L ℓ / (μ0 μ_eff π a²)), with an effective
  permeability per construction (shielded 20, semi-shielded 15, unshielded 8, toroidal
  40, air-core 1); 10 turns when the value is unknown. A toroid's turns are not asked
  for: its outside field is that of one turn whatever N.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, replace
from typing import Any, Literal

import numpy as np
import numpy.typing as npt

from fluxshadow.board.magnetics import Magnetic
from fluxshadow.checks.settings import Settings
from fluxshadow.io.config import PartConfig
from fluxshadow.physics.constants import MU0

__all__ = [
    "BODY_HEIGHT_FRACTION",
    "CONSTRUCTION_DEFAULT",
    "K_EXT",
    "MU_EFF",
    "SourceModel",
    "checked_part",
    "construction_from_text",
    "estimate_turns",
    "source_model",
]

FloatArray = npt.NDArray[np.float64]
Construction = Literal["unshielded", "semi-shielded", "shielded", "toroidal", "air-core"]
Axis = Literal["vertical", "horizontal"]

CONSTRUCTION_DEFAULT: Construction = "semi-shielded"
"""Construction assumed when neither the config nor the part text states one."""

K_EXT: dict[str, float] = {
    "air-core": 1.0,
    "unshielded": 1.0,
    "semi-shielded": 0.3,
    "shielded": 0.1,
    "toroidal": 1.0,
}
"""External moment factor per construction (engineering judgement, see module docstring);
a toroid's k_ext applies to its one-turn equivalent loop."""

MU_EFF: dict[str, float] = {
    "air-core": 1.0,
    "unshielded": 8.0,
    "semi-shielded": 15.0,
    "shielded": 20.0,
    "toroidal": 40.0,
}
"""Effective permeability used to estimate the turns (engineering judgement)."""

BODY_HEIGHT_FRACTION = 0.6
"""Body height as a fraction of the body's smaller side when no height is known."""

_BOTTOM_FRACTION = 0.15
_TOP_FRACTION = 0.85
_MIN_HEIGHT_FRACTION = 0.1
_HORIZONTAL_LENGTH_FRACTION = 0.7
_DEFAULT_TURNS = 10.0
_TURNS_RANGE = (1.0, 500.0)
_MAX_FILAMENTS = 6
_MIN_BOTTOM_MM = 0.05
"""Lowest winding height allowed (mm): a filament on the copper would be singular."""

_TEXT_RULES: tuple[tuple[re.Pattern[str], Construction], ...] = (
    (re.compile(r"toroid", re.IGNORECASE), "toroidal"),
    (re.compile(r"\bair[\s_-]?core", re.IGNORECASE), "air-core"),
    (re.compile(r"semi[\s_-]?shield", re.IGNORECASE), "semi-shielded"),
    (re.compile(r"un[\s_-]?shield|non[\s_-]?shield|\bdrum", re.IGNORECASE), "unshielded"),
    (re.compile(r"shield", re.IGNORECASE), "shielded"),
)


@dataclass(frozen=True, kw_only=True, eq=False)
class SourceModel:
    """The winding of one magnetic as filament loops (local frame, see module docstring).

    Attributes
    ----------
    ref : str
        Designator.
    side : {"top", "bottom"}
        Mounting side.
    x_mm, y_mm : float
        Part centre in the artwork frame (mm): the local frame's origin.
    construction : {"unshielded", "semi-shielded", "shielded", "toroidal", "air-core"}
    construction_from : str
        ``"config"``, ``"part text"`` or ``"default"``.
    axis : {"vertical", "horizontal"}
    axis_angle_deg : float
        Direction of a horizontal axis in the artwork frame (degrees counter-clockwise
        from +x); 0 for a vertical axis.
    turns : float
        Winding turns N (1).
    winding_radius_mm : float
        Mean winding radius a (mm).
    winding_bottom_mm : float
        Height of the lowest turn above the mounting copper surface (mm).
    winding_height_mm : float
        Winding height (vertical axis) or length along the axis (horizontal axis) (mm).
    body_height_mm : float
        Body height (mm).
    k_ext : float
        Construction factor: share of the winding's moment outside the part (1).
    centre_m : ndarray, shape (L, 3)
        Filament loop centres (m), local frame.
    axis_vec : ndarray, shape (L, 3)
        Unit axis of each loop.
    radius_m : ndarray, shape (L,)
        Loop radii (m).
    current_per_a : ndarray, shape (L,)
        Effective current of each filament per ampere of winding current (A/A): its
        lumped turns times k_ext (a toroid: one turn).
    assumptions : tuple of str
        Every default used, each with how to state it in ``fluxshadow.toml``.
    problems : tuple of str
        Stated values that made no sense for the part (each naming its key), replaced by
        the defaults (see :func:`checked_part`).
    """

    ref: str
    side: str
    x_mm: float
    y_mm: float
    construction: Construction
    construction_from: str
    axis: Axis
    axis_angle_deg: float
    turns: float
    winding_radius_mm: float
    winding_bottom_mm: float
    winding_height_mm: float
    body_height_mm: float
    k_ext: float
    centre_m: FloatArray
    axis_vec: FloatArray
    radius_m: FloatArray
    current_per_a: FloatArray
    assumptions: tuple[str, ...] = ()
    problems: tuple[str, ...] = ()

    @classmethod
    def from_loops(
        cls,
        centre_m: npt.ArrayLike,
        axis: npt.ArrayLike,
        radius_m: npt.ArrayLike,
        current_per_a: npt.ArrayLike,
        *,
        ref: str = "",
        construction: Construction = "air-core",
    ) -> SourceModel:
        """A source of explicit filament loops (local frame), e.g. a reference geometry.

        Parameters
        ----------
        centre_m : array_like, shape (L, 3)
            Loop centres (m), z above the mounting surface.
        axis : array_like, shape (L, 3) or (3,)
            Axis directions (normalised here).
        radius_m : array_like, shape (L,) or scalar
            Loop radii (m).
        current_per_a : array_like, shape (L,) or scalar
            Effective current of each loop per ampere (lumped turns x k_ext) (A/A).
        ref : str
            Designator for messages.
        construction : str
            Recorded only; k_ext is taken as 1 (the currents already include it).

        Returns
        -------
        SourceModel
            With turns = the summed currents and the winding radius, bottom and height
            taken from the loops.
        """
        c = np.atleast_2d(np.asarray(centre_m, dtype=np.float64))
        ax = np.broadcast_to(np.atleast_2d(np.asarray(axis, dtype=np.float64)), c.shape)
        ax = ax / np.linalg.norm(ax, axis=1, keepdims=True)
        a = np.broadcast_to(np.asarray(radius_m, dtype=np.float64), (len(c),)).copy()
        cur = np.broadcast_to(np.asarray(current_per_a, dtype=np.float64), (len(c),)).copy()
        horizontal = bool(np.all(np.abs(ax[:, 2]) < 1e-12))
        angle = math.degrees(math.atan2(ax[0, 1], ax[0, 0])) if horizontal else 0.0
        z = c[:, 2] * 1e3
        return cls(
            ref=ref,
            side="top",
            x_mm=0.0,
            y_mm=0.0,
            construction=construction,
            construction_from="config",
            axis="horizontal" if horizontal else "vertical",
            axis_angle_deg=angle,
            turns=float(np.sum(cur)),
            winding_radius_mm=float(np.max(a)) * 1e3,
            winding_bottom_mm=float(z.min()),
            winding_height_mm=float(z.max() - z.min()),
            body_height_mm=float(z.max() + np.max(a) * 1e3),
            k_ext=1.0,
            centre_m=c.copy(),
            axis_vec=np.asarray(ax, dtype=np.float64),
            radius_m=a,
            current_per_a=cur,
        )

    @property
    def moment_a_m2_per_a(self) -> FloatArray:
        """External dipole moment per ampere of winding current (A·m²/A), shape (3,)."""
        m = (self.current_per_a * np.pi * self.radius_m**2)[:, None] * self.axis_vec
        return np.asarray(m.sum(axis=0), dtype=np.float64)

    @property
    def lowest_m(self) -> float:
        """Height of the lowest point of any filament above the mounting surface (m)."""
        nz = np.abs(self.axis_vec[:, 2])
        drop = self.radius_m * np.sqrt(np.clip(1.0 - nz * nz, 0.0, 1.0))
        return float(np.min(self.centre_m[:, 2] - drop))

    def to_local_m(self, x_mm: npt.ArrayLike, y_mm: npt.ArrayLike) -> FloatArray:
        """Artwork-frame points (mm) to local (x, y) in metres, shape (n, 2).

        Parameters
        ----------
        x_mm, y_mm : array_like, shape (n,)
            Artwork coordinates (mm).

        Returns
        -------
        ndarray, shape (n, 2)
            Local x, y (m).
        """
        x = (np.asarray(x_mm, dtype=np.float64) - self.x_mm) * 1e-3
        y = (np.asarray(y_mm, dtype=np.float64) - self.y_mm) * 1e-3
        return np.asarray(np.column_stack([np.ravel(x), np.ravel(y)]), dtype=np.float64)


def construction_from_text(*texts: str) -> Construction | None:
    """The construction named in a part's description or package text, if any.

    Parameters
    ----------
    *texts : str
        Description, package name, value text.

    Returns
    -------
    str or None
        One of the constructions, or ``None`` when no text names one. "toroid" wins over
        "air", "semi-shielded" over "unshielded"/"non-shielded"/"drum", and those over a
        plain "shielded".
    """
    text = " ".join(t for t in texts if t)
    for pattern, construction in _TEXT_RULES:
        if pattern.search(text):
            return construction
    return None


def estimate_turns(
    inductance_h: float, radius_mm: float, length_mm: float, construction: str
) -> float:
    """Turns of a winding from its inductance and size (engineering judgement).

    N = √(L ℓ / (μ0 μ_eff π a²)), the long-solenoid formula with the effective
    permeability :data:`MU_EFF` of the construction, clipped to 1 ... 500.

    Parameters
    ----------
    inductance_h : float
        Inductance L (H), > 0.
    radius_mm : float
        Mean winding radius a (mm), > 0.
    length_mm : float
        Winding length ℓ (mm), > 0.
    construction : str
        A key of :data:`MU_EFF`.

    Returns
    -------
    float
        N (1).
    """
    a = radius_mm * 1e-3
    n2 = inductance_h * length_mm * 1e-3 / (MU0 * MU_EFF[construction] * math.pi * a * a)
    lo, hi = _TURNS_RANGE
    return float(min(max(math.sqrt(n2), lo), hi))


def _body_angle_deg(m: Magnetic) -> float:
    """Direction of the body's length (local X) in the artwork frame (degrees)."""
    o = np.asarray(m.outline, dtype=np.float64)
    if len(o) >= 2:
        dx, dy = float(o[1, 0] - o[0, 0]), float(o[1, 1] - o[0, 1])
        if dx or dy:
            return math.degrees(math.atan2(dy, dx))
    return float(m.rotation_deg)


_FIT_SLACK_MM = 1e-6
"""Rounding slack when a stated winding is compared with the body (mm)."""


def _mm(v: float) -> str:
    return f"{v:.4g} mm"


def checked_part(
    magnetic: Magnetic, part: PartConfig | None, *, key: str | None = None
) -> tuple[PartConfig | None, tuple[str, ...]]:
    """The part's stated winding values that make sense for its body; the others dropped.

    The configuration accepts any finite number for ``turns``, ``winding_radius_mm``,
    ``winding_bottom_mm`` and ``winding_height_mm``; here each is checked against the
    part: turns and the radius and height must be positive, the bottom not negative; the
    radius at most half the body's longer side; the bottom below the body height and, for
    a vertical axis, bottom + height at most the body height (only when the height is
    known: stated or from the package); a horizontal winding's length at most the body's
    longer side. A value that fails is set to ``None`` (the default is used instead) and
    a message naming its key is returned.

    Parameters
    ----------
    magnetic : Magnetic
        The part (its body, mm).
    part : PartConfig or None
        Its ``[[part]]`` entry.
    key : str, optional
        How messages name the entry, e.g. ``"fluxshadow.toml: part[2]"``; default
        ``[[part]] ref = "L2"``.

    Returns
    -------
    part : PartConfig or None
        ``part`` with the failing values removed (``None`` stays ``None``).
    problems : tuple of str
        One message per removed value: ``"<key>.<name> must be <expectation>; got
        <value>; the default is used instead"``.
    """
    if part is None:
        return None, ()
    k = key if key is not None else f'[[part]] ref = "{magnetic.ref}"'
    ref = magnetic.ref
    out: list[str] = []
    drop: dict[str, Any] = {}
    tail = "; the default is used instead"

    def bad(name: str, expectation: str, got: str) -> None:
        out.append(f"{k}.{name} must be {expectation} for {ref}; got {got}{tail}")
        drop[name] = None

    if part.turns is not None and not part.turns > 0:
        bad("turns", "a positive number of turns", f"{part.turns:g}")
    long_side = float(max(magnetic.body_mm))
    r = part.winding_radius_mm
    if r is not None:
        if not r > 0:
            bad("winding_radius_mm", "a positive radius", _mm(r))
        elif r > 0.5 * long_side + _FIT_SLACK_MM:
            bad(
                "winding_radius_mm",
                f"at most half the body's longer side ({_mm(0.5 * long_side)})",
                _mm(r),
            )
    body_h = part.height_mm if part.height_mm is not None else magnetic.height_mm
    bottom = part.winding_bottom_mm
    if bottom is not None:
        if bottom < 0:
            bad("winding_bottom_mm", "a height >= 0 above the copper", _mm(bottom))
            bottom = None
        elif body_h is not None and bottom >= body_h:
            bad("winding_bottom_mm", f"below the body height ({_mm(body_h)})", _mm(bottom))
            bottom = None
    length = part.winding_height_mm
    if length is not None:
        if not length > 0:
            bad("winding_height_mm", "a positive length", _mm(length))
        elif part.axis == "horizontal":
            if length > long_side + _FIT_SLACK_MM:
                bad(
                    "winding_height_mm",
                    f"at most the body's longer side ({_mm(long_side)}) for a horizontal winding",
                    _mm(length),
                )
        elif body_h is not None:
            low = bottom if bottom is not None else _BOTTOM_FRACTION * body_h
            if low + length > body_h + _FIT_SLACK_MM:
                how = "winding_bottom_mm" if bottom is not None else "the default bottom"
                bad(
                    "winding_height_mm",
                    f"at most the body height ({_mm(body_h)}) less {how} ({_mm(low)})",
                    _mm(length),
                )
    if not drop:
        return part, ()
    return replace(part, **drop), tuple(out)


def source_model(
    magnetic: Magnetic,
    part: PartConfig | None,
    settings: Settings,
    *,
    inductance_h: float | None = None,
    key: str | None = None,
) -> SourceModel:
    """Build the source model of a magnetic from the config and the defaults.

    Parameters
    ----------
    magnetic : Magnetic
        The part, in the artwork frame.
    part : PartConfig or None
        Its ``[[part]]`` entry, if any.
    settings : Settings
        For the default winding radius (``winding_radius_fraction``).
    inductance_h : float, optional
        Inductance used to estimate the turns (H); default the part's value.
    key : str, optional
        How messages name the ``[[part]]`` entry (see :func:`checked_part`).

    Returns
    -------
    SourceModel
        With every default listed in ``assumptions`` and every stated value that made
        no sense (replaced by its default) in ``problems``.
    """
    ref = magnetic.ref
    how = f'[[part]] ref = "{ref}", '
    notes: list[str] = []
    part, problems = checked_part(magnetic, part, key=key)
    cfg = part if part is not None else PartConfig(ref=ref)
    # construction
    construction: Construction
    if cfg.construction is not None:
        construction, c_from = cfg.construction, "config"
    else:
        found = construction_from_text(magnetic.description, magnetic.package)
        if found is not None:
            construction, c_from = found, "part text"
            notes.append(
                f"{ref}: construction {found} read from the part's description or package; "
                f'state it as {how}construction = "{found}"'
            )
        else:
            construction, c_from = CONSTRUCTION_DEFAULT, "default"
            notes.append(
                f"{ref}: construction not stated (shielded, semi-shielded, unshielded, "
                f"toroidal, air-core); {CONSTRUCTION_DEFAULT} assumed (external moment "
                f"factor {K_EXT[CONSTRUCTION_DEFAULT]:g}); state it as {how}construction = ..."
            )
    k_ext = K_EXT[construction]
    # winding radius
    small = float(min(magnetic.body_mm))
    if cfg.winding_radius_mm is not None:
        radius = float(cfg.winding_radius_mm)
    else:
        radius = settings.winding_radius_fraction * small
        notes.append(
            f"{ref}: winding mean radius {radius:.2f} mm assumed "
            f"({settings.winding_radius_fraction:g} x the body's smaller side); state it as "
            f"{how}winding_radius_mm = ..."
        )
    # heights
    if cfg.height_mm is not None:
        body_h = float(cfg.height_mm)
    elif magnetic.height_mm is not None:
        body_h = float(magnetic.height_mm)
    else:
        body_h = BODY_HEIGHT_FRACTION * small
        notes.append(
            f"{ref}: body height {body_h:.2f} mm assumed ({BODY_HEIGHT_FRACTION:g} x the "
            f"body's smaller side); state it as {how}height_mm = ..."
        )
    if cfg.winding_bottom_mm is not None:
        bottom = float(cfg.winding_bottom_mm)
    else:
        bottom = _BOTTOM_FRACTION * body_h
        notes.append(
            f"{ref}: lowest turn {bottom:.2f} mm above the copper assumed "
            f"({_BOTTOM_FRACTION:g} x the body height); state it as {how}winding_bottom_mm = ..."
        )
    bottom = max(bottom, _MIN_BOTTOM_MM)
    # axis
    axis: Axis = cfg.axis if cfg.axis is not None else "vertical"
    if cfg.axis is None:
        notes.append(
            f"{ref}: winding axis assumed vertical; state it as {how}axis = "
            '"horizontal", axis_angle_deg = ... (from the body\'s length direction)'
        )
    if cfg.winding_height_mm is not None:
        length = float(cfg.winding_height_mm)
    elif axis == "vertical":
        length = max(_TOP_FRACTION * body_h - bottom, _MIN_HEIGHT_FRACTION * body_h)
        notes.append(
            f"{ref}: winding height {length:.2f} mm assumed ({_TOP_FRACTION:g} x the body "
            f"height less the winding bottom); state it as {how}winding_height_mm = ..."
        )
    else:
        length = _HORIZONTAL_LENGTH_FRACTION * float(max(magnetic.body_mm))
        notes.append(
            f"{ref}: winding length along the axis {length:.2f} mm assumed "
            f"({_HORIZONTAL_LENGTH_FRACTION:g} x the body's longer side); state it as "
            f"{how}winding_height_mm = ..."
        )
    # turns
    if cfg.turns is not None:
        turns = float(cfg.turns)
    elif inductance_h is not None or magnetic.value_h is not None:
        ind = float(inductance_h if inductance_h is not None else magnetic.value_h)  # type: ignore[arg-type]
        turns = estimate_turns(ind, radius, length, construction)
        if construction != "toroidal":  # a toroid's outside field is one turn whatever N
            notes.append(
                f"{ref}: {turns:.1f} turns estimated from {ind * 1e6:.3g} uH and the winding "
                f"size (N = sqrt(L l / (mu0 mu_eff pi a^2)), mu_eff {MU_EFF[construction]:g} "
                f"for {construction}: judgement); state it as {how}turns = ..."
            )
    else:
        turns = _DEFAULT_TURNS
        if construction != "toroidal":
            notes.append(
                f"{ref}: {turns:g} turns assumed (no inductance value); state it as "
                f"{how}turns = ..."
            )
    # filaments
    angle = 0.0
    if axis == "horizontal":
        angle = _body_angle_deg(magnetic) + float(cfg.axis_angle_deg or 0.0)
        angle = (angle + 180.0) % 360.0 - 180.0
    centre, axes, radii, current = _filaments(
        construction, axis, angle, turns, radius, bottom, length, k_ext
    )
    return SourceModel(
        ref=ref,
        side=magnetic.side,
        x_mm=float(magnetic.x_mm),
        y_mm=float(magnetic.y_mm),
        construction=construction,
        construction_from=c_from,
        axis=axis,
        axis_angle_deg=angle,
        turns=turns,
        winding_radius_mm=radius,
        winding_bottom_mm=bottom,
        winding_height_mm=length,
        body_height_mm=body_h,
        k_ext=k_ext,
        centre_m=centre,
        axis_vec=axes,
        radius_m=radii,
        current_per_a=current,
        assumptions=tuple(notes),
        problems=problems,
    )


def _filaments(
    construction: str,
    axis: str,
    angle_deg: float,
    turns: float,
    radius_mm: float,
    bottom_mm: float,
    length_mm: float,
    k_ext: float,
) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray]:
    """Centres (m), unit axes, radii (m) and currents per ampere of the filament loops."""
    a = radius_mm * 1e-3
    if axis == "vertical":
        direction = np.array([0.0, 0.0, 1.0])
        base = np.array([0.0, 0.0, bottom_mm * 1e-3])
    else:
        t = math.radians(angle_deg)
        direction = np.array([math.cos(t), math.sin(t), 0.0])
        base = np.array([0.0, 0.0, (bottom_mm + radius_mm) * 1e-3])
    if construction == "toroidal":
        # One turn of the mean radius at the middle of the winding.
        n_f, per = 1, k_ext
        offsets = np.array([0.5])
    else:
        n_f = max(1, min(_MAX_FILAMENTS, math.ceil(turns - 1e-9)))
        per = k_ext * turns / n_f
        offsets = (np.arange(n_f) + 0.5) / n_f
    if axis == "vertical":
        centre = base[None, :] + (offsets * length_mm * 1e-3)[:, None] * direction[None, :]
    else:
        centre = base[None, :] + ((offsets - 0.5) * length_mm * 1e-3)[:, None] * direction
    axes = np.repeat(direction[None, :], n_f, axis=0)
    return (
        np.asarray(centre, dtype=np.float64),
        np.asarray(axes, dtype=np.float64),
        np.full(n_f, a),
        np.full(n_f, per),
    )

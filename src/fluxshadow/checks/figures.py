"""Physical figures of ``fluxshadow check``: shielding, inductance change, victim coupling.

Per magnetic, at the operating point's fundamental (or the per-A/us reference, see
:mod:`fluxshadow.checks.operating`), with the source of :mod:`fluxshadow.checks.source`:

Spectral model, "spectral (solid planes)"
    Every layer that carries a plane around the part (``LayerGeometry.plane_around``) is
    taken as a laterally infinite solid copper slab of its thickness; the other layers
    and the dielectric are air. For each layer k the stack runs from the mounting surface
    down to the bottom of layer k, cascaded exactly with the slab T(k)/R(k)
    (:func:`fluxshadow.physics.slab.layers_transmission_reflection`).

    - ``shielding_db``: 20 log10(|B| without the planes / |B| with them) just below
      layer k, on the winding axis and at a lateral distance a (the winding radius; along
      the axis for a horizontal winding); the smaller of the two is reported (it can be
      negative: off axis the eddy currents may raise the field, physics reference 2(b)).
    - ``delta_l_nh``: the change of the part's effective inductance from all the solid
      planes down to layer k (Dodd & Deeds-type integral with R(k), physics reference row
      14). The source carries k_ext times the winding current, so this is the external
      coupling k_ext² times the air-core value (physics reference 2(e), judgement). On
      the deepest layer it is the change from all the planes. ``delta_l_pct`` is it as a
      percentage of the part's inductance.

    A vertical winding uses Hankel transforms of order 0; a horizontal one the 2D FFT of
    its incident B_z on the top surface (:mod:`fluxshadow.physics.spectral`), with
    ΔL = (1/(2π²μ0 I²)) ∫ |B̂z(k)|² R(|k|)/|k| d²k (derived: the coaxial integral of row
    14 written over the plane's 2D spectrum; checked against it in the tests).

Victims (``exposed-trace``)
    M of the exposed centre line and its return path directly under it in the return
    plane's surface, with the source's image in that plane taken as a perfect conductor
    (physics reference row 15; :func:`fluxshadow.physics.victim.path_mutual_inductance_h`).
    A trace with no return plane under it is closed through the surface of the nearest
    layer that carries a plane anywhere around the part (the reference its return current
    must reach), without an image, since no plane lies under the trace; with no plane at
    all, through the farthest copper layer. The induced voltage is
    |M| times the peak slope of the ripple's harmonic sum up to the 9th harmonic
    (``induced_voltage_mv``) and |M| times the high-side on-time slope
    (``induced_on_mv``); without an operating point both are per A/us (|M| x 1 A/us).
    Where the sheet model solved a layer between the part and the trace, the vector
    potential of its eddy currents (and of their images) is added around the same path:
    M is then complex at the fundamental and |M| is used for every harmonic (higher
    harmonics are shielded more, so this errs high).

Sheet model, "sheet"
    Where a void, slot or plane edge lies in a layer's zone, the plane copper of that
    layer around the part is meshed and solved with the thin-sheet eddy-current solver
    (:mod:`fluxshadow.physics.sheet`): ring current, far-field moment ratio, ΔL and the
    shielding below the real copper. The sheet's ΔL replaces the solid plane's share in
    the running sum of ``delta_l_nh``. See :func:`sheet_layer_figures`.

Percentages refer to the part's inductance: the regulator's ``inductance_h``, else the
part's value. All figures are per magnetic and computed once (the FFT map of a horizontal
winding is cached).
"""

from __future__ import annotations

import functools
import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field, replace

import numpy as np
import numpy.typing as npt
import shapely
from shapely.geometry.base import BaseGeometry

from fluxshadow.checks.analysis import LayerGeometry, MagneticGeometry
from fluxshadow.checks.model import Finding, Severity
from fluxshadow.checks.operating import PER_A_PER_US, OperatingPoint
from fluxshadow.checks.settings import DEFAULT_SEVERITY, Settings
from fluxshadow.checks.source import SourceModel
from fluxshadow.errors import FluxshadowError
from fluxshadow.physics.buck import harmonic_emf_peak_v
from fluxshadow.physics.constants import MU0, SIGMA_CU_S_PER_M
from fluxshadow.physics.loop import loops_field_xyz
from fluxshadow.physics.sheet import LoopSource, PlaneSheet, SheetSolution, build_sheet_model
from fluxshadow.physics.skin import skin_depth_m
from fluxshadow.physics.slab import (
    coaxial_loops_field_below_layers,
    coaxial_loops_impedance_change_layers,
    layers_transmission_reflection,
)
from fluxshadow.physics.spectral import field_below_layers_from_top_bz
from fluxshadow.physics.victim import (
    path_gauss_points,
    path_mutual_inductance_h,
    trace_return_path,
)

__all__ = [
    "MODEL_SHEET",
    "MODEL_SPECTRAL",
    "SHEET_H_MAX_M",
    "SHEET_MAX_LAYERS",
    "SHEET_MAX_NODES",
    "SHEET_PATCH_DIAMETERS",
    "SHEET_SHIELDED_DB",
    "LayerStack",
    "MagneticFigures",
    "RingFigures",
    "SheetOutcome",
    "TraceFigures",
    "apply_figures",
    "delta_l_h",
    "is_coaxial_vertical",
    "layer_stack",
    "magnetic_figures",
    "needs_sheet",
    "severity_from_figures",
    "sheet_layer_figures",
    "shielding_below_db",
    "stated_severities",
    "trace_mutual_inductance_h",
]

FloatArray = npt.NDArray[np.float64]
ComplexArray = npt.NDArray[np.complex128]
Metric = float | int | str | bool | None

MODEL_SPECTRAL = "spectral (solid planes)"
MODEL_SHEET = "sheet"

_FFT_MAX_SIDE = 401
_FFT_HEIGHT_STEP = 0.5
"""Grid spacing of the 2D FFT route as a fraction of the lowest filament height."""
_FFT_REACH = 6.0
"""The FFT window reaches this many (radius + height) beyond the winding: the return flux
of a loop close to the plane spreads over a few radii, and cutting it off lowers ΔL (by
5 % at 1.8 radii, 0.1 % at 6 for a 2 mm loop 0.2 mm up, measured)."""


# ----------------------------------------------------------------------------- records


@dataclass(frozen=True, kw_only=True)
class LayerStack:
    """Layers from the mounting surface down, as slabs for the spectral model (SI).

    Attributes
    ----------
    thickness_m : ndarray, shape (P,)
        Slab thicknesses, top (mounting surface) to bottom (m): copper layers and the
        dielectric gaps between them.
    sigma_s_per_m : ndarray, shape (P,)
        Conductivities (S/m): copper for plane layers, 0 for others and for gaps.
    planes : tuple of str
        Names of the layers taken as solid planes.
    """

    thickness_m: FloatArray
    sigma_s_per_m: FloatArray
    planes: tuple[str, ...]

    @property
    def has_conductor(self) -> bool:
        """Whether any slab conducts."""
        return bool(np.any(self.sigma_s_per_m > 0.0))


@dataclass(frozen=True, kw_only=True)
class TraceFigures:
    """Coupling of one exposed trace (one net on one layer) to the part."""

    layer: str
    net: str
    mutual_inductance_ph: float
    induced_voltage_mv: float
    induced_on_mv: float
    return_path: str
    under_axis: bool = False


@dataclass(frozen=True, kw_only=True)
class RingFigures:
    """The sheet model's figures for one void of a layer (its hole or opened region)."""

    layer: str
    x_mm: float
    y_mm: float
    closed: bool
    ring_current_a: float | None
    moment_ratio: float | None
    delta_l_nh: float | None
    ring_delta_l_nh: float | None = None


@dataclass(frozen=True, kw_only=True)
class MagneticFigures:
    """Every figure of one magnetic (computed once, read by the report and the findings).

    Attributes
    ----------
    ref : str
    source : SourceModel
    op : OperatingPoint
    freq_hz : float
        Frequency of the figures (the fundamental) (Hz).
    figures_per : {"operating point", "A/us"}
    inductance_h : float or None
        The part's inductance the percentages refer to (H).
    layers : mapping of str to mapping
        Per layer name, figures with unit-suffixed keys (see ``docs/report.md``).
    traces : mapping of (layer, net) to TraceFigures
    rings : tuple of RingFigures
    notes : tuple of str
        What the models left out (for the report's notices).
    sheet_solutions : mapping of str to (SheetSolution, int)
        Per layer solved with the sheet model, its solution and the layer's sheet index
        in it (for field maps).
    """

    ref: str
    source: SourceModel
    op: OperatingPoint
    freq_hz: float
    figures_per: str
    inductance_h: float | None
    layers: Mapping[str, Mapping[str, Metric]]
    traces: Mapping[tuple[str, str], TraceFigures] = field(default_factory=dict)
    rings: tuple[RingFigures, ...] = ()
    notes: tuple[str, ...] = ()
    sheet_solutions: Mapping[str, tuple[SheetSolution, int]] = field(
        default_factory=dict, repr=False, compare=False
    )


# ----------------------------------------------------------------------------- stacks


def layer_stack(
    layers: Sequence[LayerGeometry],
    down_to: int,
    *,
    planes: Sequence[bool] | None = None,
    sigma_s_per_m: float = SIGMA_CU_S_PER_M,
) -> LayerStack:
    """The slab stack from the mounting surface to the bottom of layer ``down_to``.

    Parameters
    ----------
    layers : sequence of LayerGeometry
        Nearest first (as :func:`~fluxshadow.checks.analysis.analyse_magnetic` orders
        them), with depths from the mounting surface.
    down_to : int
        Index of the last layer in the stack.
    planes : sequence of bool, optional
        Which layers are solid planes; default ``plane_around`` of each.
    sigma_s_per_m : float
        Copper conductivity (S/m).

    Returns
    -------
    LayerStack
    """
    thick: list[float] = []
    sig: list[float] = []
    names: list[str] = []
    bottom_mm = 0.0
    for j in range(down_to + 1):
        lg = layers[j]
        gap = lg.depth_mm - bottom_mm
        if gap > 1e-9:
            thick.append(gap * 1e-3)
            sig.append(0.0)
        t = float(lg.layer.thickness_mm)
        is_plane = lg.plane_around if planes is None else planes[j]
        thick.append(t * 1e-3)
        sig.append(sigma_s_per_m if is_plane else 0.0)
        if is_plane:
            names.append(lg.layer.name)
        bottom_mm = max(bottom_mm, lg.depth_mm + t)
    return LayerStack(
        thickness_m=np.asarray(thick, dtype=np.float64),
        sigma_s_per_m=np.asarray(sig, dtype=np.float64),
        planes=tuple(names),
    )


# ----------------------------------------------------------------------------- kernels


def is_coaxial_vertical(source: SourceModel) -> bool:
    """Whether every loop of the source is horizontal and centred on the part's axis
    (so the Hankel form of the plane models applies)."""
    c = source.centre_m
    return bool(
        np.all(np.abs(source.axis_vec[:, 2]) > 1.0 - 1e-12) and np.all(np.abs(c[:, :2]) < 1e-12)
    )


def _rotation_to_axis(source: SourceModel) -> FloatArray:
    """2x2 rotation taking the local x/y frame to one whose x runs along the axis."""
    t = math.radians(source.axis_angle_deg) if source.axis == "horizontal" else 0.0
    c, s = math.cos(t), math.sin(t)
    return np.array([[c, -s], [s, c]])


@functools.lru_cache(maxsize=8)
def _fft_top_bz(source: SourceModel) -> tuple[FloatArray, float, int]:
    """Incident B_z per ampere on the mounting surface, on a grid aligned with the axis.

    Returns the map (n, n) (T/A), the spacing (m) and the index of the centre node; grid
    node (i, j) lies at u = (j - c) s along the axis, v = (i - c) s across it.
    """
    low = max(source.lowest_m, 1e-6)
    spacing = _FFT_HEIGHT_STEP * low
    extent = float(np.max(np.linalg.norm(source.centre_m[:, :2], axis=1) + source.radius_m))
    reach = extent + _FFT_REACH * (
        float(np.max(source.radius_m)) + float(np.max(source.centre_m[:, 2]))
    )
    half = math.ceil(reach / spacing)
    if 2 * half + 1 > _FFT_MAX_SIDE:
        half = (_FFT_MAX_SIDE - 1) // 2
        spacing = reach / half
    u = (np.arange(2 * half + 1) - half) * spacing
    uu, vv = np.meshgrid(u, u)
    rot = _rotation_to_axis(source)
    xy = np.stack([uu.ravel(), vv.ravel()], axis=1) @ rot.T
    pts = np.column_stack([xy, np.zeros(len(xy))])
    b = loops_field_xyz(
        pts, source.centre_m, source.axis_vec, source.radius_m, source.current_per_a
    )
    return np.asarray(b[:, 2].reshape(uu.shape), dtype=np.float64), spacing, half


def shielding_below_db(
    source: SourceModel,
    stack: LayerStack,
    freq_hz: float,
    *,
    obs_depth_m: float = 0.0,
    offsets_m: Sequence[float] | None = None,
) -> float:
    """Shielding of a stack of planes just below it: the smaller of axis and ρ = a.

    SE = 20 log10(|B| without the planes / |B| with them), |B| the length of the
    (complex) field vector, at a point on the winding axis and one at the winding radius
    a from it (along the axis for a horizontal winding), ``obs_depth_m`` below the stack.

    Parameters
    ----------
    source : SourceModel
        The winding (local frame; the stack's top surface is z = 0).
    stack : LayerStack
        The planes and gaps below the mounting surface.
    freq_hz : float
        Frequency (Hz).
    obs_depth_m : float, default 0
        Depth of the observation points below the bottom of the stack (m).
    offsets_m : sequence of float, optional
        Lateral distances of the observation points from the winding centre (m), along
        the axis for a horizontal winding; default ``(0, a)``.

    Returns
    -------
    float
        SE (dB), the smaller of the two points (negative when the field grows).

    References
    ----------
    Hankel superposition with the exact slab T(k) (fluxshadow physics reference row 11);
    2D FFT route for horizontal windings (section 2(a)).
    """
    if not stack.has_conductor:
        return 0.0
    a = float(np.max(source.radius_m))
    offs = np.asarray((0.0, a) if offsets_m is None else offsets_m, dtype=np.float64)
    air = np.zeros_like(stack.sigma_s_per_m)
    if is_coaxial_vertical(source):
        rho = np.abs(offs)
        depth = np.full(len(rho), obs_depth_m)
        fields = []
        for sig in (air, stack.sigma_s_per_m):
            b_rho, b_z = coaxial_loops_field_below_layers(
                source.radius_m, source.centre_m[:, 2], rho, depth, freq_hz,
                stack.thickness_m, sig, source.current_per_a,
            )  # fmt: skip
            fields.append(np.sqrt(np.abs(b_rho) ** 2 + np.abs(b_z) ** 2))
    else:
        bz, spacing, c = _fft_top_bz(source)
        cols = np.clip(c + np.round(offs / spacing).astype(np.int64), 0, bz.shape[1] - 1)
        rows = np.full(len(cols), c)
        b = field_below_layers_from_top_bz(
            bz, spacing, obs_depth_m, freq_hz, stack.thickness_m, stack.sigma_s_per_m
        )
        # the free-space field at the same grid points, closed form
        uv = np.column_stack([(cols - c) * spacing, np.zeros(len(cols))])
        xy = uv @ _rotation_to_axis(source).T
        below = float(np.sum(stack.thickness_m)) + obs_depth_m
        pts = np.column_stack([xy, np.full(len(xy), -below)])
        free_b = loops_field_xyz(
            pts, source.centre_m, source.axis_vec, source.radius_m, source.current_per_a
        )
        fields = [
            np.linalg.norm(free_b, axis=1),
            np.sqrt(np.sum(np.abs(b[rows, cols, :]) ** 2, axis=1)),
        ]
    free, shielded = fields
    with np.errstate(divide="ignore"):  # a zero field below the planes is infinite SE
        se = 20.0 * np.log10(free / shielded)
    return float(np.min(se))


def delta_l_h(
    source: SourceModel,
    stack: LayerStack,
    freq_hz: float,
) -> float:
    """Change of the winding's inductance from the planes of a stack (H), per its source.

    The source carries k_ext times the winding current, so this is k_ext² times the
    air-core change (physics reference 2(e)).

    Parameters
    ----------
    source : SourceModel
    stack : LayerStack
    freq_hz : float
        Frequency (Hz).

    Returns
    -------
    float
        ΔL (H), negative for copper.

    References
    ----------
    Dodd & Deeds-type integral with the stack's R(k) (fluxshadow physics reference row
    14, derived); horizontal windings through the 2D spectrum of the incident B_z (module
    docstring, derived).
    """
    if not stack.has_conductor:
        return 0.0
    if is_coaxial_vertical(source):
        dl, _dr = coaxial_loops_impedance_change_layers(
            source.radius_m, source.centre_m[:, 2], freq_hz, stack.thickness_m,
            stack.sigma_s_per_m, source.current_per_a,
        )  # fmt: skip
        return float(dl)
    bz, spacing, _c = _fft_top_bz(source)
    return _fft_delta_l_h(bz, spacing, freq_hz, stack)


def _fft_delta_l_h(bz: FloatArray, spacing: float, freq_hz: float, stack: LayerStack) -> float:
    """ΔL = (1/(2π²μ0)) ∫ |B̂z|² R/|k| d²k from a sampled incident B_z per ampere."""
    ny, nx = bz.shape
    py, px = 2 * ny, 2 * nx
    spec = np.fft.fft2(bz, s=(py, px)) * spacing * spacing
    ky = 2.0 * np.pi * np.fft.fftfreq(py, d=spacing)
    kx = 2.0 * np.pi * np.fft.fftfreq(px, d=spacing)
    k = np.hypot(*np.meshgrid(kx, ky))
    ok = k > 0.0
    # R depends on |k| only: evaluate it once per distinct |k| (the grid repeats each 8x)
    k_u, inverse = np.unique(k[ok], return_inverse=True)
    _t, r_u = layers_transmission_reflection(k_u, freq_hz, stack.thickness_m, stack.sigma_s_per_m)
    r = r_u[inverse.reshape(-1)]
    dk2 = (2.0 * np.pi / (px * spacing)) * (2.0 * np.pi / (py * spacing))
    total = np.sum(np.abs(spec[ok]) ** 2 * r / k[ok]) * dk2
    return float(np.real(total) / (2.0 * np.pi**2 * MU0))


def trace_mutual_inductance_h(
    source: SourceModel,
    trace_xy_m: npt.ArrayLike,
    trace_z_m: float,
    return_z_m: float,
    *,
    image: bool,
) -> float:
    """Mutual inductance of the winding with a trace closed under itself at a height.

    Parameters
    ----------
    source : SourceModel
    trace_xy_m : array_like, shape (m, 2)
        Trace centre line, local frame (m).
    trace_z_m : float
        Height of the trace's copper mid-plane (m, negative below the mounting surface).
    return_z_m : float
        Height of the return path (the return plane's surface facing the trace) (m).
    image : bool
        Take the return plane as a perfect conductor (image of the source in it).

    Returns
    -------
    float
        M (H), signed by the trace direction.

    References
    ----------
    Stokes / Neumann with images (fluxshadow physics reference row 15).
    """
    xy = np.asarray(trace_xy_m, dtype=np.float64)
    trace = np.column_stack([xy, np.full(len(xy), trace_z_m)])
    path = trace_return_path(trace, return_z_m)
    return path_mutual_inductance_h(
        path,
        source.centre_m,
        source.axis_vec,
        source.radius_m,
        source.current_per_a,
        pec_plane_z_m=return_z_m if image else None,
    )


# ----------------------------------------------------------------------------- per magnetic


def _lines(geom: BaseGeometry) -> list[FloatArray]:
    out = []
    for g in shapely.get_parts(geom):
        if g.geom_type == "LineString" and g.length > 0:
            out.append(np.asarray(g.coords, dtype=np.float64)[:, :2])
        elif g.geom_type == "MultiLineString":
            out.extend(np.asarray(p.coords, dtype=np.float64)[:, :2] for p in g.geoms)
    return out


def _sheet_path_mutual_h(
    sols: Sequence[tuple[SheetSolution, Sequence[int]]],
    path_m: FloatArray,
    image_z_m: float | None,
) -> ComplexArray:
    """∮ A·dl of sheet currents around a closed path, per ampere of winding current, at
    each frequency of the solutions (all solved at the same frequencies).

    ``sols`` pairs each solution with the sheets of it whose currents count. With a
    perfectly conducting return plane at ``image_z_m`` the sheet currents' images add
    A_img(p) = -A(mirror of p) (horizontal currents: reversed images).
    """
    total: ComplexArray = np.zeros(len(sols[0][0].freqs_hz) if sols else 1, dtype=np.complex128)
    for sol, sheets in sols:
        # A of the sheet varies on the scale of its distance to the path
        zs = np.asarray(sol.model.current_z_m)[np.asarray(sheets, dtype=np.int64)]
        gap = float(np.min(np.abs(path_m[:, 2][:, None] - zs[None, :])))
        piece = min(max(2.0 * gap, _SHEET_PATH_PIECE_M), 4.0 * _SHEET_PATH_PIECE_M)
        pts, dl = path_gauss_points(path_m, closed=True, max_piece_m=piece, order=6)
        if len(pts) == 0:
            continue
        if image_z_m is None:
            a = sol.vector_potential_at(pts, include_source=False, sheets=sheets)
        else:
            mirrored = pts.copy()
            mirrored[:, 2] = 2.0 * image_z_m - pts[:, 2]
            both = sol.vector_potential_at(
                np.concatenate([pts, mirrored]), include_source=False, sheets=sheets
            )
            a = both[:, : len(pts)] - both[:, len(pts) :]
        total = total + np.einsum("fpc,pc->f", a, dl)
    return total


_SHEET_PATH_PIECE_M = 0.25e-3
"""Longest path piece for the sheet currents' vector potential (m)."""


def _trace_figures(
    geo: MagneticGeometry,
    k: int,
    source: SourceModel,
    op: OperatingPoint,
    solutions: Mapping[str, tuple[SheetSolution, int]] | None = None,
) -> list[TraceFigures]:
    lg = geo.layers[k]
    by_name = {x.layer.name: x for x in geo.layers}
    # sheet currents of solved layers between the part and the trace (a coupled solution
    # holds several layers: only its sheets above the trace count)
    above_names = [
        name
        for name in (solutions or {})
        if name in by_name and by_name[name].depth_mm < lg.depth_mm
    ]
    grouped: dict[int, tuple[SheetSolution, list[int]]] = {}
    for name in above_names:
        sol, idx = (solutions or {})[name]
        grouped.setdefault(id(sol), (sol, []))[1].append(idx)
    sheet_sets = list(grouped.values())
    t_mm = float(lg.layer.thickness_mm)
    trace_z = -(lg.depth_mm + 0.5 * t_mm) * 1e-3
    out = []
    for e in lg.exposed:
        image = False
        if e.return_layer and e.return_layer in by_name:
            ret = by_name[e.return_layer]
            image = ret.depth_mm > lg.depth_mm
            how = f"return plane {ret.layer.name}" + (" (image)" if image else "")
        else:
            others = [x for j, x in enumerate(geo.layers) if j != k]
            planes = [x for x in others if x.plane_around]
            if planes:
                ret = min(planes, key=lambda x: abs(x.depth_mm - lg.depth_mm))
            elif others:
                ret = max(others, key=lambda x: abs(x.depth_mm - lg.depth_mm))
            else:
                continue
            how = f"no return plane under it: closed through {ret.layer.name}"
        if ret.depth_mm > lg.depth_mm:
            ret_z = -ret.depth_mm * 1e-3
        else:
            ret_z = -(ret.depth_mm + float(ret.layer.thickness_mm)) * 1e-3
        # per harmonic of the ripple: the direct coupling (frequency independent) plus
        # that of the sheets' eddy currents at each harmonic
        m_h: ComplexArray = np.zeros(max(1, len(op.harmonics_a)), dtype=np.complex128)
        for line in _lines(e.exposed):
            xy = source.to_local_m(line[:, 0], line[:, 1])
            m_h += trace_mutual_inductance_h(source, xy, trace_z, ret_z, image=image)
            if sheet_sets:
                trace = np.column_stack([xy, np.full(len(xy), trace_z)])
                m_h += _sheet_path_mutual_h(
                    sheet_sets,
                    trace_return_path(trace, ret_z),
                    ret_z if image else None,
                )
        if above_names:
            how += "; with the eddy currents of " + ", ".join(above_names)
        axis_gap_mm = float(e.exposed.distance(shapely.Point(source.x_mm, source.y_mm)))
        under_axis = source.axis == "vertical" and axis_gap_mm < 0.05 * source.winding_radius_mm
        m_abs = abs(complex(m_h[0]))
        if op.stated:
            on = op.slope_rise_a_per_s
            emf = harmonic_emf_peak_v(op.ripple_a, op.duty, op.fsw_hz, m_h)
        else:
            on = PER_A_PER_US
            emf = m_abs * PER_A_PER_US
        out.append(
            TraceFigures(
                layer=lg.layer.name,
                net=e.net,
                mutual_inductance_ph=m_abs * 1e12,
                induced_voltage_mv=emf * 1e3,
                induced_on_mv=m_abs * abs(on) * 1e3,
                return_path=how,
                under_axis=under_axis,
            )
        )
    return out


def magnetic_figures(
    geo: MagneticGeometry,
    source: SourceModel,
    op: OperatingPoint,
    settings: Settings,
    *,
    inductance_h: float | None = None,
    sheet: bool = True,
) -> MagneticFigures:
    """Every physics figure of one magnetic.

    Parameters
    ----------
    geo : MagneticGeometry
        From :func:`~fluxshadow.checks.analysis.analyse_magnetic`.
    source : SourceModel
        From :func:`~fluxshadow.checks.source.source_model`.
    op : OperatingPoint
        The magnetic's operating point (stated or the per-A/us reference).
    settings : Settings
    inductance_h : float, optional
        The part's inductance (H) for the percentages; default the operating point's.
    sheet : bool, default True
        Run the sheet model where a void, slot or plane edge lies in a zone.

    Returns
    -------
    MagneticFigures
    """
    freq = float(op.fsw_hz)
    per = "operating point" if op.stated else "A/us"
    ind = inductance_h if inductance_h is not None else op.inductance_h
    if ind is None:
        ind = geo.magnetic.value_h
    ses: list[float] = []
    shares: list[float] = []
    cum_prev = 0.0
    plane_names: list[str] = []
    # A plane with a void in the zone does not count as a solid slab for the layers below
    # it (conservative: the void sits under the winding); its own figures come from the
    # sheet model.
    solid = [lg.plane_around and not lg.voids for lg in geo.layers]
    for k in range(len(geo.layers)):
        stack = layer_stack(geo.layers, k, planes=solid)
        ses.append(shielding_below_db(source, stack, freq))
        cum = delta_l_h(source, stack, freq)
        shares.append(cum - cum_prev)
        cum_prev = cum
        plane_names.append(",".join(stack.planes))
    sheet_out = (
        sheet_layer_figures(geo, source, op, shielding_above_db=ses) if sheet else SheetOutcome()
    )
    layers: dict[str, dict[str, Metric]] = {}
    running = 0.0
    for k, lg in enumerate(geo.layers):
        name = lg.layer.name
        extra = dict(sheet_out.layers.get(name, {}))
        if "sheet_delta_l_nh" in extra:
            # the real copper's change replaces the solid plane's share of the sum
            shares[k] = float(extra["sheet_delta_l_nh"] or 0.0) * 1e-9  # type: ignore[arg-type]
        running += shares[k]
        figs: dict[str, Metric] = {
            "model": MODEL_SPECTRAL,
            "figures_per": per,
            "freq_hz": freq,
            "planes": plane_names[k],
            "shielding_db": _round(ses[k], 2),
            "delta_l_nh": _sig(running * 1e9, 5),
            "delta_l_pct": None if not ind else _sig(100.0 * running / ind, 4),
        }
        figs.update(extra)
        layers[name] = figs
    traces: dict[tuple[str, str], TraceFigures] = {}
    for k in range(1, len(geo.layers)):
        for t in _trace_figures(geo, k, source, op, sheet_out.solutions):
            traces[(t.layer, t.net)] = t
    return MagneticFigures(
        ref=geo.magnetic.ref,
        source=source,
        op=op,
        freq_hz=freq,
        figures_per=per,
        inductance_h=ind,
        layers=layers,
        traces=traces,
        rings=sheet_out.rings,
        notes=sheet_out.notes,
        sheet_solutions=sheet_out.solutions,
    )


def _round(x: float | None, nd: int) -> float | None:
    if x is None or not math.isfinite(x):
        return None
    return round(float(x), nd)


# ----------------------------------------------------------------------------- sheet model

SHEET_PATCH_DIAMETERS = 2.5
"""Half-size of the meshed patch in winding diameters (clipped to the composed window)."""
SHEET_MAX_LAYERS = 2
"""Layers per magnetic solved with the sheet model (nearest first; budget)."""
SHEET_H_MAX_M = 1.0e-3
"""Largest mesh element (m)."""
SHEET_SHIELDED_DB = 20.0
"""A layer below solid planes that already shield the field by this much keeps its
spectral figures (its copper sees little of the part's field)."""
SHEET_MAX_NODES = 2500
"""Mesh size limit per layer: beyond it the layer keeps its spectral figures."""
_PARTIAL_PLANE = 0.25
"""A layer without a plane around the zone still gets the sheet model when plane copper
covers at least this share of its zone (a pour whose edge crosses the zone)."""


@dataclass(frozen=True, kw_only=True)
class SheetOutcome:
    """What the sheet model added for one magnetic."""

    layers: Mapping[str, Mapping[str, Metric]] = field(default_factory=dict)
    rings: tuple[RingFigures, ...] = ()
    notes: tuple[str, ...] = ()
    solutions: Mapping[str, tuple[SheetSolution, int]] = field(default_factory=dict)


def needs_sheet(lg: LayerGeometry) -> bool:
    """Whether a layer has a void, slot or plane edge in its zone (sheet model wanted).

    A plane layer with a reported void, or a layer whose plane copper covers part of its
    zone (at least a quarter, but not all: a pour edge crossing it), below the mounting
    layer (whose plane copper there is the part's own pads). Layers under a full
    plane (``shielded_by``) are left to the spectral model: the solid plane above sees
    most of the field first.
    """
    if lg.shielded_by:
        return False
    if lg.plane_around:
        return bool(lg.voids)
    # the mounting layer's plane copper without a plane around is the part's own pads
    return lg.depth_mm > 0.0 and _PARTIAL_PLANE <= lg.coverage < 0.999


def sheet_layer_figures(
    geo: MagneticGeometry,
    source: SourceModel,
    op: OperatingPoint,
    *,
    shielding_above_db: Sequence[float] | None = None,
    only: Sequence[int] | None = None,
) -> SheetOutcome:
    """Sheet-model figures of the layers with a void, slot or plane edge in the zone.

    Each such layer (:func:`needs_sheet`; not below solid planes that shield by
    :data:`SHEET_SHIELDED_DB` or more; at most :data:`SHEET_MAX_LAYERS`, nearest first;
    meshes up to :data:`SHEET_MAX_NODES` nodes each) is meshed on its
    plane copper within a square patch of :data:`SHEET_PATCH_DIAMETERS` winding
    diameters each side of the part centre (clipped to the window the copper was composed
    for). The layers are solved together, coupled in one system (each sheet's eddy
    currents act on the others), at the fundamental and its harmonics (the ripple's, for
    the victims; every layer figure is the fundamental's); only when that system cannot be
    built is each layer solved alone, with a note. Holes of the patch polygons are
    enclosed voids (one ring-current unknown each); a void opened to the patch edge has
    none.

    Parameters
    ----------
    geo, source, op
        As :func:`magnetic_figures`.
    shielding_above_db : sequence of float, optional
        Per layer, the spectral shielding below it (dB), from :func:`magnetic_figures`.
    only : sequence of int, optional
        Solve exactly these layers (indices into ``geo.layers``) instead of choosing.

    Returns
    -------
    SheetOutcome
        Per layer the figures that replace the spectral ones (``model`` "sheet"), the
        ring figures per void and notes on what was left out.
    """
    se = shielding_above_db
    wanted = (
        list(only)
        if only is not None
        else [
            k
            for k, lg in enumerate(geo.layers)
            if needs_sheet(lg) and (se is None or k == 0 or se[k - 1] < SHEET_SHIELDED_DB)
        ]
    )
    if not wanted:
        return SheetOutcome()
    layers: dict[str, dict[str, Metric]] = {}
    rings: list[RingFigures] = []
    notes: list[str] = []
    solutions: dict[str, tuple[SheetSolution, int]] = {}
    if len(wanted) > SHEET_MAX_LAYERS:
        skipped = ", ".join(geo.layers[k].layer.name for k in wanted[SHEET_MAX_LAYERS:])
        notes.append(
            f"{geo.magnetic.ref}: layers {skipped} keep their solid-plane figures (the sheet "
            f"model runs on the {SHEET_MAX_LAYERS} nearest layers with voids or edges)"
        )
    chosen = wanted[:SHEET_MAX_LAYERS]
    groups: list[list[int]] = [chosen]
    out = _sheet_layers(geo, chosen, source, op)
    if isinstance(out, str) and len(chosen) > 1:
        # the coupled system could not be built: each layer alone, as a fallback
        notes.append(f"{out}; the layers are solved one at a time")
        groups = [[k] for k in chosen]
        outs = [_sheet_layers(geo, g, source, op) for g in groups]
    else:
        outs = [out]
    for group, res in zip(groups, outs, strict=True):
        if isinstance(res, str):
            notes.append(res)
            continue
        figs, layer_rings, sol = res
        for sheet_index, k in enumerate(group):
            name = geo.layers[k].layer.name
            layers[name] = figs[name]
            solutions[name] = (sol, sheet_index)
        rings.extend(layer_rings)
    return SheetOutcome(layers=layers, rings=tuple(rings), notes=tuple(notes), solutions=solutions)


def _patch(
    geo: MagneticGeometry, k: int, source: SourceModel, fill_below_mm2: float
) -> tuple[list[tuple[FloatArray, tuple[FloatArray, ...]]], list[BaseGeometry]]:
    """Plane copper of layer k around the part, as local polygons (m) and hole shapes (mm).

    Holes smaller than ``fill_below_mm2`` (via antipads) are filled; islands smaller
    than that are dropped. Returns the polygons and the holes in the solver's order.
    """
    lg = geo.layers[k]
    half = SHEET_PATCH_DIAMETERS * 2.0 * source.winding_radius_mm
    x0, y0, x1, y1 = geo.window
    cx, cy = source.x_mm, source.y_mm
    box = shapely.box(
        max(x0, cx - half), max(y0, cy - half), min(x1, cx + half), min(y1, cy + half)
    )
    copper = shapely.intersection(lg.plane, box).simplify(0.01)
    polys: list[tuple[FloatArray, tuple[FloatArray, ...]]] = []
    holes_mm: list[BaseGeometry] = []
    for p in shapely.get_parts(copper):
        if p.geom_type != "Polygon" or p.area < fill_below_mm2:
            continue
        keep = [h for h in p.interiors if shapely.Polygon(h).area >= fill_below_mm2]
        ext = np.asarray(p.exterior.coords, dtype=np.float64)[:-1]
        ring_list = []
        for h in keep:
            pts = np.asarray(h.coords, dtype=np.float64)[:-1]
            ring_list.append(source.to_local_m(pts[:, 0], pts[:, 1]))
            holes_mm.append(shapely.Polygon(h))
        polys.append((source.to_local_m(ext[:, 0], ext[:, 1]), tuple(ring_list)))
    return polys, holes_mm


def _sheet_layers(
    geo: MagneticGeometry,
    ks: Sequence[int],
    source: SourceModel,
    op: OperatingPoint,
) -> tuple[dict[str, dict[str, Metric]], list[RingFigures], SheetSolution] | str:
    """Solve the copper of layers ``ks`` in one coupled system.

    Returns per layer name its figures, the ring records of every layer's voids and the
    solution (sheet ``i`` of it is layer ``ks[i]``), or a note saying why not.
    """
    ref = geo.magnetic.ref
    names = [geo.layers[k].layer.name for k in ks]
    patches = []
    for k in ks:
        polys, holes = _patch(geo, k, source, fill_below_mm2=_FILL_HOLES_MM2)
        if not polys:
            name = geo.layers[k].layer.name
            return f"{ref}: layer {name} has no plane copper around the part to mesh"
        patches.append((polys, holes))
    freq = float(op.fsw_hz)
    delta_m = float(skin_depth_m(freq, 1.0 / SIGMA_CU_S_PER_M))
    thick = any(float(geo.layers[k].layer.thickness_mm) * 1e-3 / delta_m > _THICK_RATIO for k in ks)
    what = "layer " + "+".join(names)
    try:
        planes = []
        for k, (polys, _holes) in zip(ks, patches, strict=True):
            t_m = float(geo.layers[k].layer.thickness_mm) * 1e-3
            planes.append(
                PlaneSheet.from_polygons(
                    polys, z_m=-(geo.layers[k].depth_mm * 1e-3 + 0.5 * t_m), thickness_m=t_m
                )
            )
        loops = LoopSource.from_arrays(
            source.centre_m, source.axis_vec, source.radius_m, source.current_per_a
        )
        model = build_sheet_model(
            planes,
            loops,
            copper_model="impedance" if thick else "thin",
            h_max_m=SHEET_H_MAX_M,
            max_nodes=SHEET_MAX_NODES * len(ks),
        )
        # the fundamental first (every layer figure), then the ripple's other harmonics
        # (the victims' induced voltage sees each harmonic through its own coupling)
        n_harm = max(1, len(op.harmonics_a))
        sol = model.solve(freq * np.arange(1, n_harm + 1))
    except (FluxshadowError, ValueError, ArithmeticError, RuntimeError) as exc:
        # a copper shape the mesher or the solver cannot take is not fatal to the check
        return f"{ref}: {what} keeps its solid-plane figures (sheet model: {exc})"
    i1 = float(op.harmonics_a[0]) if op.harmonics_a else 1.0
    # far-field moment of all sheet currents: m_z = ½ Σ A (x J_y − y J_x)
    cur = sol.triangle_current_a_per_m()[0]
    cen = model.tri_vertices_m.mean(axis=1)
    m_sheet = 0.5 * np.sum(model.tri_area_m2 * (cen[:, 0] * cur[:, 1] - cen[:, 1] * cur[:, 0]))
    m_part = source.moment_a_m2_per_a.astype(np.complex128)
    m_tot = m_part.copy()
    m_tot[2] += m_sheet
    norm = float(np.linalg.norm(m_part))
    ratio = float(np.linalg.norm(m_tot)) / norm if norm > 0 else None
    ring_i = np.asarray(sol.ring_current_a[0], dtype=np.complex128)
    # ΔL = Re(Φᵀu) (per ampere squared): each unknown's term is its share, so a sheet's
    # share is the sum over its unknowns and a ring's the term of its hole unknown
    terms = np.real(model.source_phi * sol.unknowns[0])
    unknown_sheet = np.asarray(model.unknown_sheet, dtype=np.int64)
    hole_u = np.asarray(model.hole_unknown, dtype=np.int64)
    ring_dl = terms[hole_u] if len(hole_u) else []
    rot = _rotation_to_axis(source)
    a = float(np.max(source.radius_m))
    off = rot @ np.array([a, 0.0])
    coupled = (
        "+".join(sorted(names, key=lambda n: geo.layers[ks[names.index(n)]].layer.index))
        if len(names) > 1
        else ""
    )
    figs_by_layer: dict[str, dict[str, Metric]] = {}
    records: list[RingFigures] = []
    for s_idx, (k, (_polys, holes)) in enumerate(zip(ks, patches, strict=True)):
        lg = geo.layers[k]
        name = lg.layer.name
        t_m = float(lg.layer.thickness_mm) * 1e-3
        # shielding just below this copper, on the axis and at the winding radius
        z_b = -(lg.depth_mm * 1e-3 + t_m) - 1e-6
        pts = np.array([[0.0, 0.0, z_b], [off[0], off[1], z_b]])
        b_tot = sol.field_at(pts)[0]
        b_free = loops_field_xyz(
            pts, source.centre_m, source.axis_vec, source.radius_m, source.current_per_a
        )
        with np.errstate(divide="ignore"):  # zero field below the copper: infinite SE
            se = 20.0 * np.log10(np.linalg.norm(b_free, axis=1) / np.linalg.norm(b_tot, axis=1))
        mine = np.flatnonzero(np.asarray(model.hole_sheet) == s_idx)
        ring_s = ring_i[mine]
        dl = float(np.sum(terms[unknown_sheet == s_idx]))
        figs: dict[str, Metric] = {
            "model": MODEL_SHEET,
            "shielding_db": _round(float(np.min(se)), 2),
            "sheet_delta_l_nh": _sig(dl * 1e9, 5),
            "ring_current_a": _sig(float(np.max(np.abs(ring_s))) * i1) if len(ring_s) else 0.0,
            "moment_ratio": _sig(ratio),
            "mesh_nodes": int(model.meshes[s_idx].n_nodes),
        }
        if coupled:
            figs["sheet_coupled_layers"] = coupled
        figs_by_layer[name] = figs
        for v in lg.voids:
            p = v.polygon.representative_point()
            hit = [
                (float(shapely.intersection(h, v.polygon).area), j)
                for j, h in enumerate(holes)
                if h.intersects(v.polygon)
            ]
            closed = bool(hit)
            if closed:
                j = int(mine[max(hit)[1]])
                i_ring = abs(complex(ring_i[j])) * i1
                d_ring: float | None = float(ring_dl[j]) * 1e9
            else:
                i_ring, d_ring = 0.0, 0.0
            records.append(
                RingFigures(
                    layer=name,
                    x_mm=float(p.x),
                    y_mm=float(p.y),
                    closed=closed,
                    ring_current_a=i_ring,
                    moment_ratio=ratio,
                    delta_l_nh=dl * 1e9,
                    ring_delta_l_nh=d_ring,
                )
            )
    return figs_by_layer, records, sol


_FILL_HOLES_MM2 = 1.0
"""Holes below this area (via antipads) are filled in the sheet model, islands below it
dropped (the same limit as ``void_min_area_mm2``'s default)."""
_THICK_RATIO = 0.7
"""Above this copper thickness / skin depth the impedance sheet replaces the thin sheet
(fluxshadow physics reference, section 3, "Thick copper")."""


# ----------------------------------------------------------------------------- findings

_RANK = {"note": 1, "warning": 2, "error": 3}


def severity_from_figures(
    value: float, warning_at: float, error_at: float, ceiling: str | None = None
) -> Severity:
    """The severity a figure earns, capped by a configured ceiling.

    Parameters
    ----------
    value : float
        The figure (e.g. induced mV, or |ΔL| in % of the part's value).
    warning_at, error_at : float
        Thresholds: at or above ``error_at`` an error, at or above ``warning_at`` a
        warning, else a note.
    ceiling : {"error", "warning", "note"}, optional
        A severity stated in ``[severity]`` for the rule: the result never exceeds it.

    Returns
    -------
    {"error", "warning", "note"}
    """
    level: Severity = "error" if value >= error_at else "warning" if value >= warning_at else "note"
    if ceiling in _RANK and _RANK[level] > _RANK[ceiling]:
        return ceiling  # type: ignore[return-value]
    return level


def stated_severities(settings: Settings, stated: Mapping[str, str]) -> dict[str, str]:
    """Rules whose severity the user stated: the figures leave those as stated.

    Parameters
    ----------
    settings : Settings
    stated : mapping of str to str
        The ``[severity]`` table as written in the configuration.

    Returns
    -------
    dict of str to str
        Rule id -> the stated severity, for rules named in the config's ``[severity]``
        or set in the settings to something other than the default.
    """
    out = {}
    for rule, level in settings.severity.items():
        if rule in stated or level != DEFAULT_SEVERITY.get(rule):
            out[rule] = level
    return out


def _sig(x: float | None, digits: int = 4) -> float | None:
    if x is None or not math.isfinite(x):
        return None
    if x == 0:
        return 0.0
    return round(float(x), digits - 1 - math.floor(math.log10(abs(x))))


def _per_text(figs: MagneticFigures) -> str:
    if figs.op.stated:
        return f"at {figs.freq_hz / 1e3:g} kHz"
    return "per A/us, at 1 MHz"


def apply_figures(
    findings: Sequence[Finding],
    figs: MagneticFigures,
    settings: Settings,
    *,
    stated: Mapping[str, str] | None = None,
) -> list[Finding]:
    """Fill the physics metrics of one magnetic's findings and set severities from them.

    ``plane-void`` findings get the layer's ``shielding_db``, ``delta_l_nh`` and
    ``delta_l_pct``; ``void-ring`` findings the ring current, moment ratio and ΔL of the
    sheet model (when it ran); ``exposed-trace`` findings the mutual inductance and the
    induced voltages. Every filled finding also gets ``figures_per`` and ``model``, and a
    sentence with the figures at the end of its message.

    Severity: an exposed trace is an error at ``induced_mv_error`` or more, a warning at
    ``induced_mv_warning`` or more, else a note; a closed ring likewise with the ring's
    share of |ΔL| in % of the part's value against ``delta_l_pct_warning`` /
    ``delta_l_pct_error``. A severity stated for the rule in ``[severity]`` overrides the
    figures: it is kept as stated, so it is also the most the figures can give (``off``
    findings never reach here). Without figures the rule's severity stays as it is.

    Parameters
    ----------
    findings : sequence of Finding
        The findings the rules made for this magnetic (others pass through).
    figs : MagneticFigures
    settings : Settings
    stated : mapping of str to str, optional
        From :func:`stated_severities`: rules whose severity the user stated.

    Returns
    -------
    list of Finding
    """
    caps = dict(stated or {})
    out: list[Finding] = []
    per = figs.figures_per
    when = _per_text(figs)
    for f in findings:
        if f.ref != figs.ref:
            out.append(f)
            continue
        if f.rule == "plane-void" and f.layer in figs.layers:
            lf = figs.layers[f.layer]
            se, dl, pct = lf.get("shielding_db"), lf.get("delta_l_nh"), lf.get("delta_l_pct")
            metrics = {
                **f.metrics,
                "shielding_db": se,
                "delta_l_nh": dl,
                "delta_l_pct": pct,
                "figures_per": per,
                "model": lf.get("model"),
            }
            parts = []
            if isinstance(se, float):
                parts.append(f"{se:.1f} dB shielding below it")
            if isinstance(dl, float):
                share = f" ({pct:+.2g} % of its value)" if isinstance(pct, float) else ""
                parts.append(f"part inductance {dl:+.3g} nH{share}")
            text = f" Figures ({lf.get('model')}, {when}): {'; '.join(parts)}." if parts else ""
            f = replace(f, metrics=metrics, message=f.message + text)
        elif f.rule == "void-ring":
            ring = _ring_for(figs, f)
            if ring is not None:
                f = _ring_finding(f, ring, figs, settings, caps, when)
        elif f.rule == "exposed-trace":
            tf = figs.traces.get((f.layer, str(f.metrics.get("net", ""))))
            if tf is not None:
                f = _trace_finding(f, tf, figs, settings, caps)
        out.append(f)
    return out


def _ring_for(figs: MagneticFigures, f: Finding) -> RingFigures | None:
    if f.x_mm is None or f.y_mm is None:
        return None
    for r in figs.rings:
        if r.layer == f.layer and abs(r.x_mm - f.x_mm) < 1e-6 and abs(r.y_mm - f.y_mm) < 1e-6:
            return r
    return None


def _ring_finding(
    f: Finding,
    ring: RingFigures,
    figs: MagneticFigures,
    settings: Settings,
    caps: Mapping[str, str],
    when: str,
) -> Finding:
    if f.metrics.get("closed") is True and not ring.closed:
        # the topology trace found the ring closing beyond the meshed patch
        ring = replace(ring, ring_current_a=None, ring_delta_l_nh=None)
    pct = (
        None
        if not figs.inductance_h or ring.ring_delta_l_nh is None
        else 100.0 * ring.ring_delta_l_nh * 1e-9 / figs.inductance_h
    )
    metrics = {
        **f.metrics,
        "ring_current_a": _sig(ring.ring_current_a),
        "moment_ratio": _sig(ring.moment_ratio),
        "delta_l_nh": _sig(ring.ring_delta_l_nh),
        "delta_l_pct": _sig(pct),
        "layer_delta_l_nh": _sig(ring.delta_l_nh),
        "figures_per": figs.figures_per,
        "model": MODEL_SHEET,
    }
    severity = f.severity
    text = f" Sheet model, {when}:"
    if ring.closed and ring.ring_current_a is not None:
        text += f" ring current {ring.ring_current_a * 1e3:.3g} mA"
        if ring.ring_delta_l_nh is not None:
            text += f", the ring's share of the inductance change {ring.ring_delta_l_nh:+.3g} nH"
        if ring.moment_ratio is not None:
            text += f"; far-field moment {ring.moment_ratio:.2f} x the part's"
        text += "."
        if pct is not None and "void-ring" not in caps:
            severity = severity_from_figures(
                abs(pct), settings.delta_l_pct_warning, settings.delta_l_pct_error
            )
    elif ring.ring_current_a is None:
        text += (
            f" the ring closes outside the meshed copper ({SHEET_PATCH_DIAMETERS:g} winding "
            "diameters around the part), so its current is not computed"
        )
        if ring.moment_ratio is not None:
            text += f"; far-field moment {ring.moment_ratio:.2f} x the part's"
        text += "."
    else:
        text += " no ring current in the solved copper"
        if ring.moment_ratio is not None:
            text += f"; far-field moment {ring.moment_ratio:.2f} x the part's"
        text += "."
    return replace(f, metrics=metrics, message=f.message + text, severity=severity)


def _trace_finding(
    f: Finding,
    tf: TraceFigures,
    figs: MagneticFigures,
    settings: Settings,
    caps: Mapping[str, str],
) -> Finding:
    metrics = {
        **f.metrics,
        "mutual_inductance_ph": _sig(tf.mutual_inductance_ph),
        "induced_voltage_mv": _sig(tf.induced_voltage_mv),
        "induced_on_mv": _sig(tf.induced_on_mv),
        "return_path": tf.return_path,
        "figures_per": figs.figures_per,
        "model": (
            ("victim loop with image" if "(image)" in tf.return_path else "victim loop")
            + (" + sheet currents" if "eddy currents" in tf.return_path else "")
        ),
    }
    if figs.op.stated:
        text = (
            f" Mutual inductance {tf.mutual_inductance_ph:.3g} pH ({tf.return_path}): "
            f"{tf.induced_voltage_mv:.3g} mV peak at the operating point, "
            f"{tf.induced_on_mv:.3g} mV during the high-side on-time."
        )
    else:
        text = (
            f" Mutual inductance {tf.mutual_inductance_ph:.3g} pH ({tf.return_path}): "
            f"{tf.induced_voltage_mv:.3g} mV per A/us of current slope (no operating point)."
        )
    if tf.under_axis:
        text += (
            " It runs under the winding's axis, where an ideal winding links no flux "
            "(lead-outs and the winding pitch are not modelled)."
        )
    severity = (
        f.severity
        if "exposed-trace" in caps
        else severity_from_figures(
            tf.induced_voltage_mv, settings.induced_mv_warning, settings.induced_mv_error
        )
    )
    return replace(f, metrics=metrics, message=f.message + text, severity=severity)

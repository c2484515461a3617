"""Gerber reader: standard apertures and aperture macros, against hand-computed shapes.

Parts are compared through shapely areas and bounds built from the rings in the record.
Circles are inscribed polygons, so circular areas fall short by at most
perimeter x chord tolerance. Spec = Gerber Layer Format Specification rev 2023.08.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from shapely.geometry import Polygon
from shapely.ops import unary_union

from fluxshadow.io.gerber import ARC_CHORD_TOLERANCE_MM, parse_gerber
from fluxshadow.io.records import ApertureRecord

TOL = ARC_CHORD_TOLERANCE_MM


def aperture(defs: str, code: int = 10, head: str = "%FSLAX46Y46*%\n%MOMM*%\n") -> ApertureRecord:
    rec = parse_gerber(f"{head}{defs}\nD{code}*\nX0Y0D03*\nM02*\n", source="ap.gbr")
    return rec.apertures[rec.obj_aperture[0]]


def shape(ap: ApertureRecord):  # type: ignore[no-untyped-def]
    """The aperture's image: dark parts unioned, clear parts erased, in drawing order."""
    geom = Polygon()
    for dark, ring in ap.parts:
        poly = Polygon(ring).buffer(0)
        geom = geom.union(poly) if dark else geom.difference(poly)
    return geom


def circle_area_lo(r: float) -> float:
    return math.pi * r * r - 2 * math.pi * r * TOL


# ----------------------------------------------------------------------------- standard


def test_circle_with_hole_is_dark_then_clear() -> None:
    ap = aperture("%ADD10C,2.0X1.0*%")
    assert ap.circle_diameter_mm is None  # a hole makes it more than a plain circle
    assert [d for d, _ in ap.parts] == [True, False]
    a = shape(ap).area
    assert circle_area_lo(1.0) - math.pi * 0.25 <= a <= math.pi - circle_area_lo(0.5)


def test_rectangle_with_hole() -> None:
    ap = aperture("%ADD10R,3X2X1*%")
    area = shape(ap).area
    hole = math.pi * 0.25
    assert 6 - hole <= area <= 6 - hole + 2 * math.pi * 0.5 * TOL
    np.testing.assert_allclose(ap.parts[0][1].min(axis=0), [-1.5, -1.0])
    assert ap.extent_mm == pytest.approx(math.hypot(1.5, 1.0))


@pytest.mark.parametrize(("w", "h"), [(3.0, 1.0), (1.0, 3.0), (2.0, 2.0)])
def test_obround_is_rectangle_plus_circle(w: float, h: float) -> None:
    ap = aperture(f"%ADD10O,{w}X{h}*%")
    d = min(w, h)
    exact = (max(w, h) - d) * d + math.pi * d * d / 4
    area = shape(ap).area
    assert exact - math.pi * d * TOL <= area <= exact
    np.testing.assert_allclose(np.ptp(ap.parts[0][1], axis=0), [w, h], atol=2 * TOL)


@pytest.mark.parametrize("n", [3, 5, 6, 12])
def test_regular_polygon_area_and_first_vertex(n: int) -> None:
    # P,<outer diameter>X<vertices>X<rotation>: area (n/2) r^2 sin(2 pi / n) (common
    # practice); first vertex at the rotation angle (spec 4.4.5, from memory).
    ap = aperture(f"%ADD10P,2.0X{n}X30*%")
    ring = ap.parts[0][1]
    assert len(ring) == n + 1
    assert Polygon(ring).area == pytest.approx(n / 2 * math.sin(2 * math.pi / n))
    np.testing.assert_allclose(ring[0], [math.cos(math.pi / 6), math.sin(math.pi / 6)])
    assert ap.circle_diameter_mm is None


def test_polygon_with_hole_and_zero_size_circle() -> None:
    ap = aperture("%ADD10P,2.0X4X0X0.5*%")
    assert [d for d, _ in ap.parts] == [True, False]
    zero = aperture("%ADD10C,0*%")
    assert zero.parts == ()
    assert zero.circle_diameter_mm == 0.0


def test_legacy_rectangular_hole_notice() -> None:
    rec = parse_gerber("%FSLAX46Y46*%\n%MOMM*%\n%ADD10C,2X0.5X0.4*%\nD10*\nX0Y0D03*\nM02*\n")
    ap = rec.apertures[0]
    np.testing.assert_allclose(np.ptp(ap.parts[1][1], axis=0), [0.5, 0.4])
    assert any("rectangular aperture holes" in n.message for n in rec.notices)


# ----------------------------------------------------------------------------- arithmetic


def macro_value(expr: str, params: str = "") -> float:
    """Evaluate a macro expression by using it as the x of a circle centre."""
    ap = aperture(f"%AMV*1,1,0.01,{expr},0*%\n%ADD10V{',' + params if params else ''}*%")
    ring = ap.parts[0][1]
    return float(ring[:-1, 0].mean())


@pytest.mark.parametrize(
    ("expr", "params", "value"),
    [
        # Spec 4.5.4.2: "the standard arithmetic precedence rules apply".
        ("$1+$2x2", "1X3", 7.0),  # left to right would give 8
        ("$1x2+$2", "1X3", 5.0),
        ("($1+$2)x2", "1X3", 8.0),
        ("8/2/2", "", 2.0),  # left-associative
        ("1-2-3", "", -4.0),
        ("-(1-3)x2", "", 4.0),
        ("2x-3", "", -6.0),
        ("-$1", "2.5", -2.5),
        ("$1/4+$2X2", "1X0.25", 0.75),  # upper-case X multiplies too
        ("$9", "1", 0.0),  # unset variable reads 0
    ],
)
def test_macro_arithmetic(expr: str, params: str, value: float) -> None:
    assert macro_value(expr, params) == pytest.approx(value, abs=1e-9)


def test_macro_variable_assignment_and_comments() -> None:
    ap = aperture(
        "%AMA*\n0 a comment, with $1 and commas*\n$4=$1x2*\n$5=$4+$2*\n1,1,$5,0,0*\n%\n"
        "%ADD10A,0.5X1*%"
    )
    # $4 = 1, $5 = 2 -> circle of diameter 2
    assert np.ptp(ap.parts[0][1][:, 0]) == pytest.approx(2.0, abs=2 * TOL)


# ----------------------------------------------------------------------------- primitives


def test_circle_primitive_rotates_about_macro_origin() -> None:
    ap = aperture("%AMCI*1,1,1,2,0,90*%\n%ADD10CI*%")
    c = ap.parts[0][1][:-1].mean(axis=0)
    np.testing.assert_allclose(c, [0, 2], atol=1e-12)


@pytest.mark.parametrize("code", [20, 2])
def test_vector_line(code: int) -> None:
    ap = aperture(f"%AMV*{code},1,0.5,0,0,4,0,0*%\n%ADD10V*%")
    assert Polygon(ap.parts[0][1]).area == pytest.approx(2.0)
    np.testing.assert_allclose(ap.parts[0][1].min(axis=0), [0, -0.25])
    rot = aperture(f"%AMV*{code},1,0.5,0,0,4,0,90*%\n%ADD10V*%")
    np.testing.assert_allclose(rot.parts[0][1].min(axis=0), [-0.25, 0], atol=1e-12)
    np.testing.assert_allclose(rot.parts[0][1].max(axis=0), [0.25, 4], atol=1e-12)


def test_center_line_and_lower_left_line() -> None:
    c = aperture("%AMCL*21,1,2,1,1,0,90*%\n%ADD10CL*%")
    # 2 x 1 centred at (1, 0), rotated 90 degrees about the origin: 1 x 2 centred at (0, 1)
    np.testing.assert_allclose(c.parts[0][1].min(axis=0), [-0.5, 0], atol=1e-12)
    np.testing.assert_allclose(c.parts[0][1].max(axis=0), [0.5, 2], atol=1e-12)
    ll = aperture("%AML*22,1,2,1,1,1,0*%\n%ADD10L*%")
    np.testing.assert_allclose(ll.parts[0][1].min(axis=0), [1, 1])
    np.testing.assert_allclose(ll.parts[0][1].max(axis=0), [3, 2])


def test_outline_primitive_with_rotation() -> None:
    ap = aperture("%AMOU*4,1,4,0,0,2,0,2,1,0,1,0,0,90*%\n%ADD10OU*%")
    ring = ap.parts[0][1]
    assert Polygon(ring).area == pytest.approx(2.0)
    np.testing.assert_allclose(ring.min(axis=0), [-1, 0], atol=1e-12)
    np.testing.assert_allclose(ring.max(axis=0), [0, 2], atol=1e-12)


def test_polygon_primitive() -> None:
    ap = aperture("%AMPO*5,1,6,1,0,2,0*%\n%ADD10PO*%")
    ring = ap.parts[0][1]
    assert Polygon(ring).area == pytest.approx(3 * math.sin(math.pi / 3))
    np.testing.assert_allclose(ring[0], [2, 0])


def test_thermal_primitive_area() -> None:
    # Annulus R=1, r=0.6 cut by a cross of half-width h=0.1 (h*sqrt2 <= r). Area inside a
    # circle of radius a within the strip |x| <= h: S(a) = 2 (h sqrt(a^2-h^2) + a^2 asin(h/a)).
    # Thermal = pi (R^2 - r^2) - 2 S(R) + 2 S(r)   (the central square cancels).
    def strip(a: float, h: float) -> float:
        return 2 * (h * math.sqrt(a * a - h * h) + a * a * math.asin(h / a))

    big_r, small_r, h = 1.0, 0.6, 0.1
    exact = math.pi * (big_r**2 - small_r**2) - 2 * strip(big_r, h) + 2 * strip(small_r, h)
    ap = aperture("%AMT*7,0,0,2,1.2,0.2,0*%\n%ADD10T*%")
    assert len(ap.parts) == 4
    assert all(d for d, _ in ap.parts)
    area = unary_union([Polygon(r) for _, r in ap.parts]).area
    assert exact - 2 * math.pi * (big_r + small_r) * TOL <= area <= exact + 1e-9
    rot = aperture("%AMT*7,0,0,2,1.2,0.2,45*%\n%ADD10T*%")
    area45 = unary_union([Polygon(r) for _, r in rot.parts]).area
    assert area45 == pytest.approx(area, rel=1e-9)
    # rotated 45 degrees, the gaps lie on the diagonals: the point (0.8, 0) is now copper
    assert unary_union([Polygon(r) for _, r in rot.parts]).contains(
        Polygon([(0.79, -0.01), (0.81, -0.01), (0.81, 0.01), (0.79, 0.01)])
    )


def test_moire_rings_approximated() -> None:
    # outer 2, ring thickness 0.1, gap 0.1, 3 rings, no cross hair:
    # annuli 1..0.9, 0.8..0.7, 0.6..0.5 -> pi (0.19 + 0.15 + 0.11) = 0.45 pi
    ap = aperture("%AMM*6,0,0,2,0.1,0.1,3,0,0,0*%\n%ADD10M*%")
    area = unary_union([Polygon(r) for _, r in ap.parts]).area
    assert area == pytest.approx(0.45 * math.pi, abs=2 * math.pi * 2 * 3 * TOL)


def test_exposure_off_is_a_clear_part() -> None:
    ap = aperture("%AMX*1,1,2,0,0*1,0,1,0,0*%\n%ADD10X*%")
    assert [d for d, _ in ap.parts] == [True, False]
    assert shape(ap).area == pytest.approx(0.75 * math.pi, abs=2 * math.pi * 1.5 * TOL)


def test_macro_values_are_in_file_units() -> None:
    ap = aperture("%AMR*21,1,$1,$2,0,0,0*%\n%ADD10R,0.1X0.2*%", head="%FSLAX25Y25*%\n%MOIN*%\n")
    np.testing.assert_allclose(np.ptp(ap.parts[0][1], axis=0), [2.54, 5.08])


def test_real_world_rounded_rectangle_macro() -> None:
    # The rounded-rectangle macro with four corner circles and four edge lines, as found
    # in the corpus: a 1.5 x 1.0 pad with corner radius 0.25 has area
    # 1.5 * 1.0 - (4 - pi) * 0.25^2.
    macro = (
        "%AMRoundRect*\n0 Rectangle with rounded corners*\n4,1,4,$2,$3,$4,$5,$6,$7,$8,$9,$2,$3,0*\n"
        "1,1,$1+$1,$2,$3*\n1,1,$1+$1,$4,$5*\n1,1,$1+$1,$6,$7*\n1,1,$1+$1,$8,$9*\n"
        "20,1,$1+$1,$2,$3,$4,$5,0*\n20,1,$1+$1,$4,$5,$6,$7,0*\n"
        "20,1,$1+$1,$6,$7,$8,$9,0*\n20,1,$1+$1,$8,$9,$2,$3,0*%\n"
    )
    ap = aperture(macro + "%ADD10RoundRect,0.25X-0.5X-0.25X0.5X-0.25X0.5X0.25X-0.5X0.25X0*%")
    exact = 1.5 * 1.0 - (4 - math.pi) * 0.25**2
    assert shape(ap).area == pytest.approx(exact, abs=2 * math.pi * 0.25 * TOL + 1e-9)

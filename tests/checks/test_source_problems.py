"""A [[part]]'s winding values that make no sense: named, replaced by the defaults."""

from __future__ import annotations

import pytest

from fluxshadow.board.magnetics import Magnetic, body_outline
from fluxshadow.checks.settings import Settings
from fluxshadow.checks.source import checked_part, source_model
from fluxshadow.io.config import PartConfig


def _magnetic(height_mm: float | None = 3.0) -> Magnetic:
    return Magnetic(
        ref="L2",
        kind="inductor",
        value_h=2.2e-6,
        value_text="2.2uH",
        package="",
        description="",
        side="top",
        x_mm=0.0,
        y_mm=0.0,
        rotation_deg=0.0,
        body_mm=(5.0, 4.0),
        height_mm=height_mm,
        outline=body_outline(0.0, 0.0, 5.0, 4.0, 0.0),
        body_from="config",
        reasons=(),
    )


@pytest.mark.parametrize(
    ("values", "dropped", "message"),
    [
        ({"winding_radius_mm": 2.6}, "winding_radius_mm", "at most half the body's longer side"),
        ({"winding_radius_mm": -1.0}, "winding_radius_mm", "must be a positive radius"),
        ({"turns": 0.0}, "turns", "must be a positive number of turns for L2; got 0"),
        ({"winding_bottom_mm": -0.2}, "winding_bottom_mm", "must be a height >= 0"),
        ({"winding_bottom_mm": 3.0}, "winding_bottom_mm", "below the body height (3 mm)"),
        (
            {"winding_bottom_mm": 1.0, "winding_height_mm": 2.5},
            "winding_height_mm",
            "at most the body height (3 mm) less winding_bottom_mm (1 mm) for L2; got 2.5 mm",
        ),
        ({"winding_height_mm": 0.0}, "winding_height_mm", "must be a positive length"),
        (
            {"axis": "horizontal", "winding_height_mm": 6.0},
            "winding_height_mm",
            "at most the body's longer side (5 mm) for a horizontal winding",
        ),
    ],
)
def test_values_that_do_not_fit_the_part_fall_back(
    values: dict[str, float], dropped: str, message: str
) -> None:
    part = PartConfig(ref="L2", **values)  # type: ignore[arg-type]
    checked, problems = checked_part(_magnetic(), part, key="f.toml: part[3]")
    assert checked is not None
    assert getattr(checked, dropped) is None
    (problem,) = problems
    assert problem.startswith(f"f.toml: part[3].{dropped} must be ")
    assert message in problem
    assert problem.endswith("; the default is used instead")
    # the source model uses the default and says so
    src = source_model(_magnetic(), part, Settings(), key="f.toml: part[3]")
    assert src.problems == problems
    assert src.turns > 0
    assert src.winding_radius_mm > 0
    assert src.winding_height_mm > 0
    assert src.winding_radius_mm <= 2.5
    assert any(dropped in a for a in src.assumptions)


def test_sound_values_pass_unchanged() -> None:
    part = PartConfig(
        ref="L2", turns=6, winding_radius_mm=1.8, winding_bottom_mm=0.3, winding_height_mm=2.7
    )
    checked, problems = checked_part(_magnetic(), part)
    assert checked is part
    assert problems == ()
    src = source_model(_magnetic(), part, Settings())
    assert (src.turns, src.winding_radius_mm, src.winding_height_mm) == (6, 1.8, 2.7)
    assert src.problems == ()


def test_heights_are_not_checked_against_an_assumed_body_height() -> None:
    # no stated or package height: the default body height is a guess, not a limit
    part = PartConfig(ref="L2", winding_bottom_mm=0.5, winding_height_mm=4.0)
    checked, problems = checked_part(_magnetic(height_mm=None), part)
    assert checked is part
    assert problems == ()
    # a stated height_mm in the part entry is a limit
    stated = PartConfig(ref="L2", height_mm=2.0, winding_bottom_mm=0.5, winding_height_mm=4.0)
    _checked, problems = checked_part(_magnetic(height_mm=None), stated)
    assert len(problems) == 1
    assert 'ref = "L2"' in problems[0]

"""Gerber job file reader (fluxshadow.io.jobfile).

``data/fictional-buck4.gbrjob`` is hand-written for a fictional 4-layer board (no real design
behind it); the section and key names follow the Gerber job file format (``Header``,
``GeneralSpecs``, ``FilesAttributes``, ``MaterialStackup``; lengths in mm), from memory.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest

from fluxshadow.errors import InputError, ParseError
from fluxshadow.io.jobfile import parse_job_file, read_job_file

DATA = Path(__file__).parent / "data"
JOB = DATA / "fictional-buck4.gbrjob"


def test_read_fictional_job_file() -> None:
    job = read_job_file(JOB)
    assert job.source == str(JOB)
    assert job.board_thickness_mm == pytest.approx(1.6)
    kinds = [la.kind for la in job.stackup]
    assert kinds == [
        "other",
        "other",
        "soldermask",
        "copper",
        "dielectric",
        "copper",
        "dielectric",
        "dielectric",
        "copper",
        "dielectric",
        "copper",
        "soldermask",
    ]
    copper = [la for la in job.stackup if la.kind == "copper"]
    assert [la.name for la in copper] == ["L1", "L2", "L3", "L4"]
    assert [la.thickness_mm for la in copper] == pytest.approx([0.035, 0.0152, 0.0152, 0.035])
    assert [la.source_file for la in copper] == [
        "buck4-top.gbr",
        "buck4-gnd.gbr",
        "buck4-pwr.gbr",
        "buck4-bot.gbr",
    ]
    dielectric = [la for la in job.stackup if la.kind == "dielectric"]
    assert [la.name for la in dielectric] == ["Prepreg 1", "Core a", "Core b", "Prepreg 2"]
    assert [la.epsilon_r for la in dielectric] == pytest.approx([4.4, 4.6, 4.6, 4.4])
    assert dielectric[0].material == "FR4 prepreg 7628"
    # Legend and paste give no thickness: 0, not unknown.
    assert job.stackup[0].thickness_mm == 0.0
    assert job.layer_files["buck4-pwr.gbr"] == "Copper,L3,Inr,Plane"
    assert job.layer_files["buck4-edge.gbr"] == "Profile,NP"
    assert len(job.layer_files) == 6
    # The stated board thickness is the sum of the layers (within a mask's thickness).
    total = sum(la.thickness_mm for la in job.stackup)
    assert total == pytest.approx(1.6, abs=0.05)


def test_malformed_json_names_line(tmp_path: Path) -> None:
    bad = tmp_path / "bad.gbrjob"
    bad.write_text('{\n  "Header": {},\n  "GeneralSpecs": {\n    "LayerNumber": 4,,\n  }\n}\n')
    with pytest.raises(ParseError) as err:
        read_job_file(bad)
    assert err.value.line == 4
    assert err.value.file == str(bad)
    assert f"{bad}:4:" in str(err.value)
    assert "valid JSON" in str(err.value)


@pytest.mark.parametrize(
    ("doc", "match"),
    [
        ([1, 2], "JSON object"),
        ({"Foo": 1}, "Header"),
        ({"Header": {}, "GeneralSpecs": {"BoardThickness": "thick"}}, "BoardThickness"),
        ({"Header": {}, "GeneralSpecs": {"BoardThickness": -1}}, "positive"),
        ({"Header": {}, "FilesAttributes": {"Path": "x"}}, "FilesAttributes must be a list"),
        ({"Header": {}, "FilesAttributes": [{"FileFunction": "Copper,L1,Top"}]}, r"\[0\]\.Path"),
        ({"Header": {}, "MaterialStackup": [{"Thickness": 1}]}, r"MaterialStackup\[0\]\.Type"),
        (
            {"Header": {}, "MaterialStackup": [{"Type": "Copper", "Thickness": "x"}]},
            r"MaterialStackup\[0\]\.Thickness must be a positive number",
        ),
        (
            {"Header": {}, "MaterialStackup": [{"Type": "Dielectric", "DielectricConstant": 0.5}]},
            "DielectricConstant must be >= 1",
        ),
    ],
)
def test_bad_values(doc: object, match: str) -> None:
    with pytest.raises(ParseError, match=match):
        parse_job_file(json.dumps(doc, indent=2), source="x.gbrjob")


def test_bad_value_line_is_located() -> None:
    text = json.dumps(
        {
            "Header": {},
            "MaterialStackup": [
                {"Type": "Copper", "Thickness": 0.035},
                {"Type": "Dielectric", "Thickness": "thin"},
            ],
        },
        indent=2,
    )
    with pytest.raises(ParseError) as err:
        parse_job_file(text, source="x.gbrjob")
    line = text.splitlines()[err.value.line - 1]  # type: ignore[operator]
    assert '"Type": "Dielectric"' in line


def test_missing_thickness_is_unknown_and_numeric_strings_accepted() -> None:
    text = json.dumps(
        {
            "Header": {},
            "GeneralSpecs": {"BoardThickness": "1.0"},
            "MaterialStackup": [
                {"Type": "Copper", "Name": "F.Cu"},
                {"Type": "Dielectric", "Material": "FR4"},
                {"Type": "Copper", "Thickness": "0.035", "Name": "B.Cu"},
            ],
        }
    )
    job = parse_job_file(text)
    assert job.board_thickness_mm == 1.0
    assert math.isnan(job.stackup[0].thickness_mm)
    assert math.isnan(job.stackup[1].thickness_mm)
    assert job.stackup[2].thickness_mm == pytest.approx(0.035)
    assert job.stackup[1].epsilon_r is None
    assert job.layer_files == {}


def test_byte_order_mark_and_unreadable(tmp_path: Path) -> None:
    p = tmp_path / "bom.gbrjob"
    p.write_bytes(b"\xef\xbb\xbf" + JOB.read_bytes())
    assert len(read_job_file(p).stackup) == 12
    with pytest.raises(InputError, match="readable"):
        read_job_file(tmp_path / "missing.gbrjob")
    latin = tmp_path / "latin.gbrjob"
    latin.write_bytes(b'{\n"Header": {"x": "\xe9"}}')
    with pytest.raises(ParseError, match="UTF-8") as err:
        read_job_file(latin)
    assert err.value.line == 2

"""The ``fluxshadow`` command through its real entry point."""

from __future__ import annotations

import json
import shutil
import subprocess
import sys
from pathlib import Path

import pytest
from typer.testing import CliRunner

from fluxshadow.cli.app import app

REPO = Path(__file__).resolve().parents[2]
MINI4 = REPO / "fixtures" / "mini4"

runner = CliRunner()


def test_stack_json_lists_layers_top_to_bottom() -> None:
    result = runner.invoke(app, ["stack", str(MINI4), "--format", "json"])
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    assert data["schema_version"] == 1
    assert [lay["name"] for lay in data["layers"]] == ["L1", "L2", "L3", "L4"]
    assert data["layers"][1]["identified_by"] == "x2-attribute"
    # Layer 2 is the 39 x 29 mm plane minus the 3 x 3 void and 7 antipads of 0.9 mm
    # (inscribed 32-gons, area (N/2) r^2 sin(2 pi / N)) plus via pads of 0.6 mm inside
    # them: hand computation from the mini4 description.
    import math

    def ngon(d: float, n: int = 32) -> float:
        return n / 2 * (d / 2) ** 2 * math.sin(2 * math.pi / n)

    expected = 39 * 29 - 9 - 7 * ngon(0.9) + 7 * ngon(0.6)
    assert data["layers"][1]["copper_area_mm2"] == pytest.approx(expected, abs=0.05)
    assert data["stackup"]["source"] == "job file"


def test_stack_text_names_evidence_and_files() -> None:
    result = runner.invoke(app, ["stack", str(MINI4)])
    assert result.exit_code == 0, result.output
    assert "x2-attribute" in result.stdout
    assert "mini4-profile.gbr" in result.stdout
    assert "board outline" in result.stdout


def test_parts_json_has_magnetics_exclusions_and_fit() -> None:
    result = runner.invoke(app, ["parts", str(MINI4), "-f", "json"])
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    assert [m["ref"] for m in data["magnetics"]] == ["L1", "L2"]
    assert {e["ref"] for e in data["excluded"]} == {"FB1", "L3"}
    assert data["frame_fit"]["method"] == "identity"
    assert len(data["magnetics"][0]["outline_mm"]) == 5


def test_missing_package_is_exit_2_without_traceback(tmp_path: Path) -> None:
    result = runner.invoke(app, ["stack", str(tmp_path / "nope")])
    assert result.exit_code == 2
    assert "does not exist" in result.stderr
    assert "Traceback" not in result.output


def test_malformed_gerber_names_file_and_line(tmp_path: Path) -> None:
    pkg = tmp_path / "pkg"
    shutil.copytree(MINI4, pkg)
    f = pkg / "mini4-copper-L3-inr.gbr"
    lines = f.read_text().splitlines()
    lines.insert(8, "%ADD99Q,1.0*%")  # no such standard aperture and no such macro
    f.write_text("\n".join(lines) + "\n")
    result = runner.invoke(app, ["stack", str(pkg)])
    assert result.exit_code == 2
    assert "mini4-copper-L3-inr.gbr:9" in result.stderr
    assert "Traceback" not in result.output


def test_bad_config_is_exit_2_naming_the_key(tmp_path: Path) -> None:
    cfg = tmp_path / "fluxshadow.toml"
    cfg.write_text("[placement]\noffset_x_mm = 'left'\n")
    result = runner.invoke(app, ["parts", str(MINI4), "--config", str(cfg)])
    assert result.exit_code == 2
    assert "offset_x_mm" in result.stderr


def test_output_file_is_written_whole(tmp_path: Path) -> None:
    out = tmp_path / "reports" / "stack.json"
    result = runner.invoke(app, ["stack", str(MINI4), "-f", "json", "-o", str(out)])
    assert result.exit_code == 0, result.output
    assert json.loads(out.read_text())["command"] == "stack"
    assert [p.name for p in out.parent.iterdir()] == ["stack.json"]  # no temp file left


def test_console_script_smoke() -> None:
    proc = subprocess.run(
        [sys.executable, "-m", "fluxshadow", "parts", str(MINI4), "--format", "json"],
        capture_output=True,
        text=True,
        check=False,
        timeout=120,
    )
    assert proc.returncode == 0, proc.stderr
    assert json.loads(proc.stdout)["magnetics"][1]["ref"] == "L2"


def test_zip_entry_escaping_the_folder_is_refused(tmp_path: Path) -> None:
    import zipfile

    archive = tmp_path / "evil.zip"
    with zipfile.ZipFile(archive, "w") as z:
        for f in sorted(MINI4.iterdir()):
            z.write(f, f.name)
        z.writestr("../outside.gbr", "G04 escape*\nM02*\n")
    result = runner.invoke(app, ["stack", str(archive)])
    assert result.exit_code == 2
    assert "evil.zip" in result.stderr
    assert "outside.gbr" in result.stderr
    assert not (tmp_path / "outside.gbr").exists()


def test_truncated_gerber_is_read_with_a_notice(tmp_path: Path) -> None:
    pkg = tmp_path / "pkg"
    shutil.copytree(MINI4, pkg)
    f = pkg / "mini4-copper-L3-inr.gbr"
    text = f.read_text()
    f.write_text(text[: text.rindex("M02*")])  # the end-of-file statement is missing
    result = runner.invoke(app, ["stack", str(pkg), "-f", "json"])
    assert result.exit_code == 0, result.output
    notices = json.loads(result.stdout)["notices"]
    assert any("mini4-copper-L3-inr.gbr" in n and "M02" in n for n in notices)


def test_unclassified_files_are_listed_not_dropped(tmp_path: Path) -> None:
    pkg = tmp_path / "pkg"
    shutil.copytree(MINI4, pkg)
    (pkg / "mystery.dat").write_bytes(b"\x00\x01\x02binary")
    (pkg / "notes.txt").write_text("ordered from the usual fab\n")
    result = runner.invoke(app, ["stack", str(pkg), "-f", "json"])
    assert result.exit_code == 0, result.output
    files = {f["file"]: f["use"] for f in json.loads(result.stdout)["files"]}
    assert "mystery.dat" in files
    assert "notes.txt" in files

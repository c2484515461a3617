"""The HTML report: self-contained, escaped, and rendered by a real headless browser.

The browser tests run Chromium (Debian package ``chromium``) headless and skip when it is
absent. Console messages (script errors, refused loads) appear in its stderr log as
``...:INFO:CONSOLE...`` lines with ``--enable-logging=stderr`` (observed with Chromium
from Debian 13); the page must produce none.
"""

from __future__ import annotations

import re
import shutil
import subprocess
from dataclasses import replace
from html.parser import HTMLParser
from pathlib import Path

import numpy as np
import pytest
from matplotlib import image as mpimg
from typer.testing import CliRunner

import fluxshadow
from fluxshadow.checks.model import Finding, Report
from fluxshadow.checks.run import run_checks
from fluxshadow.cli.app import app
from fluxshadow.report.html import picture_data_uri, report_to_html

REPO = Path(__file__).resolve().parents[2]
MINI4 = REPO / "fixtures" / "mini4"
SVG = (
    b'<svg xmlns="http://www.w3.org/2000/svg" width="120" height="60" viewBox="0 0 120 60">'
    b'<rect width="120" height="60" fill="#3a7d44"/><circle cx="60" cy="30" r="20" '
    b'fill="#d1495b"/></svg>'
)
CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")


@pytest.fixture(scope="module")
def report() -> Report:
    return run_checks(fluxshadow.load_package(MINI4))


class _Collect(HTMLParser):
    """Every start tag with its attributes, and the text."""

    def __init__(self) -> None:
        super().__init__()
        self.tags: list[tuple[str, dict[str, str | None]]] = []
        self.text: list[str] = []

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        self.tags.append((tag, dict(attrs)))

    def handle_data(self, data: str) -> None:
        self.text.append(data)


def _parse(page: str) -> _Collect:
    p = _Collect()
    p.feed(page)
    p.close()
    return p


def test_page_has_the_sections(report: Report) -> None:
    page = report_to_html(report)
    p = _parse(page)
    ids = {a.get("id") for _, a in p.tags if a.get("id")}
    assert {"summary", "assumptions", "cautions", "rules", "inputs"} <= ids
    parts = [a.get("data-ref") for t, a in p.tags if t == "section" and "data-ref" in a]
    assert parts == [m.ref for m in report.magnetics]
    text = "".join(p.text)
    for i in report.inputs:
        assert i.sha256 in text
    for f in report.findings:
        assert f.message in text
    assert page.startswith("<!DOCTYPE html>")


def test_page_loads_nothing_from_outside(report: Report) -> None:
    page = report_to_html(report, pictures={report.magnetics[0].ref: SVG})
    p = _parse(page)
    for tag, attrs in p.tags:
        assert tag not in {"script", "link", "iframe", "object", "embed"}
        for name in ("src", "href"):
            value = attrs.get(name)
            if value is not None:
                assert value.startswith(("data:", "#")), (tag, value)
    assert not re.search(r"url\(|@import|https?://", page.split("<body>")[0])
    assert "default-src 'none'" in page


def test_summary_counts(report: Report) -> None:
    page = report_to_html(report)
    row = re.search(r"<tr class=\"total\">(.*?)</tr>", page)
    assert row is not None
    nums = [int(n) for n in re.findall(r'<td class="num[^"]*">(\d+)</td>', row.group(1))]
    expected = [
        sum(1 for f in report.findings if f.severity == s and not f.waived)
        for s in ("error", "warning", "note")
    ]
    assert nums == [*expected, sum(1 for f in report.findings if f.waived)]


def test_everything_is_escaped(report: Report) -> None:
    evil = "<script>alert(1)</script>"
    m0 = replace(report.magnetics[0], ref=evil, value_text='"><b>x</b>')
    f = Finding(
        rule="plane-void",
        severity="error",
        ref=evil,
        layer="L2",
        x_mm=1.0,
        y_mm=2.0,
        message=f"message {evil} & more",
        metrics={evil: evil},
        waived=True,
        waiver_reason=evil,
    )
    r = replace(
        report,
        package=evil,
        magnetics=(m0, *report.magnetics[1:]),
        findings=(f,),
        notices=(evil,),
        assumptions=(evil,),
    )
    page = report_to_html(r)
    assert "<script>" not in page
    assert "<b>x</b>" not in page
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in page
    p = _parse(page)
    assert not any(t == "script" for t, _ in p.tags)
    ids = [a["id"] for _, a in p.tags if a.get("id")]
    assert len(ids) == len(set(ids))
    assert all(re.fullmatch(r"[A-Za-z0-9_-]+", i or "") for i in ids)


def test_pictures_are_embedded() -> None:
    uri = picture_data_uri(SVG)
    assert uri is not None
    assert uri.startswith("data:image/svg+xml;base64,")
    png = b"\x89PNG\r\n\x1a\n" + b"\0" * 16  # PNG signature (PNG spec, section 5.2)
    assert (picture_data_uri(png) or "").startswith("data:image/png;base64,")
    assert picture_data_uri(b"GIF89a....") is None


def test_unknown_picture_is_said_not_shown(report: Report) -> None:
    page = report_to_html(report, pictures={report.magnetics[0].ref: b"GIF89a"})
    assert "neither SVG nor PNG" in page
    assert "data:image" not in page.split("<style>")[1].split("</style>")[1]


def _chromium(args: list[str], target: Path, tmp: Path) -> subprocess.CompletedProcess[str]:
    assert CHROMIUM is not None
    cmd = [
        CHROMIUM,
        "--headless",
        "--no-sandbox",
        "--disable-gpu",
        "--disable-background-networking",
        "--disable-component-update",
        "--no-first-run",
        "--disable-sync",
        f"--user-data-dir={tmp / 'profile'}",
        "--enable-logging=stderr",
        "--v=0",
        *args,
        target.as_uri(),
    ]
    return subprocess.run(cmd, capture_output=True, text=True, timeout=90, check=False)


def _console(stderr: str) -> list[str]:
    return [line for line in stderr.splitlines() if ":CONSOLE" in line]


needs_chromium = pytest.mark.skipif(CHROMIUM is None, reason="chromium is not installed")


@needs_chromium
def test_renders_in_a_browser_without_console_errors(report: Report, tmp_path: Path) -> None:
    page = tmp_path / "report.html"
    page.write_text(report_to_html(report, pictures={report.magnetics[0].ref: SVG}), "utf-8")
    run = _chromium(["--dump-dom"], page, tmp_path)
    assert run.returncode == 0, run.stderr[-2000:]
    assert _console(run.stderr) == []
    dom = run.stdout
    for section in ("summary", "assumptions", "cautions", "inputs"):
        assert f'id="{section}"' in dom
    for m in report.magnetics:
        assert f'data-ref="{m.ref}"' in dom
    assert "data:image/svg+xml;base64," in dom


@needs_chromium
def test_the_console_check_can_fail(tmp_path: Path) -> None:
    """A page with an outside image under the same policy is refused, and we see it."""
    page = tmp_path / "bad.html"
    page.write_text(
        '<!DOCTYPE html><html><head><meta http-equiv="Content-Security-Policy" '
        "content=\"default-src 'none'; img-src data:\"><title>x</title></head>"
        '<body><img src="http://127.0.0.1:9/x.png" alt=""></body></html>',
        "utf-8",
    )
    run = _chromium(["--dump-dom"], page, tmp_path)
    assert any("Content Security Policy" in line for line in _console(run.stderr))


@needs_chromium
def test_screenshot_shows_the_palette(report: Report, tmp_path: Path) -> None:
    page = tmp_path / "report.html"
    page.write_text(report_to_html(report, pictures={report.magnetics[0].ref: SVG}), "utf-8")
    shot = tmp_path / "shot.png"
    run = _chromium(["--window-size=1200,1400", f"--screenshot={shot}"], page, tmp_path)
    assert run.returncode == 0, run.stderr[-2000:]
    rgb = (mpimg.imread(shot)[..., :3] * 255).round().astype(int)
    assert rgb.shape[:2] == (1400, 1200)

    def has(color: str, tol: int = 6) -> bool:
        want = np.array([int(color[i : i + 2], 16) for i in (1, 3, 5)])
        return bool((np.abs(rgb - want).max(axis=-1) <= tol).any())

    # heading slate blue, plane-copper green (strips and the test picture), the picture's red
    assert has("#30638e")
    assert has("#3a7d44")
    assert has("#d1495b")


def test_cli_writes_html(tmp_path: Path) -> None:
    out = tmp_path / "report.html"
    result = CliRunner().invoke(app, ["check", str(MINI4), "--format", "html", "-o", str(out)])
    assert result.exit_code == 0, result.output
    page = out.read_text(encoding="utf-8")
    assert page.startswith("<!DOCTYPE html>")
    assert 'id="part-L1"' in page

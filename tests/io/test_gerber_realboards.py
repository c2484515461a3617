"""Gerber reader on every Gerber file of the shared real-board corpus.

Every file the content sniffer calls Gerber must parse without error and give a
well-formed record. Expected file functions, units and G36 counts come from the "Files
saved here" tables of each board's ``SOURCE.md`` (which counted ``G36`` regions and
``%LPC`` blocks in the files).
"""

from __future__ import annotations

import re
from collections.abc import Callable
from pathlib import Path

import numpy as np
import pytest

from fluxshadow.io.gerber import looks_like_gerber, read_gerber, read_gerber_header
from fluxshadow.io.records import FLASH, REGION, TRACK, ArtworkRecord

_CORPUS = Path(__file__).resolve().parents[2].parent / "shared" / "realboards"


def _head(p: Path) -> str:
    with p.open("rb") as fh:
        return fh.read(8192).decode("utf-8", errors="replace")


def _corpus_gerbers() -> list[tuple[str, str]]:
    out: list[tuple[str, str]] = []
    if not _CORPUS.is_dir():
        return [("(corpus absent)", "")]
    for board in sorted(p for p in _CORPUS.iterdir() if p.is_dir()):
        for p in sorted(board.rglob("*")):
            if p.is_file() and looks_like_gerber(_head(p)):
                out.append((board.name, str(p.relative_to(board))))
    return out


GERBERS = _corpus_gerbers()

# board, file, FileFunction (None: no X2 function), units, G36 regions (SOURCE.md)
FACTS = [
    ("bq25798-mppt-v2.1", "Gerber_TopLayer.GTL", None, "mm", 141),
    ("cheap-focer-2", "Cheap FOCer 2 60mm-Top_Signal.gbr", "Copper,L1,Top", "mm", 459),
    ("cheap-focer-2", "Cheap FOCer 2 60mm-Bottom_Signal.gbr", "Copper,L2,Bot", "mm", 29),
    ("huvud-tiny2", "Huvud-In1_Cu.g2", "Copper,L2,Inr", "mm", 5),
    ("huvud-tiny2", "Huvud-In2_Cu.g3", "Copper,L3,Inr", "mm", 3),
    ("incunest-motherboard", "Motherboard.G1", None, "inch", 284),
    ("incunest-motherboard", "Motherboard.G2", None, "inch", 411),
    ("limesdr-xtrx-1v1", "LimeSDR-XTRX_1v1.G3", None, "mm", 218),
    ("pycubed-mainboard-v05", "gerbers/mainboard-F_Cu.gtl", "Copper,L1,Top", "mm", 215),
    ("pycubed-mainboard-v05", "gerbers/mainboard-Route15.g3", "Copper,L3,Inr", "mm", 4),
    ("thunderscope-rev5.3", "Thunderscope_Rev5.3-Int3 (Sign).g3", "Copper,L4,Inr", "mm", 499),
    ("thunderscope-rev5.3", "Thunderscope_Rev5.3-Top Layer.gtl", "Copper,L1,Top", "mm", 98),
]

# Regions whose only contour has fewer than three distinct vertices (zero area), which
# the reader drops: counted by hand in the files.
DEGENERATE_REGIONS = {"LimeSDR-XTRX_1v1.GTL": 1, "LimeSDR-XTRX_1v1.GBL": 1}


def check_record(rec: ArtworkRecord) -> None:
    """Structural invariants of an ArtworkRecord (see the records module docstring)."""
    n = rec.n_objects
    for name in ("obj_dark", "obj_aperture", "obj_net", "obj_component", "obj_function"):
        assert getattr(rec, name).shape == (n,), name
    assert rec.obj_xy.shape == (n, 2)
    rs, vs = rec.obj_ring_start, rec.ring_vertex_start
    assert rs.shape == (n + 1,)
    assert rs[0] == 0
    assert np.all(np.diff(rs) >= 0)
    m = int(rs[-1])
    assert vs.shape == (m + 1,)
    assert vs[0] == 0
    assert np.all(np.diff(vs) >= 0)
    assert vs[-1] == rec.vertices.shape[0]
    assert np.all(np.isfinite(rec.vertices))
    assert np.all(np.isfinite(rec.obj_xy))
    n_rings = np.diff(rs)
    kind = rec.obj_kind
    assert set(np.unique(kind).tolist()) <= {FLASH, TRACK, REGION}
    assert np.all(n_rings[kind == FLASH] == 0)
    assert np.all(n_rings[kind == TRACK] == 1)
    assert np.all(n_rings[kind == REGION] >= 1)
    ring_len = np.diff(vs)
    track_rings = rs[:-1][kind == TRACK]
    assert np.all(ring_len[track_rings] >= 2)
    region_ring = np.zeros(m, dtype=bool)
    for i in np.flatnonzero(kind == REGION):
        region_ring[rs[i] : rs[i + 1]] = True
    assert np.all(ring_len[region_ring] >= 4)
    firsts = rec.vertices[vs[:-1][region_ring]]
    lasts = rec.vertices[vs[1:][region_ring] - 1]
    np.testing.assert_array_equal(firsts, lasts)
    has_ring = n_rings > 0
    np.testing.assert_array_equal(rec.obj_xy[has_ring], rec.vertices[vs[rs[:-1][has_ring]]])
    ap = rec.obj_aperture
    assert np.all(ap[kind == REGION] == -1)
    assert np.all((ap[kind != REGION] >= 0) & (ap[kind != REGION] < len(rec.apertures)))
    for arr, table in (
        (rec.obj_net, rec.nets),
        (rec.obj_component, rec.components),
        (rec.obj_function, rec.functions),
    ):
        assert np.all((arr >= -1) & (arr < len(table)))
    for a in rec.apertures:
        for _dark, ring in a.parts:
            assert ring.ndim == 2
            assert ring.shape[1] == 2
            assert len(ring) >= 4
            np.testing.assert_array_equal(ring[0], ring[-1])


@pytest.mark.realboards
@pytest.mark.parametrize(("board", "rel"), GERBERS, ids=[f"{b}/{r}" for b, r in GERBERS])
def test_every_corpus_gerber_parses(realboard: Callable[[str], Path], board: str, rel: str) -> None:
    if not rel:
        pytest.skip("../shared/realboards is not present")
    path = realboard(board) / rel
    rec = read_gerber(path)
    check_record(rec)
    assert rec.size_bytes == path.stat().st_size
    text = path.read_text(encoding="utf-8", errors="replace")
    g36 = len(re.findall(r"G36\*", text))
    n_regions = int(np.count_nonzero(rec.obj_kind == REGION))
    assert n_regions == g36 - DEGENERATE_REGIONS.get(path.name, 0)
    if "%LPC*%" in text:
        assert not rec.obj_dark.all()
    else:
        assert rec.obj_dark.all()
    # the cheap header scan agrees with the full read on the file attributes
    attrs, _comments, units = read_gerber_header(path, max_bytes_scanned=1 << 30)
    assert attrs == rec.file_attributes
    assert units == rec.units_in_file
    assert not any("ends inside a statement" in n.message for n in rec.notices)


@pytest.mark.realboards
@pytest.mark.parametrize(("board", "rel", "function", "units", "g36"), FACTS)
def test_source_md_facts(
    realboard: Callable[[str], Path],
    board: str,
    rel: str,
    function: str | None,
    units: str,
    g36: int,
) -> None:
    path = realboard(board) / rel
    rec = read_gerber(path)
    assert rec.file_attributes.get("FileFunction") == function
    assert rec.units_in_file == units
    n_regions = int(np.count_nonzero(rec.obj_kind == REGION))
    assert n_regions == g36 - DEGENERATE_REGIONS.get(path.name, 0)
    assert rec.vertices.shape[0] > 0
    assert all(n.line is None or n.line >= 1 for n in rec.notices)


@pytest.mark.realboards
def test_corpus_copper_nets_and_functions(realboard: Callable[[str], Path]) -> None:
    # Copper layer with X2 object attributes as real %TO commands
    rec = read_gerber(realboard("thunderscope-rev5.3") / "Thunderscope_Rev5.3-Int1 (GND).g1")
    assert "GND" in rec.nets
    assert "Conductor" in rec.functions
    gnd = rec.nets.index("GND")
    assert np.count_nonzero(rec.obj_net == gnd) > 0
    # ... and with the attributes only inside G04 #@! comments
    rec2 = read_gerber(realboard("pycubed-mainboard-v05") / "gerbers/mainboard-F_Cu.gtl")
    assert rec2.file_attributes["FileFunction"] == "Copper,L1,Top"
    assert "SMDPad,CuDef" in rec2.functions

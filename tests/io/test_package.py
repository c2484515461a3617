"""Package discovery (fluxshadow.io.package): folders, zip and tar archives, limits, sniffing."""

from __future__ import annotations

import codecs
import io
import json
import os
import tarfile
import zipfile
from collections.abc import Callable
from pathlib import Path

import pytest

from fluxshadow.errors import InputError, LimitError
from fluxshadow.io.package import (
    HEAD_BYTES,
    Limits,
    _Budget,
    classify_head,
    decode_head,
    find_odb_jobs,
    open_package,
    scan_folder,
)
from fluxshadow.io.records import FileKind

# --------------------------------------------------------------------------- sample files

GERBER = (
    "G04 sample copper*\n"
    "%TF.FileFunction,Copper,L1,Top*%\n"
    "%FSLAX46Y46*%\n"
    "%MOMM*%\n"
    "%LPD*%\n"
    "%ADD10C,0.250000*%\n"
    "D10*\n"
    "X1000000Y1000000D02*\n"
    "X5000000Y1000000D01*\n"
    "M02*\n"
)
EXCELLON = "M48\nMETRIC,TZ\nT1C0.300\n%\nT1\nX10.0Y10.0\nX12.5Y10.0\nM30\n"
PLACEMENT = "Ref,Val,Package,PosX,PosY,Rot,Side\nL1,4.7uH,L_1210,10.0,20.0,90,top\n"
BOM = "Comment,Designator,Footprint,Quantity\n4.7uH,L1,L_1210,1\n"
JOB = json.dumps(
    {
        "Header": {"GenerationSoftware": {"Vendor": "test"}},
        "GeneralSpecs": {"LayerNumber": 2, "BoardThickness": 1.6},
        "FilesAttributes": [{"Path": "top.gbr", "FileFunction": "Copper,L1,Top"}],
    },
    indent=2,
)


def _write_sample(folder: Path) -> None:
    (folder / "gerbers").mkdir(parents=True)
    (folder / "gerbers" / "board-F_Cu.gbr").write_text(GERBER)
    (folder / "gerbers" / "board.drl").write_text(EXCELLON)
    (folder / "placement.csv").write_text(PLACEMENT)
    # UTF-16 with BOM, tab separated: must be recognised after decoding.
    (folder / "pick16.csv").write_bytes(
        codecs.BOM_UTF16_LE + PLACEMENT.replace(",", "\t").encode("utf-16-le")
    )
    (folder / "bom.csv").write_text(BOM)
    (folder / "board.gbrjob").write_text(JOB)
    (folder / "fluxshadow.toml").write_text("[stackup]\nepsilon_r = 4.5\n")
    (folder / "README.md").write_text("# Board\n%FSLAX46Y46*% is quoted here\n")
    (folder / "drawing.pdf").write_bytes(b"%PDF-1.7\n" + bytes(range(256)))
    (folder / "blob.bin").write_bytes(bytes(range(256)) * 4)
    (folder / "notes.txt").write_text("call the fab before ordering\n")


EXPECTED = {
    "README.md": FileKind.OTHER,
    "blob.bin": FileKind.OTHER,
    "board.gbrjob": FileKind.JOB,
    "bom.csv": FileKind.BOM,
    "drawing.pdf": FileKind.OTHER,
    "fluxshadow.toml": FileKind.CONFIG,
    "gerbers/board-F_Cu.gbr": FileKind.GERBER,
    "gerbers/board.drl": FileKind.EXCELLON,
    "notes.txt": FileKind.OTHER,
    "pick16.csv": FileKind.PLACEMENT,
    "placement.csv": FileKind.PLACEMENT,
}


# --------------------------------------------------------------------------- folders


def test_folder_classified_by_content(tmp_path: Path) -> None:
    _write_sample(tmp_path)
    with open_package(tmp_path) as pkg:
        assert pkg.files == EXPECTED
        assert list(pkg.files) == sorted(pkg.files)
        # Not classified and not ignored on purpose: listed, never dropped silently.
        assert pkg.unclassified == ("blob.bin", "notes.txt")
        assert pkg.root == str(tmp_path)
        assert pkg.display_root == str(tmp_path)


def test_content_not_extension(tmp_path: Path) -> None:
    (tmp_path / "top.txt").write_text(GERBER)
    (tmp_path / "drill.gbr").write_text(EXCELLON)
    (tmp_path / "layer.gtl").write_text(PLACEMENT)
    pkg = scan_folder(tmp_path)
    assert pkg.files == {
        "drill.gbr": FileKind.EXCELLON,
        "layer.gtl": FileKind.PLACEMENT,
        "top.txt": FileKind.GERBER,
    }


def test_missing_path_and_plain_file(tmp_path: Path) -> None:
    missing = tmp_path / "nope"
    with pytest.raises(InputError, match="does not exist") as err, open_package(missing):
        pass
    assert str(missing) in str(err.value)
    plain = tmp_path / "board.gtl"
    plain.write_text(GERBER)
    with pytest.raises(InputError, match="plain file") as err2, open_package(plain):
        pass
    assert str(plain) in str(err2.value)


def test_oversize_file_is_listed_not_read(tmp_path: Path) -> None:
    (tmp_path / "big.gbr").write_text(GERBER * 100)
    (tmp_path / "small.gbr").write_text(GERBER)
    pkg = scan_folder(tmp_path, limits=Limits(max_file_bytes=2000))
    assert pkg.files["big.gbr"] is FileKind.OTHER
    assert pkg.files["small.gbr"] is FileKind.GERBER
    assert pkg.unclassified == ("big.gbr",)
    assert any(n.file == "big.gbr" and "at most" in n.message for n in pkg.notices)


def test_folder_entry_limit(tmp_path: Path) -> None:
    for i in range(5):
        (tmp_path / f"f{i}.txt").write_text("x")
    with pytest.raises(LimitError, match="at most 4"):
        scan_folder(tmp_path, limits=Limits(max_entries=4))


def test_vcs_folder_skipped_and_links(tmp_path: Path) -> None:
    pkg_dir = tmp_path / "pkg"
    (pkg_dir / ".git" / "objects").mkdir(parents=True)
    (pkg_dir / ".git" / "objects" / "x").write_text("junk")
    (pkg_dir / "top.gbr").write_text(GERBER)
    outside = tmp_path / "secret.gbr"
    outside.write_text(GERBER)
    os.symlink(outside, pkg_dir / "link.gbr")
    os.symlink(pkg_dir / "top.gbr", pkg_dir / "inside.gbr")
    pkg = scan_folder(pkg_dir)
    assert pkg.files == {
        "inside.gbr": FileKind.GERBER,
        "link.gbr": FileKind.OTHER,
        "top.gbr": FileKind.GERBER,
    }
    assert pkg.unclassified == ("link.gbr",)
    messages = {n.file: n.message for n in pkg.notices}
    assert "outside" in messages["link.gbr"]
    assert ".git" in messages


# --------------------------------------------------------------------------- decoding


def test_decode_head_encodings() -> None:
    text = "Designator\tMid X\tMid Y\nL1\t45.72mm\t36.96mm\n"
    assert decode_head(codecs.BOM_UTF16_LE + text.encode("utf-16-le")) == text
    assert decode_head(codecs.BOM_UTF16_BE + text.encode("utf-16-be")) == text
    assert decode_head(text.encode("utf-16-le")) == text  # no BOM
    assert decode_head(codecs.BOM_UTF8 + "µH,ø".encode()) == "µH,ø"
    assert decode_head("Wert 4,7µH".encode("cp1252")) == "Wert 4,7µH"
    # A multi-byte character cut by the head limit is not an error.
    assert decode_head("abcµ".encode()[:-1]) == "abc"
    assert decode_head(b"\x00\x01\x02\x03binary\x00") is None
    assert decode_head(b"") == ""


def test_classify_head_utf16_placement_cut_at_head_limit() -> None:
    body = PLACEMENT + "".join(f"C{i},1u,C_0402,{i}.0,1.0,0,top\n" for i in range(5000))
    data = (codecs.BOM_UTF16_LE + body.encode("utf-16-le"))[: HEAD_BYTES + 1]
    kind, _ = classify_head("pp.csv", data[:HEAD_BYTES])
    assert kind is FileKind.PLACEMENT


def test_classify_head_reasons() -> None:
    assert classify_head("x.zip", b"PK\x03\x04rest")[1].startswith("unknown: nested archive")
    assert classify_head("LICENSE", b"MIT License\n")[1].startswith("ignored:")
    assert classify_head("a.dat", b"")[0] is FileKind.OTHER
    assert classify_head("FluxShadow.TOML", b"")[0] is FileKind.CONFIG


# --------------------------------------------------------------------------- archives


def _zip_folder(folder: Path, target: Path, *, prefix: str = "") -> Path:
    with zipfile.ZipFile(target, "w", zipfile.ZIP_DEFLATED) as zf:
        for p in sorted(folder.rglob("*")):
            if p.is_file():
                zf.write(p, prefix + p.relative_to(folder).as_posix())
    return target


def test_zip_with_subfolder_and_cleanup(tmp_path: Path) -> None:
    src = tmp_path / "src"
    _write_sample(src)
    archive = _zip_folder(src, tmp_path / "board.zip", prefix="project-v1/")
    with open_package(archive) as pkg:
        root = Path(pkg.root)
        assert root.is_dir()
        assert root != tmp_path
        assert pkg.display_root == str(archive)
        assert pkg.files == {f"project-v1/{k}": v for k, v in EXPECTED.items()}
        assert (root / "project-v1" / "gerbers" / "board-F_Cu.gbr").read_text() == GERBER
    assert not root.exists()


def test_tgz_and_plain_tar(tmp_path: Path) -> None:
    src = tmp_path / "src"
    _write_sample(src)
    for name, mode in (("board.tgz", "w:gz"), ("board.tar", "w")):
        archive = tmp_path / name
        with tarfile.open(archive, mode) as tf:
            tf.add(src, arcname="pkg")
        with open_package(archive) as pkg:
            assert pkg.files == {f"pkg/{k}": v for k, v in EXPECTED.items()}
            root = Path(pkg.root)
        assert not root.exists()


def test_context_cleans_up_on_error(tmp_path: Path) -> None:
    archive = tmp_path / "a.zip"
    with zipfile.ZipFile(archive, "w") as zf:
        zf.writestr("top.gbr", GERBER)
    seen: list[Path] = []

    def use() -> None:
        with open_package(archive) as pkg:
            seen.append(Path(pkg.root))
            raise RuntimeError("boom")

    with pytest.raises(RuntimeError):
        use()
    assert not seen[0].exists()


@pytest.mark.parametrize(
    ("name", "match"),
    [
        ("../evil.gbr", r"\.\."),
        ("ok/../../evil.gbr", r"\.\."),
        ("/etc/evil.gbr", "absolute"),
        ("C:/evil.gbr", "absolute"),
        ("..\\evil.gbr", r"\.\."),
    ],
)
def test_zip_refuses_escaping_entries(tmp_path: Path, name: str, match: str) -> None:
    archive = tmp_path / "bad.zip"
    with zipfile.ZipFile(archive, "w") as zf:
        zf.writestr("fine.gbr", GERBER)
        zf.writestr(name, GERBER)
    with pytest.raises(InputError, match=match) as err, open_package(archive):
        pass
    assert str(archive) in str(err.value)
    assert not (tmp_path / "evil.gbr").exists()


def test_zip_refuses_symlink_entry(tmp_path: Path) -> None:
    archive = tmp_path / "link.zip"
    with zipfile.ZipFile(archive, "w") as zf:
        info = zipfile.ZipInfo("top.gbr")
        info.external_attr = (0o120777 << 16) | 0x20
        zf.writestr(info, "/etc/passwd")
    with pytest.raises(InputError, match="link"), open_package(archive):
        pass


def _tar_with(archive: Path, member: tarfile.TarInfo, data: bytes = b"") -> None:
    with tarfile.open(archive, "w:gz") as tf:
        ok = tarfile.TarInfo("fine.gbr")
        ok.size = len(GERBER)
        tf.addfile(ok, io.BytesIO(GERBER.encode()))
        tf.addfile(member, io.BytesIO(data) if data else None)


@pytest.mark.parametrize(
    ("kind", "match"),
    [("symlink", "link"), ("hardlink", "link"), ("fifo", "special"), ("dotdot", r"\.\.")],
)
def test_tar_refuses_links_and_escapes(tmp_path: Path, kind: str, match: str) -> None:
    member = tarfile.TarInfo("pkg/evil.gbr")
    if kind == "symlink":
        member.type, member.linkname = tarfile.SYMTYPE, "/etc/passwd"
    elif kind == "hardlink":
        member.type, member.linkname = tarfile.LNKTYPE, "fine.gbr"
    elif kind == "fifo":
        member.type = tarfile.FIFOTYPE
    else:
        member = tarfile.TarInfo("../evil.gbr")
        member.size = 4
    archive = tmp_path / f"{kind}.tgz"
    _tar_with(archive, member, b"data" if kind == "dotdot" else b"")
    with pytest.raises(InputError, match=match) as err, open_package(archive):
        pass
    assert str(archive) in str(err.value)
    assert not (tmp_path / "evil.gbr").exists()


def test_entry_count_limit(tmp_path: Path) -> None:
    archive = tmp_path / "many.zip"
    with zipfile.ZipFile(archive, "w") as zf:
        for i in range(6):
            zf.writestr(f"f{i}.txt", "x")
    with (
        pytest.raises(LimitError, match="entry count must be at most 5"),
        open_package(archive, limits=Limits(max_entries=5)),
    ):
        pass


def test_unpacked_size_limit_from_headers(tmp_path: Path) -> None:
    archive = tmp_path / "big.zip"
    with zipfile.ZipFile(archive, "w", zipfile.ZIP_DEFLATED) as zf:
        zf.writestr("a.gbr", GERBER * 50)
        zf.writestr("b.gbr", GERBER * 50)
    size = len(GERBER) * 50
    with (
        pytest.raises(LimitError, match="unpacked size") as err,
        open_package(archive, limits=Limits(max_unpacked_bytes=size + 10)),
    ):
        pass
    assert str(archive) in str(err.value)
    assert "at entry 'b.gbr'" in str(err.value)


def test_tar_unpacked_size_limit(tmp_path: Path) -> None:
    archive = tmp_path / "big.tgz"
    with tarfile.open(archive, "w:gz") as tf:
        for name in ("a.gbr", "b.gbr"):
            data = (GERBER * 50).encode()
            info = tarfile.TarInfo(name)
            info.size = len(data)
            tf.addfile(info, io.BytesIO(data))
    with (
        pytest.raises(LimitError, match="unpacked size"),
        open_package(archive, limits=Limits(max_unpacked_bytes=len(GERBER) * 60)),
    ):
        pass


def test_compression_ratio_limit_names_entry(tmp_path: Path) -> None:
    archive = tmp_path / "bomb.zip"
    with zipfile.ZipFile(archive, "w", zipfile.ZIP_DEFLATED) as zf:
        zf.writestr("fine.gbr", GERBER)
        zf.writestr("zeros.gbr", bytes(2_000_000))
    limits = Limits(ratio_min_bytes=1_000_000, max_ratio=200)
    with (
        pytest.raises(LimitError, match=r"zeros\.gbr") as err,
        open_package(archive, limits=limits),
    ):
        pass
    assert "ratio" in str(err.value)
    # Below the size threshold the same ratio is fine.
    with open_package(archive, limits=Limits(ratio_min_bytes=3_000_000)) as pkg:
        assert "zeros.gbr" in pkg.files


def test_tar_compression_ratio_limit(tmp_path: Path) -> None:
    archive = tmp_path / "bomb.tgz"
    with tarfile.open(archive, "w:gz") as tf:
        info = tarfile.TarInfo("zeros.gbr")
        info.size = 2_000_000
        tf.addfile(info, io.BytesIO(bytes(2_000_000)))
    limits = Limits(ratio_min_bytes=1_000_000, max_ratio=200)
    with pytest.raises(LimitError, match="ratio"), open_package(archive, limits=limits):
        pass


def test_zip_header_that_lies_about_size(tmp_path: Path) -> None:
    # Declared size patched down to 10 bytes: the stream must not be trusted.
    archive = tmp_path / "liar.zip"
    payload = b"A" * 1000
    with zipfile.ZipFile(archive, "w", zipfile.ZIP_STORED) as zf:
        zf.writestr("a.txt", payload)
    raw = bytearray(archive.read_bytes())
    local = raw.find(b"PK\x03\x04")
    central = raw.find(b"PK\x01\x02")
    raw[local + 22 : local + 26] = (10).to_bytes(4, "little")
    raw[central + 24 : central + 28] = (10).to_bytes(4, "little")
    archive.write_bytes(bytes(raw))
    with pytest.raises(InputError, match=r"a\.txt"), open_package(archive):
        pass


def test_budget_enforced_while_streaming() -> None:
    budget = _Budget("x.zip", Limits(max_unpacked_bytes=50))
    with pytest.raises(LimitError, match="declared"):
        budget.copy(io.BytesIO(b"x" * 20), io.BytesIO(), "e", declared=10)
    budget = _Budget("x.zip", Limits(max_unpacked_bytes=50))
    budget.copy(io.BytesIO(b"x" * 40), io.BytesIO(), "e1", declared=40)
    with pytest.raises(LimitError, match="unpacked size"):
        budget.copy(io.BytesIO(b"x" * 40), io.BytesIO(), "e2", declared=40)


def test_archive_oversize_entry_not_unpacked(tmp_path: Path) -> None:
    archive = tmp_path / "a.zip"
    with zipfile.ZipFile(archive, "w") as zf:
        zf.writestr("top.gbr", GERBER)
        zf.writestr("huge.gbr", GERBER * 100)
    with open_package(archive, limits=Limits(max_file_bytes=5000)) as pkg:
        assert pkg.files == {"top.gbr": FileKind.GERBER}
        assert any(n.file == "huge.gbr" and "not unpacked" in n.message for n in pkg.notices)


def test_damaged_archives(tmp_path: Path) -> None:
    archive = tmp_path / "broken.zip"
    archive.write_bytes(b"PK\x03\x04" + b"\x00" * 40)
    with pytest.raises(InputError, match="zip"), open_package(archive):
        pass
    tgz = tmp_path / "broken.tgz"
    tgz.write_bytes(b"\x1f\x8b\x08\x00" + b"\xff" * 40)
    with pytest.raises(InputError, match="tar"), open_package(tgz):
        pass


# --------------------------------------------------------------------------- real boards

# Kinds of the real files, from each board's SOURCE.md "Files saved here" table.
REAL_KINDS = {
    "bq25798-mppt-v2.1": {
        "Gerber_TopLayer.GTL": FileKind.GERBER,
        "Drill_PTH_Through.DRL": FileKind.EXCELLON,
        "PickAndPlace_PCB_BQ25798-test-board-mppt-solar_2026-01-12.csv": FileKind.PLACEMENT,
        "BOM_BQ25798-test-board-mppt-solar_2026-01-12.csv": FileKind.BOM,
    },
    "cheap-focer-2": {
        "Cheap FOCer 2 60mm-Top_Signal.gbr": FileKind.GERBER,
        "Cheap FOCer 2 60mm-PTH.drl": FileKind.EXCELLON,
        "Cheap FOCer 2 60mm-top-pos.csv": FileKind.PLACEMENT,
        "cpl.csv": FileKind.PLACEMENT,
        "bom.csv": FileKind.BOM,
    },
    "huvud-tiny2": {
        "Huvud-In1_Cu.g2": FileKind.GERBER,
        "Huvud-NPTH.drl": FileKind.EXCELLON,
        "Huvud-top-pos.csv": FileKind.PLACEMENT,
        "Huvud-BOM.csv": FileKind.BOM,
    },
    "incunest-motherboard": {
        "Motherboard.G1": FileKind.GERBER,
        "Motherboard.1": FileKind.GERBER,
        "Motherboard-SlotHoles.TXT": FileKind.EXCELLON,
        "Pick Place for Motherboard.csv": FileKind.PLACEMENT,
    },
    "limesdr-xtrx-1v1": {
        "LimeSDR-XTRX_1v1.G6": FileKind.GERBER,
        "LimeSDR-XTRX_1v1.TX4": FileKind.EXCELLON,
        "Pick Place for LimeSDR-XTRX_1v1.csv": FileKind.PLACEMENT,
    },
    "pycubed-mainboard-v05": {
        "gerbers/mainboard-Route15.g3": FileKind.GERBER,
        "gerbers/mainboard-PTH-drl_map.gbr": FileKind.GERBER,
        "gerbers/mainboard-PTH.drl": FileKind.EXCELLON,
        "mainboard-bottom.pos": FileKind.PLACEMENT,
        "mainboardv05.csv": FileKind.BOM,
    },
    "thunderscope-rev5.3": {
        "Thunderscope_Rev5.3-Int1 (GND).g1": FileKind.GERBER,
        "Thunderscope_Rev5.3.drl": FileKind.EXCELLON,
        "Thunderscope_Rev5.3_TS-PCIe_Positions.txt": FileKind.PLACEMENT,
        "Thunderscope_Rev5.3_TS-PCIe_MP_BOM.csv": FileKind.BOM,
    },
}


@pytest.mark.realboards
@pytest.mark.parametrize("board", sorted(REAL_KINDS))
def test_real_board_folder(board: str, realboard: Callable[[str], Path]) -> None:
    folder = realboard(board)
    with open_package(folder) as pkg:
        for file, kind in REAL_KINDS[board].items():
            assert pkg.files[file] is kind, file
        assert pkg.files["SOURCE.md"] is FileKind.OTHER
        # Every file of these packages is either known or ignored on purpose.
        assert pkg.unclassified == ()
        assert len(pkg.files) == sum(1 for p in folder.rglob("*") if p.is_file())
        gerbers = {f for f, k in pkg.files.items() if k is FileKind.GERBER}
        # Every file whose extension marks a Gerber layer was recognised as one.
        assert {
            f
            for f in pkg.files
            if Path(f).suffix.lower() in (".gtl", ".gbl", ".gbr", ".gko", ".gm1", ".g1", ".g2")
        } <= gerbers


@pytest.mark.realboards
def test_real_board_zipped_with_subfolder(tmp_path: Path, realboard: Callable[[str], Path]) -> None:
    # pycubed's own zip had a sub-folder; pack the board the same way.
    folder = realboard("pycubed-mainboard-v05")
    archive = tmp_path / "pycubed.zip"
    with zipfile.ZipFile(archive, "w", zipfile.ZIP_STORED) as zf:
        for p in sorted(folder.rglob("*")):
            if p.is_file():
                zf.write(p, "mainboard-v05/" + p.relative_to(folder).as_posix())
    with open_package(archive) as pkg:
        assert pkg.files["mainboard-v05/gerbers/mainboard-F_Cu.gtl"] is FileKind.GERBER
        assert pkg.files["mainboard-v05/mainboard-top.pos"] is FileKind.PLACEMENT
        assert pkg.unclassified == ()


def test_header_limits_refuse_before_writing(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    from fluxshadow.io import package

    opened: list[Path] = []
    real = package._open_new

    def spy(target: Path, archive: str, name: str) -> object:
        opened.append(target)
        return real(target, archive, name)

    monkeypatch.setattr(package, "_open_new", spy)
    archive = tmp_path / "late-bomb.zip"
    with zipfile.ZipFile(archive, "w", zipfile.ZIP_DEFLATED) as zf:
        zf.writestr("first.gbr", GERBER)
        zf.writestr("zeros.gbr", bytes(2_000_000))
    limits = Limits(ratio_min_bytes=1_000_000)
    with pytest.raises(LimitError), open_package(archive, limits=limits):
        pass
    assert opened == []  # the good first entry was not written either
    with open_package(archive) as pkg:
        assert "first.gbr" in pkg.files
    assert len(opened) == 2


def test_find_odb_jobs(tmp_path: Path) -> None:
    """An ODB++ job is a folder holding matrix/matrix, plain or compressed (.Z, .gz)."""
    assert find_odb_jobs(tmp_path) == ()
    (tmp_path / "gerber").mkdir()
    (tmp_path / "gerber" / "top.gbr").write_text("G04 x*\nM02*\n")
    job = tmp_path / "vendor" / "odb" / "matrix"
    job.mkdir(parents=True)
    (job / "matrix.Z").write_bytes(b"\x1f\x9d\x90")
    assert find_odb_jobs(tmp_path) == ("vendor/odb",)
    # the job folder itself, and nothing searched inside a job
    (tmp_path / "vendor" / "odb" / "steps" / "x" / "matrix").mkdir(parents=True)
    (tmp_path / "vendor" / "odb" / "steps" / "x" / "matrix" / "matrix").write_text("")
    assert find_odb_jobs(tmp_path / "vendor" / "odb") == (".",)
    assert find_odb_jobs(tmp_path) == ("vendor/odb",)
    # depth limit
    deep = tmp_path / "a" / "b" / "c" / "d" / "matrix"
    deep.mkdir(parents=True)
    (deep / "matrix").write_text("")
    assert find_odb_jobs(tmp_path) == ("vendor/odb",)
    assert find_odb_jobs(tmp_path, max_depth=4) == ("a/b/c/d", "vendor/odb")

"""Write a :class:`~fluxshadow.synth.model.SynthBoard` as a fabrication package.

Output: Gerber X2 copper, paste and profile files, an Excellon drill file, a placement
file, a BOM, (optionally) a Gerber job file with the stack-up and (optionally) a
``fluxshadow.toml`` configuration. Everything is written
from the description alone, so the expected geometry is known exactly.
"""

from __future__ import annotations

import json
import math
import os
from collections.abc import Iterable
from pathlib import Path

from fluxshadow.synth.model import Aperture, CopperLayer, Flash, Part, Region, SynthBoard, Track

__all__ = ["copper_file_names", "part_pads_artwork", "write_package"]

_GENERATOR = "fluxshadow,synth,0.1"


def _side_tag(index: int, n: int) -> str:
    return "Top" if index == 1 else "Bot" if index == n else "Inr"


def copper_file_names(board: SynthBoard) -> list[str]:
    """File names of the copper layers, top to bottom."""
    n = len(board.layers)
    if board.dialect == "bare":
        names = []
        for i in range(1, n + 1):
            ext = "gtl" if i == 1 else "gbl" if i == n else f"g{i - 1}"
            names.append(f"{board.name}.{ext}")
        return names
    return [f"{board.name}-copper-L{i}-{_side_tag(i, n).lower()}.gbr" for i in range(1, n + 1)]


def part_pads_artwork(board: SynthBoard, part: Part) -> list[tuple[float, float, float, float]]:
    """Pads of ``part`` in the artwork frame: ``(x, y, w, h)`` in mm, rotation applied.

    Rotation by multiples of 90 degrees swaps the pad size; other angles keep it (the
    synthetic parts use right angles only).
    """
    a = math.radians(part.rotation_deg)
    c, s = math.cos(a), math.sin(a)
    out = []
    quarter = round(part.rotation_deg / 90.0) % 2 == 1
    for dx, dy, w, h in part.pads:
        if part.side == "bottom":
            dx = -dx  # viewed from the top, a bottom part is mirrored
        x = part.x + c * dx - s * dy
        y = part.y + s * dx + c * dy
        out.append((x, y, h, w) if quarter else (x, y, w, h))
    return out


class _GerberText:
    """Accumulates one Gerber file, with apertures defined on first use."""

    def __init__(self, board: SynthBoard, attributes: list[tuple[str, str]], comments: list[str]):
        self.board = board
        self.inch = board.units == "inch"
        self.head: list[str] = []
        self.body: list[str] = []
        self.apertures: dict[Aperture, int] = {}
        self.dark: bool | None = None
        self.net = ""
        self.component = ""
        for c in comments:
            self.head.append(f"G04 {c}*")
        for name, value in attributes:
            self.head.append(self._attr("TF", f".{name},{value}"))
        if self.inch:
            self.head += ["%FSLAX25Y25*%", "%MOIN*%"]
        else:
            self.head += ["%FSLAX46Y46*%", "%MOMM*%"]
        self.head.append("G01*")

    def _attr(self, kind: str, text: str) -> str:
        if self.board.dialect == "x2":
            return f"%{kind}{text}*%"
        if self.board.dialect == "x2-comments":
            return f"G04 #@! {kind}{text}*"
        return ""

    def _num(self, v_mm: float) -> str:
        if self.inch:
            return str(round(v_mm / 25.4 * 1e5))
        return str(round(v_mm * 1e6))

    def _len(self, v_mm: float) -> str:
        return f"{v_mm / 25.4:.6f}" if self.inch else f"{v_mm:.6f}"

    def _xy(self, x: float, y: float) -> str:
        return f"X{self._num(x)}Y{self._num(y)}"

    def aperture(self, ap: Aperture) -> int:
        if ap in self.apertures:
            return self.apertures[ap]
        code = 10 + len(self.apertures)
        self.apertures[ap] = code
        if ap.function:
            a = self._attr("TA", f".AperFunction,{ap.function}")
            if a:
                self.head.append(a)
        if ap.kind == "THERMAL":
            if not any(line.startswith("%AMTHERMAL") for line in self.head):
                self.head.append("%AMTHERMAL*7,0,0,$1,$2,$3,45*%")
            args = "X".join(self._len(p) for p in ap.params)
            self.head.append(f"%ADD{code}THERMAL,{args}*%")
        elif ap.kind == "P":
            outer, nvert, *rest = ap.params
            extra = "".join(f"X{r:g}" for r in rest)
            self.head.append(f"%ADD{code}P,{self._len(outer)}X{int(nvert)}{extra}*%")
        else:
            args = "X".join(self._len(p) for p in ap.params)
            self.head.append(f"%ADD{code}{ap.kind},{args}*%")
        if ap.function and self.board.dialect != "bare":
            self.head.append(self._attr("TD", ""))
        return code

    def _polarity(self, dark: bool) -> None:
        if dark != self.dark:
            self.body.append("%LPD*%" if dark else "%LPC*%")
            self.dark = dark

    def _object_attrs(self, net: str, component: str) -> None:
        if self.board.dialect == "bare":
            return
        if (net, component) == (self.net, self.component):
            return
        if self.net or self.component:
            self.body.append(self._attr("TD", ""))
        if net:
            self.body.append(self._attr("TO", f".N,{net}"))
        if component:
            self.body.append(self._attr("TO", f".C,{component}"))
        self.net, self.component = net, component

    def flash(self, f: Flash) -> None:
        code = self.aperture(f.aperture)
        self._polarity(f.dark)
        self._object_attrs(f.net, f.component)
        self.body.append(f"D{code}*")
        self.body.append(f"{self._xy(f.x, f.y)}D03*")

    def track(self, t: Track, function: str = "Conductor") -> None:
        code = self.aperture(Aperture("C", (t.width,), function))
        self._polarity(t.dark)
        self._object_attrs(t.net, "")
        self.body.append(f"D{code}*")
        (x0, y0), *rest = t.points
        self.body.append(f"{self._xy(x0, y0)}D02*")
        for x, y in rest:
            self.body.append(f"{self._xy(x, y)}D01*")

    def region(self, r: Region) -> None:
        self._polarity(r.dark)
        self._object_attrs(r.net, "")
        self.body.append("G36*")
        (x0, y0), *rest = r.ring
        self.body.append(f"{self._xy(x0, y0)}D02*")
        for x, y in rest:
            self.body.append(f"{self._xy(x, y)}D01*")
        self.body.append(f"{self._xy(x0, y0)}D01*")
        self.body.append("G37*")

    def text(self) -> str:
        lines = [line for line in self.head if line]
        lines += [line for line in self.body if line]
        lines.append("M02*")
        return "\n".join(lines) + "\n"


def _write(path: Path, text: str) -> None:
    tmp = path.with_name(path.name + ".tmp")
    tmp.write_text(text, encoding="utf-8", newline="\n")
    os.replace(tmp, path)


def _copper_text(board: SynthBoard, index: int, layer: CopperLayer, extra: Iterable[Flash]) -> str:
    n = len(board.layers)
    attrs = [
        ("GenerationSoftware", _GENERATOR),
        ("FileFunction", f"Copper,L{index},{_side_tag(index, n)}"),
    ]
    if layer.negative and layer.mark_negative:
        attrs.append(("FilePolarity", "Negative"))
    elif not layer.negative:
        attrs.append(("FilePolarity", "Positive"))
    comments = [f"fictional board {board.name}, copper layer {index} of {n}"]
    if board.dialect == "bare":
        comments.append(f"Layer_Physical_Order={index}")
    g = _GerberText(board, attrs, comments)
    if layer.negative and layer.mark_negative:
        g.head.append("%IPNEG*%")
    for feat in layer.features:
        if isinstance(feat, Flash):
            g.flash(feat)
        elif isinstance(feat, Track):
            g.track(feat)
        elif isinstance(feat, Region):
            g.region(feat)
    for f in extra:
        g.flash(f)
    return g.text()


def _pad_flashes(board: SynthBoard, side: str, function: str) -> list[Flash]:
    out = []
    for part in board.parts:
        if part.side != side:
            continue
        for x, y, w, h in part_pads_artwork(board, part):
            ap = Aperture("R", (round(w, 6), round(h, 6)), function)
            out.append(Flash(x, y, ap, component=part.ref))
    return out


def _outline_text(board: SynthBoard) -> str:
    g = _GerberText(board, [("GenerationSoftware", _GENERATOR), ("FileFunction", "Profile,NP")], [])
    w, h = board.width_mm, board.height_mm
    rings: list[tuple[tuple[float, float], ...]] = [
        ((0.0, 0.0), (w, 0.0), (w, h), (0.0, h), (0.0, 0.0))
    ]
    rings += [(*c, c[0]) for c in board.cutouts]
    for ring in rings:
        g.track(Track(tuple(ring), 0.1), function="Profile")
    return g.text()


def _paste_text(board: SynthBoard, side: str) -> str:
    func = "Paste,Top" if side == "top" else "Paste,Bot"
    g = _GerberText(board, [("GenerationSoftware", _GENERATOR), ("FileFunction", func)], [])
    for f in _pad_flashes(board, side, ""):
        g.flash(Flash(f.x, f.y, Aperture("R", f.aperture.params)))
    return g.text()


def _drill_text(board: SynthBoard, plated: bool) -> str:
    n = len(board.layers)
    lines = ["M48"]
    kind = "PTH" if plated else "NPTH"
    func = f"Plated,1,{n},PTH" if plated else f"NonPlated,1,{n},NPTH"
    if board.dialect != "bare":
        lines.append(f"; #@! TF.FileFunction,{func}")
    lines.append(f"; fictional board {board.name}, {kind}")
    lines.append("METRIC")
    holes = [h for h in board.holes if h.plated == plated]
    tools: dict[float, int] = {}
    for h in holes:
        tools.setdefault(h.diameter, len(tools) + 1)
    for d, t in tools.items():
        lines.append(f"T{t}C{d:.3f}")
    lines += ["%", "G90", "G05"]
    for d, t in tools.items():
        lines.append(f"T{t}")
        for h in holes:
            if h.diameter != d:
                continue
            if h.slot_to is None:
                lines.append(f"X{h.x:.3f}Y{h.y:.3f}")
            else:
                lines.append(f"X{h.x:.3f}Y{h.y:.3f}G85X{h.slot_to[0]:.3f}Y{h.slot_to[1]:.3f}")
    lines.append("M30")
    return "\n".join(lines) + "\n"


def _placement_xy(board: SynthBoard, part: Part) -> tuple[float, float]:
    ox, oy = board.placement_offset
    x, y = part.x - ox, part.y - oy
    if part.side == "bottom" and board.mirror_bottom_x:
        x = -x
    return x, y


def _placement_text(board: SynthBoard) -> str:
    if board.placement_style == "text":
        lines = [
            f"# placement of fictional board {board.name}",
            "# Unit = mm, Angle = deg, Side = top/bottom",
            "# Ref     Val          Package                PosX       PosY       Rot     Side",
        ]
        for p in board.parts:
            x, y = _placement_xy(board, p)
            lines.append(
                f"{p.ref:<8} {p.value:<12} {p.package:<22} {x:>10.4f} {y:>10.4f} "
                f"{p.rotation_deg:>7.2f}  {p.side}"
            )
        lines.append("## End")
        return "\n".join(lines) + "\n"
    lines = ["Ref,Val,Package,PosX(mm),PosY(mm),Rot,Side"]
    for p in board.parts:
        x, y = _placement_xy(board, p)
        lines.append(
            f'"{p.ref}","{p.value}","{p.package}",{x:.4f},{y:.4f},{p.rotation_deg:.2f},{p.side}'
        )
    return "\n".join(lines) + "\n"


def _bom_text(board: SynthBoard) -> str:
    lines = ["Designator,Value,Footprint,Description"]
    for p in board.parts:
        lines.append(f'"{p.ref}","{p.value}","{p.package}","{p.description}"')
    return "\n".join(lines) + "\n"


def _job_text(board: SynthBoard, copper_names: list[str]) -> str:
    n = len(board.layers)
    copper = board.copper_mm or tuple(0.035 for _ in range(n))
    gaps = board.dielectric_mm or tuple(1.5 / max(n - 1, 1) for _ in range(n - 1))
    stack: list[dict[str, object]] = [{"Type": "SolderMask", "Thickness": 0.01, "Name": "Top mask"}]
    for i in range(n):
        stack.append({"Type": "Copper", "Thickness": copper[i], "Name": f"L{i + 1}"})
        if i < n - 1:
            stack.append(
                {
                    "Type": "Dielectric",
                    "Thickness": gaps[i],
                    "Material": "FR4",
                    "DielectricConstant": board.epsilon_r,
                    "Name": f"D{i + 1}",
                }
            )
    stack.append({"Type": "SolderMask", "Thickness": 0.01, "Name": "Bottom mask"})
    thickness = sum(float(str(layer["Thickness"])) for layer in stack)
    files = [
        {
            "Path": name,
            "FileFunction": f"Copper,L{i + 1},{_side_tag(i + 1, n)}",
            "FilePolarity": "Negative" if board.layers[i].negative else "Positive",
        }
        for i, name in enumerate(copper_names)
    ]
    job = {
        "Header": {
            "GenerationSoftware": {
                "Vendor": "fluxshadow",
                "Application": "synth",
                "Version": "0.1",
            },
            "CreationDate": "2026-01-01T00:00:00Z",
        },
        "GeneralSpecs": {
            "ProjectId": {"Name": board.name, "GUID": "00000000-0000-0000-0000-000000000000"},
            "Size": {"X": board.width_mm, "Y": board.height_mm},
            "LayerNumber": n,
            "BoardThickness": round(thickness, 4),
        },
        "FilesAttributes": files,
        "MaterialStackup": stack,
    }
    return json.dumps(job, indent=2) + "\n"


def write_package(board: SynthBoard, folder: str | os.PathLike[str]) -> list[Path]:
    """Write every file of ``board`` into ``folder`` (created if needed).

    Parameters
    ----------
    board : SynthBoard
        The description.
    folder : path
        Destination folder.

    Returns
    -------
    list of Path
        The files written.
    """
    out = Path(folder)
    out.mkdir(parents=True, exist_ok=True)
    written: list[Path] = []
    names = copper_file_names(board)
    n = len(board.layers)
    for i, (name, layer) in enumerate(zip(names, board.layers, strict=True), start=1):
        extra: list[Flash] = []
        if i == 1:
            extra = _pad_flashes(board, "top", "SMDPad,CuDef")
        elif i == n:
            extra = _pad_flashes(board, "bottom", "SMDPad,CuDef")
        path = out / name
        _write(path, _copper_text(board, i, layer, extra))
        written.append(path)
    bare = board.dialect == "bare"
    files = {
        (f"{board.name}.gko" if bare else f"{board.name}-profile.gbr"): _outline_text(board),
        (f"{board.name}.gtp" if bare else f"{board.name}-paste-top.gbr"): _paste_text(board, "top"),
        (f"{board.name}.gbp" if bare else f"{board.name}-paste-bottom.gbr"): _paste_text(
            board, "bottom"
        ),
        f"{board.name}-PTH.drl": _drill_text(board, True),
        f"{board.name}-placement.{'txt' if board.placement_style == 'text' else 'csv'}": (
            _placement_text(board)
        ),
        f"{board.name}-bom.csv": _bom_text(board),
    }
    if any(not h.plated for h in board.holes):
        files[f"{board.name}-NPTH.drl"] = _drill_text(board, False)
    if board.write_job and not bare:
        files[f"{board.name}.gbrjob"] = _job_text(board, names)
    if board.config_text:
        files["fluxshadow.toml"] = board.config_text
    files.update(board.extra_files)
    for name, text in files.items():
        path = out / name
        _write(path, text)
        written.append(path)
    return written

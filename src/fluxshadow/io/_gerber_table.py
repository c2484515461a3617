"""Object tables of the Gerber reader: growable Python lists plus frozen numpy chunks.

The parser appends objects to plain lists (cheap per statement); block apertures and
step-and-repeat freeze a table into a :class:`Chunk` of numpy arrays, transform or tile
it, and append the result to the enclosing table. The layout is the one of
:class:`fluxshadow.io.records.ArtworkRecord` with local (0-based) ring and vertex indices.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

__all__ = ["Chunk", "Table", "concat_chunks", "tile_chunk", "transform_chunk"]

FloatArray = npt.NDArray[np.float64]
IntArray = npt.NDArray[np.int64]
BoolArray = npt.NDArray[np.bool_]


@dataclass(frozen=True)
class Chunk:
    """A frozen run of objects (see the records module docstring for the columns).

    ``ring_start`` has length n+1 and ``vertex_start`` length m+1, both local to the
    chunk; ``xy`` is (n, 2) and ``vertices`` (v, 2), in mm.
    """

    kind: npt.NDArray[np.int8]
    dark: BoolArray
    aperture: IntArray
    xy: FloatArray
    ring_start: IntArray
    vertex_start: IntArray
    vertices: FloatArray
    net: IntArray
    component: IntArray
    function: IntArray

    @property
    def n_objects(self) -> int:
        """Number of objects in the chunk."""
        return int(self.kind.shape[0])

    @staticmethod
    def empty() -> Chunk:
        """A chunk without objects."""
        z = np.zeros(0, dtype=np.int64)
        return Chunk(
            kind=np.zeros(0, dtype=np.int8),
            dark=np.zeros(0, dtype=np.bool_),
            aperture=z,
            xy=np.zeros((0, 2), dtype=np.float64),
            ring_start=np.zeros(1, dtype=np.int64),
            vertex_start=np.zeros(1, dtype=np.int64),
            vertices=np.zeros((0, 2), dtype=np.float64),
            net=z,
            component=z,
            function=z,
        )


class Table:
    """Growable object table: per-object lists, ring starts and a flat vertex list.

    Attributes are plain lists so the parser's hot loop can append without overhead.
    ``rstart[i]`` is the index (in ``vstart``) of object i's first ring; ``vstart[j]`` is
    the index of ring j's first vertex in ``verts`` (which holds x0, y0, x1, y1, ...).
    """

    __slots__ = (
        "ap",
        "chunks",
        "comp",
        "dark",
        "func",
        "kind",
        "n_chunk_objects",
        "n_chunk_vertices",
        "net",
        "ox",
        "oy",
        "rstart",
        "verts",
        "vstart",
    )

    def __init__(self) -> None:
        self.kind: list[int] = []
        self.dark: list[bool] = []
        self.ap: list[int] = []
        self.ox: list[float] = []
        self.oy: list[float] = []
        self.rstart: list[int] = []
        self.net: list[int] = []
        self.comp: list[int] = []
        self.func: list[int] = []
        self.vstart: list[int] = []
        self.verts: list[float] = []
        self.chunks: list[Chunk] = []
        self.n_chunk_objects = 0
        self.n_chunk_vertices = 0

    @property
    def n_objects(self) -> int:
        """Objects so far (frozen chunks and pending lists)."""
        return self.n_chunk_objects + len(self.kind)

    @property
    def n_vertices(self) -> int:
        """Vertices so far (frozen chunks and pending lists)."""
        return self.n_chunk_vertices + len(self.verts) // 2

    def flush(self) -> None:
        """Freeze the pending lists into a chunk."""
        if not self.kind:
            if self.verts or self.vstart:  # pragma: no cover - defensive, cannot happen
                msg = "vertices must belong to an object; got orphan vertices"
                raise RuntimeError(msg)
            return
        n = len(self.kind)
        chunk = Chunk(
            kind=np.asarray(self.kind, dtype=np.int8),
            dark=np.asarray(self.dark, dtype=np.bool_),
            aperture=np.asarray(self.ap, dtype=np.int64),
            xy=np.column_stack(
                [np.asarray(self.ox, dtype=np.float64), np.asarray(self.oy, dtype=np.float64)]
            ).reshape(n, 2),
            ring_start=np.asarray([*self.rstart, len(self.vstart)], dtype=np.int64),
            vertex_start=np.asarray([*self.vstart, len(self.verts) // 2], dtype=np.int64),
            vertices=np.asarray(self.verts, dtype=np.float64).reshape(-1, 2),
            net=np.asarray(self.net, dtype=np.int64),
            component=np.asarray(self.comp, dtype=np.int64),
            function=np.asarray(self.func, dtype=np.int64),
        )
        self.chunks.append(chunk)
        self.n_chunk_objects += n
        self.n_chunk_vertices += int(chunk.vertices.shape[0])
        for lst in (
            self.kind,
            self.dark,
            self.ap,
            self.ox,
            self.oy,
            self.rstart,
            self.net,
            self.comp,
            self.func,
            self.vstart,
            self.verts,
        ):
            lst.clear()

    def add_chunk(self, chunk: Chunk) -> None:
        """Append a frozen chunk after everything added so far."""
        if chunk.n_objects == 0:
            return
        self.flush()
        self.chunks.append(chunk)
        self.n_chunk_objects += chunk.n_objects
        self.n_chunk_vertices += int(chunk.vertices.shape[0])

    def finish(self) -> Chunk:
        """Freeze everything into one chunk."""
        self.flush()
        return concat_chunks(self.chunks)


def concat_chunks(chunks: list[Chunk]) -> Chunk:
    """Concatenate chunks in order, offsetting ring and vertex indices."""
    chunks = [c for c in chunks if c.n_objects]
    if not chunks:
        return Chunk.empty()
    if len(chunks) == 1:
        return chunks[0]
    ring_parts = [np.zeros(1, dtype=np.int64)]
    vert_parts = [np.zeros(1, dtype=np.int64)]
    r_off = 0
    v_off = 0
    for c in chunks:
        ring_parts.append(c.ring_start[1:] + r_off)
        vert_parts.append(c.vertex_start[1:] + v_off)
        r_off += int(c.ring_start[-1])
        v_off += int(c.vertex_start[-1])
    return Chunk(
        kind=np.concatenate([c.kind for c in chunks]),
        dark=np.concatenate([c.dark for c in chunks]),
        aperture=np.concatenate([c.aperture for c in chunks]),
        xy=np.concatenate([c.xy for c in chunks]),
        ring_start=np.concatenate(ring_parts),
        vertex_start=np.concatenate(vert_parts),
        vertices=np.concatenate([c.vertices for c in chunks]),
        net=np.concatenate([c.net for c in chunks]),
        component=np.concatenate([c.component for c in chunks]),
        function=np.concatenate([c.function for c in chunks]),
    )


def tile_chunk(chunk: Chunk, offsets: FloatArray) -> Chunk:
    """Repeat a chunk once per row of ``offsets`` (c, 2), translated by it (mm).

    Copies follow the order of ``offsets``; objects keep their order within a copy.
    """
    c = int(offsets.shape[0])
    n = chunk.n_objects
    if c == 0 or n == 0:
        return Chunk.empty()
    m = int(chunk.ring_start[-1])
    v = int(chunk.vertex_start[-1])
    xy = (chunk.xy[None, :, :] + offsets[:, None, :]).reshape(c * n, 2)
    verts = (chunk.vertices[None, :, :] + offsets[:, None, :]).reshape(c * v, 2)
    k = np.arange(c, dtype=np.int64)
    ring_start = np.concatenate(
        [
            (chunk.ring_start[None, :-1] + (k * m)[:, None]).ravel(),
            np.array([c * m], dtype=np.int64),
        ]
    )
    vertex_start = np.concatenate(
        [
            (chunk.vertex_start[None, :-1] + (k * v)[:, None]).ravel(),
            np.array([c * v], dtype=np.int64),
        ]
    )
    return Chunk(
        kind=np.tile(chunk.kind, c),
        dark=np.tile(chunk.dark, c),
        aperture=np.tile(chunk.aperture, c),
        xy=xy,
        ring_start=ring_start,
        vertex_start=vertex_start,
        vertices=verts,
        net=np.tile(chunk.net, c),
        component=np.tile(chunk.component, c),
        function=np.tile(chunk.function, c),
    )


def transform_chunk(
    chunk: Chunk,
    matrix: FloatArray,
    offset: tuple[float, float],
    aperture_map: IntArray,
    *,
    invert: bool,
    net: int,
    component: int,
) -> Chunk:
    """Place a block's objects: linear map, translation, aperture remap, polarity.

    Parameters
    ----------
    chunk : Chunk
        The block's objects, relative to the block origin (mm).
    matrix : ndarray (2, 2)
        Linear part of the aperture transformation (LM/LR/LS).
    offset : (float, float)
        Flash point (mm).
    aperture_map : ndarray (n,)
        New aperture index of every object (``-1`` for regions).
    invert : bool
        Toggle every object's polarity (block flashed under LPC).
    net, component : int
        Attribute indices filled in where the block object has none (``-1``).
    """
    ox, oy = offset
    xy = chunk.xy @ matrix.T
    xy[:, 0] += ox
    xy[:, 1] += oy
    verts = chunk.vertices @ matrix.T
    verts[:, 0] += ox
    verts[:, 1] += oy
    return Chunk(
        kind=chunk.kind.copy(),
        dark=~chunk.dark if invert else chunk.dark.copy(),
        aperture=aperture_map,
        xy=xy,
        ring_start=chunk.ring_start.copy(),
        vertex_start=chunk.vertex_start.copy(),
        vertices=verts,
        net=np.where(chunk.net < 0, net, chunk.net),
        component=np.where(chunk.component < 0, component, chunk.component),
        function=chunk.function.copy(),
    )

"""Nets of an ODB++ step from ``steps/<step>/eda/data`` (feature id records).

Records used (ODB++ Format Specification, EDA data file, from memory):

- ``LYR <name> <name> ...`` -- layer names (folder names); the 0-based position of a
  name is the layer number used by ``FID`` records; several ``LYR`` lines continue the list;
- ``NET <name>`` -- starts a net; ``$NONE$`` is the pseudo-net of unconnected features;
- ``SNT ...`` -- a subnet of the current net (its kind does not matter here);
- ``FID <type> <layer> <feature>`` -- feature number ``feature`` (0-based position among
  the feature records of that layer's features file) belongs to the current net; type
  ``C`` copper, ``L`` laminate, ``H`` hole.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

__all__ = ["NONE_NET", "EdaNets", "parse_eda_nets"]

NONE_NET = "$NONE$"
"""Net name the format uses for features on no net."""

IntArray = npt.NDArray[np.int64]


@dataclass(frozen=True, kw_only=True)
class EdaNets:
    """Net of every copper feature listed in an EDA data file.

    Attributes
    ----------
    nets : tuple of str
        Net names in file order, without ``$NONE$``.
    by_layer : dict of str to ndarray (n,) of int64
        Lower-case layer name -> net index (into ``nets``) of feature ``i`` at position
        ``i``; ``-1`` for features on no net or not listed.
    """

    nets: tuple[str, ...]
    by_layer: dict[str, IntArray]

    def feature_nets(self, layer: str, feature_index: IntArray) -> IntArray:
        """Net index (``-1`` when none) of each feature number in ``feature_index`` (n,)."""
        table = self.by_layer.get(layer.lower())
        out = np.full(feature_index.shape, -1, dtype=np.int64)
        if table is None or not len(table):
            return out
        ok = (feature_index >= 0) & (feature_index < len(table))
        out[ok] = table[feature_index[ok]]
        return out


def parse_eda_nets(lines: list[str]) -> EdaNets:
    """Read the ``LYR``, ``NET`` and ``FID C`` records of an EDA data file.

    Parameters
    ----------
    lines : list of str
        The file's lines.

    Returns
    -------
    EdaNets
        Malformed ``FID`` lines (too few or non-integer fields) are ignored.
    """
    layers: list[str] = []
    nets: list[str] = []
    cur = -1
    fid_layer: list[int] = []
    fid_feature: list[int] = []
    fid_net: list[int] = []
    for raw in lines:
        if raw.startswith("FID "):
            toks = raw.split(";", 1)[0].split()
            if len(toks) >= 4 and toks[1] == "C" and cur >= 0:
                try:
                    lyr, feat = int(toks[2]), int(toks[3])
                except ValueError:
                    continue
                fid_layer.append(lyr)
                fid_feature.append(feat)
                fid_net.append(cur)
        elif raw.startswith("NET "):
            name = raw[4:].split(";", 1)[0].strip()
            if not name or name == NONE_NET:
                cur = -1
            else:
                cur = len(nets)
                nets.append(name)
        elif raw.startswith("LYR "):
            layers += [t.lower() for t in raw[4:].split(";", 1)[0].split()]
    by_layer: dict[str, IntArray] = {}
    if fid_layer:
        lyr_a = np.asarray(fid_layer, dtype=np.int64)
        feat_a = np.asarray(fid_feature, dtype=np.int64)
        net_a = np.asarray(fid_net, dtype=np.int64)
        for k, name in enumerate(layers):
            sel = (lyr_a == k) & (feat_a >= 0)
            if not np.any(sel):
                continue
            table = np.full(int(feat_a[sel].max()) + 1, -1, dtype=np.int64)
            table[feat_a[sel]] = net_a[sel]
            by_layer[name] = table
    return EdaNets(nets=tuple(nets), by_layer=by_layer)

"""Hostile configuration: random and mutated ``fluxshadow.toml`` text raises only
ConfigError; the ``[limits]`` table is validated and reaches the readers through
load_package (a limit hit names the key to raise)."""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from fluxshadow.board.load import load_package
from fluxshadow.errors import ConfigError, InputError
from fluxshadow.io.config import parse_config

SEEDS = sorted((Path(__file__).resolve().parents[1] / "data" / "fuzz" / "config").iterdir())
MINI4 = Path(__file__).resolve().parents[2] / "fixtures" / "mini4"

TOKENS = [
    "[limits]\n",
    "max_vertices = -1\n",
    "max_macro_depth = 100000\n",
    "max_ratio = nan\n",
    "max_repeat = 1e400\n",
    "[[part]]\n",
    'ref = ""\n',
    "body_mm = [inf, -0]\n",
    "[stackup]\ncopper_mm = []\n",
    "[severity]\nplane-void = 3\n",
    "[[waiver]]\n",
    '"\\u0000" = 1\n',
    "= = =\n",
    "[layers]\n'*' = 'copper:999999999999999999999'\n",
    "x = 99999999999999999999999\n",
]


@st.composite
def mutated(draw: st.DrawFn) -> str:
    text = list(draw(st.sampled_from(SEEDS)).read_text())
    for _ in range(draw(st.integers(1, 4))):
        op = draw(st.sampled_from(["truncate", "flip", "insert", "duplicate"]))
        i = draw(st.integers(0, len(text)))
        if op == "truncate":
            del text[i:]
        elif op == "flip" and i < len(text):
            text[i] = chr((ord(text[i]) ^ (1 << draw(st.integers(0, 6)))) or 32)
        elif op == "insert":
            text[i:i] = list("\n" + draw(st.sampled_from(TOKENS)))
        elif op == "duplicate":
            j = draw(st.integers(i, min(len(text), i + 200)))
            text[i:i] = text[i:j] * draw(st.integers(1, 5))
    return "".join(text)


def _parse(text: str) -> None:
    try:
        cfg = parse_config(text, source="fuzz.toml")
    except ConfigError:
        return
    for key, value in cfg.limits.items():
        assert value >= 1, key


FUZZ = settings(settings.get_profile("fuzz"), max_examples=300)


@FUZZ
@given(mutated())
def test_mutated_seeds_raise_only_config_errors(text: str) -> None:
    _parse(text)


@FUZZ
@given(st.text(max_size=500))
def test_random_text_raises_only_config_errors(text: str) -> None:
    _parse(text)


@FUZZ
@given(st.lists(st.sampled_from(TOKENS), max_size=20))
def test_token_soup_raises_only_config_errors(tokens: list[str]) -> None:
    _parse("".join(tokens))


def test_limits_table_is_validated() -> None:
    cfg = parse_config(SEEDS[0].read_text())
    assert cfg.limits == {"max_file_bytes": 1_000_000, "max_vertices": 500_000, "max_ratio": 50.5}
    with pytest.raises(ConfigError, match=r"f\.toml: limits keys must be among .*; got 'max_x'"):
        parse_config("[limits]\nmax_x = 1\n", source="f.toml")
    with pytest.raises(ConfigError, match=r"limits.max_objects must be a whole number >= 1; got 0"):
        parse_config("[limits]\nmax_objects = 0\n")
    with pytest.raises(
        ConfigError, match=r"limits.max_objects must be a whole number >= 1; got 2.5"
    ):
        parse_config("[limits]\nmax_objects = 2.5\n")
    with pytest.raises(ConfigError, match=r"limits.max_macro_depth must be at most 256"):
        parse_config("[limits]\nmax_macro_depth = 1000\n")
    with pytest.raises(ConfigError, match=r"limits.max_ratio must be a number >= 1"):
        parse_config("[limits]\nmax_ratio = 0.5\n")


def test_config_limits_reach_the_readers(tmp_path: Path) -> None:
    pkg = tmp_path / "mini4"
    shutil.copytree(MINI4, pkg)
    (pkg / "fluxshadow.toml").write_text("[limits]\nmax_objects = 10\n")
    with pytest.raises(InputError, match=r"object count must be at most 10;.*max_objects"):
        load_package(pkg)
    (pkg / "fluxshadow.toml").write_text("[limits]\nmax_entries = 3\n")
    with pytest.raises(InputError, match=r"package file count must be at most 3.*max_entries"):
        load_package(pkg)
    (pkg / "fluxshadow.toml").write_text("[limits]\nmax_vertices = 5\n")
    with pytest.raises(InputError, match=r"vertex count must be at most 5;.*max_vertices"):
        load_package(pkg)
    (pkg / "fluxshadow.toml").write_text("[limits]\nmax_drill_features = 2\n")
    with pytest.raises(InputError, match=r"hole and slot count must be at most 2;"):
        load_package(pkg)
    (pkg / "fluxshadow.toml").write_text("[limits]\nmax_objects = 10000000\n")
    assert len(load_package(pkg).layers) == 4

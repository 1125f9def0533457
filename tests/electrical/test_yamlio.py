"""The fast (libyaml) and the pure-Python loaders agree on values and on every location.

The reference is PyYAML's own pure-Python ``SafeLoader``, which the project used alone before.
"""

from __future__ import annotations

from pathlib import Path

import pytest
import yaml

from linter import yamlio
from linter.errors import InputError

ROOT = Path(__file__).resolve().parents[2]
SHIPPED = sorted((ROOT / "families").glob("*.yaml")) + sorted((ROOT / "designs").glob("*/*.yaml"))


def _same(fast: object, pure: object) -> None:
    assert fast == pure and type(fast) is type(pure)
    if isinstance(pure, yamlio.LocatedDict):
        assert (fast.location, fast.key_locations, fast.value_locations) == (
            pure.location, pure.key_locations, pure.value_locations)
        for key in pure:
            _same(fast[key], pure[key])
    elif isinstance(pure, yamlio.LocatedList):
        assert (fast.location, fast.item_locations) == (pure.location, pure.item_locations)
        for fast_item, pure_item in zip(fast, pure, strict=True):
            _same(fast_item, pure_item)


@pytest.mark.skipif(not yaml.__with_libyaml__, reason="this PyYAML has no libyaml")
@pytest.mark.parametrize("path", SHIPPED, ids=lambda p: p.name)
def test_fast_loader_equals_the_pure_one(path: Path) -> None:
    text = path.read_text()
    assert yamlio._FastLoader is not yamlio._Loader
    _same(yamlio._load(yamlio._FastLoader, text, str(path)), yamlio._load(yamlio._Loader, text, str(path)))


@pytest.mark.parametrize(("text", "message"), [
    ("a: [1, 2\n", "x.yaml:2:1: error: malformed YAML: expected ',' or ']', but got '<stream end>'"),
    ("a: 1\na: 2\n", "x.yaml:2:1: error: duplicate key 'a'"),
    ("a: !!python/name:os.system\n", "x.yaml:1:4: error: YAML construct not allowed here"),
])
def test_a_rejected_file_gets_the_pure_loaders_message(text: str, message: str) -> None:
    with pytest.raises(InputError) as caught:
        yamlio.load_yaml_text(text, "x.yaml")
    assert caught.value.one_line().startswith(message)

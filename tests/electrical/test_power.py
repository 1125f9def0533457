"""Power states: every rail settled on or off per state, unknown rails refused at file:line:col."""

from __future__ import annotations

from pathlib import Path

import pytest

from linter.electrical.power import PowerState, parse_power_states
from linter.errors import InputError
from linter.yamlio import load_yaml_file

FIXTURES = Path(__file__).resolve().parent / "fixtures"
POWER = FIXTURES / "power"
ERROR_FILES = sorted(path for path in POWER.glob("*.yaml") if path.name != "states.yaml")


def _states(path: Path) -> tuple[PowerState, ...]:
    """A fixture holds the rail names it is checked against beside its ``power_states``."""
    document = load_yaml_file(path)
    return parse_power_states(document["power_states"], document.where("power_states"), document["rails"])


def _expected(path: Path) -> str:
    line = path.read_text(encoding="utf-8").splitlines()[1]
    assert line.startswith("# expect: "), f"{path.name} must say on line 2 what error it expects"
    return line.removeprefix("# expect: ").replace("{fixtures}", str(FIXTURES))


def test_states_settle_every_rail_in_rail_order() -> None:
    run, standby, ship = _states(POWER / "states.yaml")
    assert (run.name, standby.name, ship.name) == ("run", "standby", "ship")
    assert dict(run.rail_on) == {"VCC3V3": True, "VCC1V8": True, "VBAT": True}
    # standby: default off, two rails listed on (one written as the quoted word "on")
    assert dict(standby.rail_on) == {"VCC3V3": False, "VCC1V8": True, "VBAT": True}
    # ship lists every rail and needs no default
    assert dict(ship.rail_on) == {"VCC3V3": False, "VCC1V8": False, "VBAT": True}
    assert list(ship.rail_on) == ["VCC3V3", "VCC1V8", "VBAT"]


def test_state_queries() -> None:
    _, standby, ship = _states(POWER / "states.yaml")
    assert standby.is_on("VBAT") is True
    assert standby.is_on("VCC3V3") is False
    assert standby.rails_off == ("VCC3V3",)
    assert standby.rails_on == ("VBAT", "VCC1V8")
    assert ship.rails_off == ("VCC1V8", "VCC3V3")
    with pytest.raises(KeyError):
        ship.is_on("VDDQ")


def test_state_remembers_where_it_is_written() -> None:
    states = _states(POWER / "states.yaml")
    assert [(state.location.line, state.location.column) for state in states] == [(4, 3), (6, 3), (9, 3)]
    assert states[0].location.file == str(POWER / "states.yaml")


def test_states_are_read_only() -> None:
    run = _states(POWER / "states.yaml")[0]
    with pytest.raises(TypeError):
        run.rail_on["VBAT"] = False  # type: ignore[index]


def test_rail_unknown_to_a_design_without_rails() -> None:
    document = load_yaml_file(POWER / "states.yaml")
    with pytest.raises(InputError) as caught:
        parse_power_states(document["power_states"], document.where("power_states"), [])
    # 'run' only says "default: on", so it passes; 'standby' lists VBAT on line 8, column 13
    assert caught.value.one_line() == (
        f"{POWER / 'states.yaml'}:8:13: error: power state 'standby' names unknown rail 'VBAT' "
        "(the design declares no rails)"
    )


@pytest.mark.parametrize("path", ERROR_FILES, ids=[path.stem for path in ERROR_FILES])
def test_bad_power_states_give_one_line_with_place(path: Path) -> None:
    with pytest.raises(InputError) as caught:
        _states(path)
    text = caught.value.one_line()
    assert "\n" not in text
    assert text == _expected(path)

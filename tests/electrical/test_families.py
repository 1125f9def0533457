"""Every shipped family holds the published values, each with its honest status in the file.

The expected numbers are restated here from the standards and handbooks, not read back from
the YAML, so a typo in a family file fails a test. Each carries its source as a comment.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from linter.electrical.family import OutputKind, SourceStatus, static_margins
from linter.electrical.family_loader import SOURCED_KEYS, default_family_dir, load_families

CATALOGUE = load_families()


def test_the_default_folder_is_the_repository_families_folder() -> None:
    assert default_family_dir() == Path(__file__).resolve().parents[2] / "families"
    assert (default_family_dir() / "lvcmos18.yaml").is_file()
    assert CATALOGUE.folder == default_family_dir()


def test_the_expected_families_ship() -> None:
    assert list(CATALOGUE) == [
        "CMOS5", "CMOS5-TTLIN", "LVCMOS12", "LVCMOS15", "LVCMOS18", "LVCMOS25", "LVCMOS33",
        "LVCMOS33-5VT", "LVTTL33", "OD-TWOWIRE", "TTL5",
    ]


# family: (nominal, minimum, maximum, vih_min, vil_max) at nominal supply
THRESHOLDS = {
    "TTL5": (5.0, 4.75, 5.25, 2.0, 0.8),  # classic TTL, common practice
    "CMOS5": (5.0, 4.5, 5.5, 3.5, 1.5),  # 0.7 / 0.3 VCC at 5.0 V, from memory
    "CMOS5-TTLIN": (5.0, 4.5, 5.5, 2.0, 0.8),  # TTL-compatible CMOS inputs, from memory
    "LVTTL33": (3.3, 3.0, 3.6, 2.0, 0.8),  # JESD8C.01, supply confirmed, levels from memory
    "LVCMOS33": (3.3, 3.0, 3.6, 2.0, 0.8),  # JESD8C.01, supply confirmed, levels from memory
    "LVCMOS33-5VT": (3.3, 2.7, 3.6, 2.0, 0.8),  # 5 V tolerant 3.3 V logic, from memory
    "LVCMOS25": (2.5, 2.3, 2.7, 1.7, 0.7),  # JESD8-5A, from memory
    "LVCMOS18": (1.8, 1.65, 1.95, 1.17, 0.63),  # JESD8-7A 0.65 / 0.35 VDD, from memory
    "LVCMOS15": (1.5, 1.4, 1.6, 0.975, 0.525),  # JESD8-11A 0.65 / 0.35 VDD, from memory
    "LVCMOS12": (1.2, 1.1, 1.3, 0.78, 0.42),  # JESD8-12A 0.65 / 0.35 VDD, confirmed indirectly
    "OD-TWOWIRE": (3.3, 1.65, 5.5, 2.31, 0.99),  # two-wire bus 0.7 / 0.3 VDD at 3.3 V, from memory
}


@pytest.mark.parametrize("name", sorted(THRESHOLDS))
def test_supply_and_input_thresholds(name: str) -> None:
    family = CATALOGUE[name]
    nominal, minimum, maximum, vih, vil = THRESHOLDS[name]
    assert (family.supply.nominal, family.supply.minimum, family.supply.maximum) == (nominal, minimum, maximum)
    assert family.vih_min_at() == vih
    assert family.vil_max_at() == vil


# family: ([(IOL amps, VOL max)], [(IOH amps, VOH min)]) at nominal supply
OUTPUT_POINTS = {
    "TTL5": ([(16e-3, 0.4)], [(-0.4e-3, 2.4)]),  # common practice
    "CMOS5": ([(20e-6, 0.1), (4e-3, 0.33)], [(-20e-6, 4.9), (-4e-3, 3.84)]),  # from memory
    "CMOS5-TTLIN": ([(20e-6, 0.1), (4e-3, 0.33)], [(-20e-6, 4.9), (-4e-3, 3.84)]),  # from memory
    "LVTTL33": ([(2e-3, 0.4)], [(-2e-3, 2.4)]),  # JESD8C.01, from memory
    "LVCMOS33": ([(100e-6, 0.2)], [(-100e-6, 3.1)]),  # JESD8C.01 VDD - 0.2, from memory
    "LVCMOS33-5VT": ([(100e-6, 0.2), (24e-3, 0.55)], [(-100e-6, 3.1), (-24e-3, 2.2)]),  # from memory
    "LVCMOS25": ([(100e-6, 0.2), (1e-3, 0.4), (2e-3, 0.7)],
                 [(-100e-6, 2.1), (-1e-3, 2.0), (-2e-3, 1.7)]),  # JESD8-5A, from memory
    "LVCMOS18": ([(100e-6, 0.2), (2e-3, 0.45)], [(-100e-6, 1.6), (-2e-3, 1.35)]),  # JESD8-7A, from memory
    "LVCMOS15": ([(100e-6, 0.2), (2e-3, 0.375)], [(-100e-6, 1.3), (-2e-3, 1.125)]),  # JESD8-11A, from memory
    "LVCMOS12": ([(100e-6, 0.1), (2e-3, 0.3)], [(-100e-6, 1.1), (-2e-3, 0.9)]),  # JESD8-12A, from memory
    "OD-TWOWIRE": ([(3e-3, 0.4)], []),  # two-wire bus, 0.4 V at 3 mA above 2 V, from memory
}


@pytest.mark.parametrize("name", sorted(OUTPUT_POINTS))
def test_rated_output_points(name: str) -> None:
    family = CATALOGUE[name]
    lows, highs = OUTPUT_POINTS[name]
    assert [(p.current, family.vol_max_at(p.current).volts) for p in family.vol_max] == lows
    assert [(p.current, family.voh_min_at(-p.current).volts) for p in family.voh_min] == highs


# family: (input_min, input_max at nominal, input_max at the low supply corner)
INPUT_RANGE = {
    "TTL5": (-0.5, 5.5, 5.5),  # absolute maximum 5.5 V, no clamp to VCC, common practice
    "CMOS5": (-0.5, 5.5, 5.0),  # -0.5 .. VCC + 0.5, from memory
    "CMOS5-TTLIN": (-0.5, 5.5, 5.0),  # -0.5 .. VCC + 0.5, from memory
    "LVTTL33": (-0.5, 3.8, 3.5),  # JESD8C.01 absolute maximum VDD + 0.5, at most 4.6, confirmed
    "LVCMOS33": (-0.5, 3.8, 3.5),  # JESD8C.01 absolute maximum, confirmed
    "LVCMOS33-5VT": (-0.5, 5.5, 5.5),  # inputs to 5.5 V at any VCC, from memory
    "LVCMOS25": (-0.3, 2.8, 2.6),  # JESD8-5A -0.3 .. VDD + 0.3, from memory
    "LVCMOS18": (-0.3, 2.1, 1.95),  # JESD8-7A VDD + 0.3, at most 2.5 (cap confirmed)
    "LVCMOS15": (-0.3, 1.8, 1.7),  # JESD8-11A -0.3 .. VDD + 0.3, from memory
    "LVCMOS12": (-0.3, 1.5, 1.4),  # JESD8-12A VDD + 0.3, at most 1.8 (cap confirmed)
    "OD-TWOWIRE": (-0.5, 3.8, 2.15),  # two-wire bus min(VDD + 0.5, 5.5), from memory
}


@pytest.mark.parametrize("name", sorted(INPUT_RANGE))
def test_absolute_input_range(name: str) -> None:
    family = CATALOGUE[name]
    low, high, high_at_low_corner = INPUT_RANGE[name]
    assert family.input_min_at() == low
    assert family.input_max_at() == high
    assert family.input_max_at(family.supply.minimum) == high_at_low_corner


def test_caps_bind_where_the_standards_put_them() -> None:
    # JESD8C.01 absolute maximum: VDD + 0.5 but at most 4.6 V (confirmed); 4.2 V is a hypothetical supply
    assert CATALOGUE["LVCMOS33"].input_max_at(4.2) == 4.6
    # two-wire bus: at most 5.5 V (from memory)
    assert CATALOGUE["OD-TWOWIRE"].input_max_at(5.5) == 5.5
    # two-wire bus VOL: 0.2 VDD at 3 mA at or below 2 V (from memory): 0.33 V on a 1.65 V bus
    assert CATALOGUE["OD-TWOWIRE"].vol_max_at(3e-3, 1.65).volts == 0.33


def test_input_currents_and_kinds() -> None:
    ttl = CATALOGUE["TTL5"]
    assert (ttl.iil, ttl.iih) == (-1.6e-3, 40e-6)  # standard TTL input, common practice
    cmos = CATALOGUE["LVCMOS33"]
    assert (cmos.iil, cmos.iih) == (-1e-6, 1e-6)  # CMOS input +/-1 uA guaranteed, common practice
    assert CATALOGUE["OD-TWOWIRE"].output_kind is OutputKind.OPEN_DRAIN
    assert all(CATALOGUE[n].output_kind is OutputKind.PUSH_PULL for n in CATALOGUE if n != "OD-TWOWIRE")
    assert CATALOGUE["LVCMOS33-5VT"].inputs_protected_unpowered  # often protected unpowered, from memory
    assert not CATALOGUE["LVCMOS33"].inputs_protected_unpowered


@pytest.mark.parametrize("name", sorted(THRESHOLDS))
def test_every_value_names_its_source_with_a_status(name: str) -> None:
    family = CATALOGUE[name]
    assert sorted(family.sources) == sorted(SOURCED_KEYS)
    assert all(source.status is not None for source in family.sources.values())


# (family, key): the status levels.md gives that value
STATUSES = {
    ("LVCMOS18", "vih_min"): SourceStatus.FROM_MEMORY,  # "JESD8-7A, from memory"
    ("LVCMOS18", "supply"): SourceStatus.CONFIRMED,  # confirmed against a counterpart standard
    ("LVCMOS33", "supply"): SourceStatus.CONFIRMED,
    ("LVCMOS33", "input_max"): SourceStatus.CONFIRMED,  # absolute maximum confirmed
    ("LVCMOS33", "vih_min"): SourceStatus.FROM_MEMORY,  # the 2.0 V trap: kept, from memory
    ("LVCMOS12", "supply"): SourceStatus.CONFIRMED,
    ("LVCMOS12", "vil_max"): SourceStatus.CONFIRMED_INDIRECTLY,  # applied "to meet" JESD8-12A
    ("LVCMOS12", "vih_min"): SourceStatus.CONFIRMED_INDIRECTLY,
    ("LVCMOS18", "input_max"): SourceStatus.FROM_MEMORY,  # cap confirmed, VDD + 0.3 not: the weaker wins
    ("LVCMOS25", "vih_min"): SourceStatus.FROM_MEMORY,  # "JESD8-5A, from memory"
    ("LVCMOS15", "vih_min"): SourceStatus.FROM_MEMORY,  # "JESD8-11A, from memory"
    ("TTL5", "vih_min"): SourceStatus.COMMON_PRACTICE,  # textbooks agree
    ("TTL5", "voh_min"): SourceStatus.COMMON_PRACTICE,
    ("CMOS5", "vih_min"): SourceStatus.FROM_MEMORY,
}


@pytest.mark.parametrize(("name", "key"), sorted(STATUSES))
def test_statuses_match_what_is_known(name: str, key: str) -> None:
    source = CATALOGUE[name].sources[key]
    assert source.status is STATUSES[(name, key)]


def test_standard_numbers_are_named_in_the_sources() -> None:
    expected = {"LVTTL33": "JESD8C.01", "LVCMOS33": "JESD8C.01", "LVCMOS25": "JESD8-5A",
                "LVCMOS18": "JESD8-7A", "LVCMOS15": "JESD8-11A", "LVCMOS12": "JESD8-12A"}
    for name, standard in expected.items():
        assert CATALOGUE[name].sources["vih_min"].text.startswith(standard + ","), name


# family: (NM_L, NM_H) at nominal supply and the lightest rated points
STATIC_MARGINS = {
    "TTL5": (0.4, 0.4),  # 0.8 - 0.4 and 2.4 - 2.0, common practice
    "LVTTL33": (0.4, 0.4),  # JESD8C.01, from memory
    "LVCMOS33": (0.6, 1.1),  # 0.8 - 0.2 and 3.1 - 2.0, JESD8C.01, from memory
    "LVCMOS25": (0.5, 0.4),  # 0.7 - 0.2 and 2.1 - 1.7, JESD8-5A, from memory
    "LVCMOS18": (0.43, 0.43),  # 0.63 - 0.2 and 1.6 - 1.17, JESD8-7A, from memory
    "LVCMOS15": (0.325, 0.325),  # 0.525 - 0.2 and 1.3 - 0.975, JESD8-11A, from memory
    "LVCMOS12": (0.32, 0.32),  # 0.42 - 0.1 and 1.1 - 0.78, JESD8-12A, from memory
    "CMOS5": (1.4, 1.4),  # 1.5 - 0.1 and 4.9 - 3.5, from memory
    "OD-TWOWIRE": (0.59, 0.99),  # 0.99 - 0.4 and ideal pull-up 3.3 - 2.31, from memory
}


@pytest.mark.parametrize("name", sorted(STATIC_MARGINS))
def test_static_discipline_margins(name: str) -> None:
    margins = static_margins(CATALOGUE[name])
    assert (margins.nm_low_v, margins.nm_high_v) == STATIC_MARGINS[name]
    assert margins.disciplined
    assert margins.vol_max < margins.vil_max < margins.vih_min < margins.voh_min


def test_static_margins_at_a_load_current() -> None:
    # JESD8-5A at 2 mA, from memory: VOL 0.7 = VIL and VOH 1.7 = VIH, so both margins are 0.0 V
    margins = static_margins(CATALOGUE["LVCMOS25"], load_a=2e-3)
    assert (margins.nm_low_v, margins.nm_high_v, margins.overloaded) == (0.0, 0.0, False)
    assert not margins.disciplined
    # JESD8-5A between rated points, interpolated: VOH 2.0 - (0.5 / 1.0) * 0.3 = 1.85 V at 1.5 mA
    assert static_margins(CATALOGUE["LVCMOS25"], load_a=1.5e-3).voh_min == 1.85
    # JESD8C.01 LVCMOS is rated at 100 uA only: 2 mA overloads it
    assert static_margins(CATALOGUE["LVCMOS33"], load_a=2e-3).overloaded
    # classic TTL at 1 mA (common practice): within IOL 16 mA but beyond IOH -0.4 mA
    ttl = static_margins(CATALOGUE["TTL5"], load_a=1e-3)
    assert (ttl.overload_low, ttl.overload_high, ttl.overloaded) == (False, True, True)


def test_ratio_levels_move_with_the_supply() -> None:
    family = CATALOGUE["LVCMOS18"]
    # JESD8-7A at the 1.65 V corner, from memory: VIH 0.65 * 1.65, VIL 0.35 * 1.65, VOH 1.65 - 0.45
    assert family.vih_min_at(1.65) == 1.0725
    assert family.vil_max_at(1.65) == 0.5775
    assert family.voh_min_at(2e-3, 1.65).volts == 1.2
    # and at the 1.95 V corner
    assert family.vih_min_at(1.95) == 1.2675
    assert family.vil_max_at(1.95) == 0.6825
    # fixed thresholds do not move: JESD8C.01 2.0 V at both corners, from memory
    assert CATALOGUE["LVCMOS33"].vih_min_at(3.0) == CATALOGUE["LVCMOS33"].vih_min_at(3.6) == 2.0


def test_levels_between_and_beyond_rated_points() -> None:
    family = CATALOGUE["LVCMOS18"]
    # below the lightest point the lightest point holds (JESD8-7A 0.2 V at 100 uA, from memory)
    assert family.vol_max_at(0.0).volts == 0.2
    # midway between 100 uA and 2 mA: 0.2 + 0.5 * 0.25
    assert family.vol_max_at(1.05e-3).volts == 0.325
    over = family.vol_max_at(2.5e-3)
    assert over.overloaded and over.rated_a == 2e-3 and over.volts == 0.45
    assert not family.vol_max_at(2e-3).overloaded

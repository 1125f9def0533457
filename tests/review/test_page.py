"""The review page as a document: it parses, fetches nothing, and shows the check's own numbers.

Acceptance checks of issue 6 on the demo board (an invented design with seeded faults) and on
the three-rail fixture (invented): the page parses with the standard library's HTML parser, has
no external reference of any kind, holds exactly one level diagram per failing or thin crossing
the check reports, and every margin it shows equals the margin in ``levelcross check --format
json`` for the same design (both parsed, compared as numbers).
"""

from __future__ import annotations

import json
import re

import pytest

from linter.review.units import format_margin
from tests.review.conftest import THREE_RAIL, run_cli
from tests.review.page_parser import read_page

MARGIN_RULES = {"low-level-margin": "low", "high-level-margin": "high"}
OVERVOLTAGE_RULE = "input-overvoltage"
EXTERNAL = re.compile(r"^\s*(?:[a-z][a-z0-9+.-]*:|//)", re.I)  # any scheme (http:, file:, data:) or //host


def crossing_keys(check: dict) -> set[tuple[str, str | None, str]]:
    """(net, driver, receiver) of every active finding about one crossing, from the check JSON.

    A margin finding names its driver and receiver; an over-voltage finding its receiver and
    then the sources that set the net's top voltage (driver None when only a pull-up does).
    """
    keys = set()
    for finding in check["findings"]:
        if finding["rule"] not in MARGIN_RULES and finding["rule"] != OVERVOLTAGE_RULE:
            continue
        roles = [(site["role"], site["name"]) for site in finding["sites"]]
        driver = next((name for role, name in roles if role == "driver"), None)
        receiver = next(name for role, name in roles if role == "receiver")
        keys.add((finding["subject"], driver, receiver))
    return keys


def figure_of(page, net: str, driver: str | None, receiver: str):
    found = [f for f in page.figures if f.attributes["data-net"] == net and f.attributes["data-receiver"] == receiver
             and (driver is None or f.attributes["data-driver"] == driver) and f.attributes["data-why"] != "requested"]
    assert len(found) == 1, (net, driver, receiver, [f.attributes for f in page.figures])
    return found[0]


@pytest.fixture(params=["demo", "fixture"])
def page_and_check(request, demo_page, fixture_page):
    text, check, _ = demo_page if request.param == "demo" else fixture_page
    return text, read_page(text), check


def test_the_page_parses_as_one_html_document(page_and_check):
    text, page, _ = page_and_check
    assert text.startswith("<!DOCTYPE html>\n<html lang=\"en\">")
    tags = [tag for tag, _ in page.elements]
    assert tags.count("html") == tags.count("head") == tags.count("body") == 1
    assert tags.count("script") == 1 and tags.count("style") == 1
    assert len(page.ids) == len(set(page.ids)), "ids must be unique (inline SVG ids are prefixed per figure)"


def test_nothing_is_fetched_from_outside(page_and_check):
    _, page, _ = page_and_check
    for tag, attributes in page.elements:
        assert tag not in ("link", "img", "iframe", "object", "embed", "audio", "video", "source", "base"), tag
        assert "src" not in attributes and "srcset" not in attributes, (tag, attributes)
        for name in ("href", "xlink:href", "action", "data", "poster"):
            value = attributes.get(name)
            if value is not None:
                assert not EXTERNAL.match(value), (tag, name, value)
                assert value.startswith("#"), f"only links inside the page: {tag} {name}={value!r}"
    for style in page.styles:
        assert "@import" not in style
        assert not re.search(r"url\((?!#)", style)
    for script in page.scripts:
        assert not re.search(r"\b(fetch|XMLHttpRequest|import|WebSocket|src)\b", script)


def test_every_link_inside_the_page_has_a_target(page_and_check):
    _, page, _ = page_and_check
    ids = set(page.ids)
    rules = {row.attributes["data-rule"] for row in page.rows["findings-table"]}
    for tag, attributes in page.elements:
        for name in ("href", "xlink:href"):
            target = attributes.get(name, "#")[1:]
            if target.startswith("filter="):
                kind, _, value = target[len("filter="):].partition(":")
                assert kind == "rule" and value in rules, target
            elif target:
                assert target in ids, f"{tag} {name}=#{target} points at nothing"


def test_one_diagram_per_failing_or_thin_crossing(page_and_check):
    _, page, check = page_and_check
    keys = crossing_keys(check)
    assert keys, "both designs have failing crossings"
    drawn = [f for f in page.figures if f.attributes["data-why"] != "requested"]
    assert len(drawn) == len(keys)
    for net, driver, receiver in keys:
        assert figure_of(page, net, driver, receiver).has_svg
    assert all(f.attributes["data-why"] in ("failing", "thin") for f in drawn)


def test_the_margins_shown_equal_the_check_json(page_and_check):
    _, page, check = page_and_check
    compared = 0
    for finding in check["findings"]:
        roles = {site["role"]: site["name"] for site in reversed(finding["sites"])}
        if finding["rule"] in MARGIN_RULES:
            side = MARGIN_RULES[finding["rule"]]
            figure = figure_of(page, finding["subject"], roles["driver"], roles["receiver"])
            expected = finding["data"]["nm_mv"]
            assert float(figure.attributes[f"data-nm-{side}-mv"]) == expected
        elif finding["rule"] == OVERVOLTAGE_RULE:
            side = "over-voltage"
            figure = figure_of(page, finding["subject"], roles.get("driver"), roles["receiver"])
            expected = -finding["data"]["excess_mv"]
            assert float(figure.attributes["data-overvoltage-mv"]) == expected
        else:
            continue
        exact, shown = figure.margin_cells[side]
        assert float(exact) == expected
        assert float(shown.removesuffix(" mV")) == pytest.approx(expected, abs=0.05)
        assert shown == format_margin(expected)
        compared += 1
    crossing_findings = [f for f in check["findings"] if f["rule"] in MARGIN_RULES or f["rule"] == OVERVOLTAGE_RULE]
    assert compared == len(crossing_findings) > 0


def test_the_demo_board_shows_its_worked_numbers(demo_page):
    """Three seeded faults of the demo board, numbers worked by hand in its EXPECTED.md.

    fpga_stat: LVCMOS18 VOH = 1.71 - 0.2 = 1.51 V against LVCMOS33 VIH 2.0 V: NM_H = -490 mV
    (JESD8-7A and JESD8C.01, from memory). sense_in: LVCMOS33 NM_L = 0.8 - 0.2 = 600 mV, below
    the 700 mV the design asks: thin. fpga_cfg: the net reaches 3.465 V, the LVCMOS18 input
    survives min(1.71 + 0.3, 2.5) = 2.01 V: 1455 mV over (JESD8-7A, from memory).
    """
    page = read_page(demo_page[0])
    by_net = {f.attributes["data-net"]: f for f in page.figures}
    assert float(by_net["ctrl_board.fpga_stat"].attributes["data-nm-high-mv"]) == pytest.approx(-490.0, abs=0.5)
    assert by_net["ctrl_board.fpga_stat"].margin_cells["high"][1] == "-490 mV"
    assert by_net["ctrl_board.sense_in"].attributes["data-why"] == "thin"
    assert by_net["ctrl_board.sense_in"].margin_cells["low"][1] == "+600 mV"
    assert float(by_net["ctrl_board.fpga_cfg"].attributes["data-overvoltage-mv"]) == pytest.approx(-1455.0, abs=0.5)


def test_findings_table_follows_the_check_and_carries_filter_data(page_and_check):
    _, page, check = page_and_check
    rows = page.rows["findings-table"]
    assert [(r.attributes["data-rule"], r.attributes["data-severity"]) for r in rows] == [
        (f["rule"], f["severity"]) for f in check["findings"]]
    waived = [r.attributes["data-rule"] for r in page.rows.get("waived-table", [])]
    assert waived == [f["rule"] for f in check["waived"]]


def test_findings_link_to_their_diagram_and_name_their_rails(fixture_page):
    page = read_page(fixture_page[0])
    rows = page.rows["findings-table"]
    anchors = {f.attributes["data-net"]: f.attributes["id"] for f in page.figures
               if f.attributes["data-why"] != "requested"}
    by_rule = {}
    for row in rows:
        by_rule.setdefault(row.attributes["data-rule"], []).append(row)
    # the high-level fault on irq crosses from V18 to V33; the floating input sits on V33 only
    irq = next(r for r in by_rule["high-level-margin"] if f"#{anchors['three_rail.irq']}" in r.links)
    assert irq.attributes["data-rails"] == "V18 V33"
    floating = by_rule["input-floating"]
    assert len(floating) == 1 and floating[0].attributes["data-rails"] == "V33" and floating[0].links == []
    assert by_rule["low-level-margin"][0].attributes["data-severity"] == "warning"
    assert [r.attributes["data-rule"] for r in page.rows["waived-table"]] == ["input-floating"]


def test_the_page_names_the_sections_and_the_caution(fixture_page):
    text = fixture_page[0]
    for heading in ("1. Summary", "2. Level diagrams", "3. Family compatibility", "4. Rail crossing map",
                    "5. Findings", "6. Caution"):
        assert f"<h2>{heading}</h2>" in text
    assert "levelcross checks declared DC data only" in text
    assert "over-voltage and back-powering can damage parts" in text


def test_the_plans_cost_equals_the_planners_json(fixture_page, tmp_path):
    """The summary's plan cost and naive cost are ``levelcross plan --format json``'s totals."""
    text, _, _ = fixture_page
    out = tmp_path / "plan.json"
    run_cli("plan", THREE_RAIL, "--format", "json", "-o", out)
    totals = json.loads(out.read_text(encoding="utf-8"))["totals"]
    ((_, attributes),) = [(t, a) for t, a in read_page(text).elements if "plan" in a.get("class", "").split()]
    assert (float(attributes["data-cost"]), float(attributes["data-naive-cost"])) == (
        totals["cost"], totals["naive_cost"])
    assert f"<strong>{totals['cost']:.3f}</strong>" in text
    assert f"{totals['fixed_receivers']} of {totals['failing_receivers']}" in text


def test_without_a_plan_the_summary_says_so(tmp_path):
    assert run_cli("report", THREE_RAIL, "-o", tmp_path / "review.html", "--no-plan") == 1
    text = (tmp_path / "review.html").read_text(encoding="utf-8")
    assert "<p><strong>No plan.</strong> Planning was skipped (--no-plan).</p>" in text
    assert 'class="plan"' not in text

"""The review page in a real browser: headless Chromium opens it from disk and the filter works.

Chromium is driven without any automation package (see ``devtools.py``): once through
``--dump-dom`` with a filter given in the address (the page's script applies ``#filter=...`` on
load), once through the DevTools protocol with a real mouse click on a filter button, and the
page is photographed to make sure it renders something. The tests skip only when no Chromium is
installed; CI installs Debian's ``chromium`` package.
"""

from __future__ import annotations

import base64
import io
import re
from pathlib import Path

import numpy as np
import pytest
from PIL import Image

from tests.review.devtools import DevToolsPage, dump_dom, find_browser, screenshot

BROWSER = find_browser()
pytestmark = pytest.mark.skipif(BROWSER is None, reason="no Chromium installed (looked for chromium, "
                                "chromium-browser and /usr/bin/chromium); CI installs Debian's chromium")

ROW_IN_DOM = re.compile(r"<tr id=\"finding-\d+\"[^>]*>")


def page_url(folder: Path, fragment: str = "") -> str:
    return (folder / "review.html").resolve().as_uri() + fragment


def rows_in_dump(dom: str) -> list[tuple[str, bool]]:
    """(rule, hidden) of every findings row in a dumped DOM."""
    rows = []
    for tag in ROW_IN_DOM.findall(dom):
        rule = re.search(r'data-rule="([^"]+)"', tag).group(1)
        rows.append((rule, " hidden" in tag))
    return rows


def test_a_filter_in_the_address_hides_the_other_rows(fixture_page, tmp_path):
    text, check, folder = fixture_page
    dom = dump_dom(BROWSER, tmp_path / "profile", page_url(folder, "#filter=rule:high-level-margin"))
    rows = rows_in_dump(dom)
    assert [rule for rule, _ in rows] == [f["rule"] for f in check["findings"]]
    assert [rule for rule, hidden in rows if not hidden] == ["high-level-margin", "high-level-margin"]
    assert all(hidden for rule, hidden in rows if rule != "high-level-margin")
    assert "2 of 5 findings shown" in dom
    assert 'data-filter="rule:high-level-margin"' in dom


def test_without_a_filter_every_row_shows(fixture_page, tmp_path):
    _, check, folder = fixture_page
    rows = rows_in_dump(dump_dom(BROWSER, tmp_path / "profile", page_url(folder)))
    assert len(rows) == len(check["findings"]) and not any(hidden for _, hidden in rows)


def test_clicking_filters_hides_rows_and_the_page_renders(demo_page, tmp_path):
    text, check, folder = demo_page
    page = DevToolsPage(BROWSER, tmp_path / "profile", page_url(folder))
    try:
        page.wait_for("document.readyState === 'complete' && !!document.getElementById('findings-shown')")
        total = len(check["findings"])
        assert page.evaluate("document.querySelectorAll('#findings-table tbody tr:not([hidden])').length") == total

        def click_filter(kind: str, value: str) -> None:
            box = page.evaluate(
                f"(function () {{ var b = document.querySelector('button[data-filter-kind=\"{kind}\"]"
                f"[data-filter-value=\"{value}\"]'); b.scrollIntoView({{block: 'center'}});"
                " var r = b.getBoundingClientRect(); return [r.left + r.width / 2, r.top + r.height / 2]; })()")
            page.click(*box)

        click_filter("severity", "warning")
        warnings = sum(1 for f in check["findings"] if f["severity"] == "warning")
        assert 0 < warnings < total
        shown = page.evaluate("Array.from(document.querySelectorAll('#findings-table tbody tr:not([hidden])'))"
                              ".map(function (r) { return r.getAttribute('data-severity'); })")
        assert shown == ["warning"] * warnings
        assert page.evaluate("document.getElementById('findings-shown').textContent") == (
            f"{warnings} of {total} findings shown")

        click_filter("rail", "VCC5V0")  # warnings that touch the 5 V rail: the unpowered actuator driver
        expected = [f for f in check["findings"] if f["severity"] == "warning" and "VCC5V0" in (
            f["data"].get("driver_rail"), f["data"].get("receiver_rail"))]
        visible = page.evaluate("Array.from(document.querySelectorAll('#findings-table tbody tr:not([hidden])'))"
                                ".map(function (r) { return r.getAttribute('data-rule'); })")
        assert visible == [f["rule"] for f in expected] and visible

        click_filter("severity", "")  # "all" again: back to every finding on VCC5V0
        assert page.evaluate("document.body.getAttribute('data-filter')") == "rail:VCC5V0"

        shot = page.call("Page.captureScreenshot", format="png")
        pixels = np.asarray(Image.open(io.BytesIO(base64.b64decode(shot["data"]))).convert("L"), float)
        assert pixels.shape[0] > 500 and pixels.shape[1] > 800
        assert pixels.std() > 10, "the screenshot is blank"
        assert (pixels < 128).mean() > 0.005, "no dark text or lines on the page"
    finally:
        page.close()


def test_the_level_diagrams_render_as_pictures(fixture_page, tmp_path):
    """A photograph of each diagram's picture is not blank and holds the bands' colours."""
    _, _, folder = fixture_page
    page = DevToolsPage(BROWSER, tmp_path / "profile", page_url(folder))
    try:
        page.wait_for("document.readyState === 'complete'")
        boxes = page.evaluate(
            "Array.from(document.querySelectorAll('figure.level-diagram svg')).map(function (svg) {"
            " var r = svg.getBoundingClientRect();"
            " return [r.left + window.scrollX, r.top + window.scrollY, r.width, r.height]; })")
        assert len(boxes) == 5
        for x, y, width, height in boxes:
            assert width > 600 and height > 300, "the diagram is drawn at a readable size"
            shot = page.call("Page.captureScreenshot", format="png", captureBeyondViewport=True,
                             clip={"x": x, "y": y, "width": width, "height": height, "scale": 1})
            image = np.asarray(Image.open(io.BytesIO(base64.b64decode(shot["data"]))).convert("RGB"), float)
            assert image.std() > 10
            # the low bands' light blue (#9fd3f0) and the high bands' light orange (#f3c76b)
            for colour in ((0x9F, 0xD3, 0xF0), (0xF3, 0xC7, 0x6B)):
                assert (np.abs(image - colour).sum(axis=2) < 12).sum() > 200, colour
    finally:
        page.close()


def test_a_screenshot_from_the_command_line_is_not_blank(demo_page, tmp_path):
    _, _, folder = demo_page
    target = tmp_path / "page.png"
    screenshot(BROWSER, tmp_path / "profile", page_url(folder), target, size="1200,1600")
    pixels = np.asarray(Image.open(target).convert("L"), float)
    assert pixels.shape == (1600, 1200)
    assert pixels.std() > 10 and (pixels < 128).mean() > 0.005

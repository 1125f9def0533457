"""The figures, checked numerically: the drawn band edges and margins are the model's values.

The level diagram is read back from the matplotlib axes the drawing function returns (patch
rectangles and line data by gid), never compared as pixels. The hand-worked numbers are those
of ``test_model.py`` (LVCMOS18 driving LVCMOS33: VOL 0.2, VOH 1.51, VIL 0.8, VIH 2.0 V).
"""

from __future__ import annotations

import re
import xml.etree.ElementTree as ElementTree
from dataclasses import replace

import pytest

from linter.review.data import NOT_JUDGED
from linter.review.figure_output import inline_svg, svg_text
from linter.review.level_figure import draw_level_diagram
from linter.review.map_figure import draw_crossing_map
from linter.review.matrix_figure import draw_family_matrix
from tests.review.conftest import diagram


def band(drawn, gid):
    rect = drawn.bands[gid]
    assert rect.get_gid() == gid and rect in drawn.axes.patches
    return rect.get_y(), rect.get_y() + rect.get_height(), rect.get_x(), rect.get_x() + rect.get_width()


def test_band_edges_are_the_diagrams_levels(model):
    for d in model.diagrams:
        drawn = draw_level_diagram(d)
        assert band(drawn, "driver-low")[:2] == pytest.approx((0.0, d.vol_v))
        assert band(drawn, "driver-high")[:2] == pytest.approx((d.voh_v, d.driver_top_v))
        assert band(drawn, "receiver-low")[:2] == pytest.approx((0.0, d.vil_v))
        assert band(drawn, "receiver-invalid")[:2] == pytest.approx((d.vil_v, d.vih_v))
        assert band(drawn, "receiver-high")[:2] == pytest.approx((d.vih_v, d.receiver_top_v))
        assert band(drawn, "receiver-range")[:2] == pytest.approx((d.input_min_v, d.input_max_v))
        low, high = drawn.margins["margin-low"], drawn.margins["margin-high"]
        assert list(low.get_ydata()) == pytest.approx([d.vol_v, d.vil_v])
        assert list(high.get_ydata()) == pytest.approx([d.vih_v, d.voh_v])
        bottom, top = drawn.axes.get_ylim()
        assert bottom < min(0.0, d.input_min_v) and top > max(d.input_max_v, d.net_max_v, d.driver_top_v)


def test_the_failing_crossing_is_drawn_and_labelled_as_it_fails(model):
    d = diagram(model, "three_rail.irq")
    drawn = draw_level_diagram(d)
    assert band(drawn, "driver-high")[:2] == pytest.approx((1.51, 1.71))
    assert band(drawn, "receiver-invalid")[:2] == pytest.approx((0.8, 2.0))
    assert drawn.labels["margin-high-label"].get_text() == "NM_H -490 mV\nFAIL"
    assert drawn.labels["margin-low-label"].get_text() == "NM_L +600 mV\nok"
    assert drawn.labels["label-voh"].get_text() == "VOH 1.51 V"
    assert drawn.labels["label-vih"].get_text() == "VIH 2 V"
    # driver bands left of the margins, margins left of the receiver's bands
    driver_right = band(drawn, "driver-low")[3]
    receiver_left = band(drawn, "receiver-low")[2]
    margin_x = [drawn.margins[k].get_xdata()[0] for k in ("margin-low", "margin-high")]
    assert driver_right < min(margin_x) and max(margin_x) < receiver_left


def test_over_voltage_draws_the_nets_top_above_the_input_limit(model):
    drawn = draw_level_diagram(diagram(model, "three_rail.cfg"))
    (line,) = [line for line in drawn.axes.lines if line.get_gid() == "net-max"]
    assert list(line.get_ydata()) == pytest.approx([3.465, 3.465])
    assert band(drawn, "receiver-range")[1] == pytest.approx(2.01)
    assert drawn.labels["label-net-max"].get_text() == "net top 3.465 V"
    assert drawn.labels["overvoltage-label"].get_text() == "over-voltage -1455 mV\nFAIL"
    assert "overvoltage-label" not in draw_level_diagram(diagram(model, "three_rail.irq")).labels


def test_the_thin_margin_says_thin(model):
    drawn = draw_level_diagram(diagram(model, "three_rail.sense"))
    assert drawn.labels["margin-low-label"].get_text() == "NM_L +600 mV\nTHIN"


def test_an_open_drain_driver_without_pull_up_has_no_high_band(model):
    d = replace(diagram(model, "three_rail.irq"), voh_v=None, nm_high_mv=None, high_verdict=NOT_JUDGED)
    drawn = draw_level_diagram(d)
    assert "driver-high" not in drawn.bands and "margin-high" not in drawn.margins
    assert any(t.get_gid() == "driver-no-high" for t in drawn.axes.texts)


def test_close_labels_are_moved_apart_but_keep_their_order(model):
    d = replace(diagram(model, "three_rail.irq"), vil_v=1.98, vih_v=2.0)
    drawn = draw_level_diagram(d)
    vil, vih = drawn.labels["label-vil"].get_position()[1], drawn.labels["label-vih"].get_position()[1]
    assert vil < vih and vih - vil > 0.05


def test_svg_is_deterministic_and_keeps_its_numbers_as_text(model):
    d = diagram(model, "three_rail.irq")
    first, second = svg_text(draw_level_diagram(d).figure), svg_text(draw_level_diagram(d).figure)
    assert first == second
    assert "NM_H -490 mV" in first and "Matplotlib" not in first and "<dc:date>" not in first
    ElementTree.fromstring(first.encode())  # a well-formed standalone document


def test_inline_svg_prefixes_every_id_and_reference(model):
    text = inline_svg(svg_text(draw_level_diagram(diagram(model, "three_rail.irq")).figure), "crossing-9", "label")
    ids = re.findall(r'\bid="([^"]+)"', text)
    references = re.findall(r'(?:url\(#|href="#)([^")]+)', text)
    assert ids and all(i.startswith("crossing-9-") for i in ids)
    assert references and set(references) <= set(ids)
    assert text.startswith("<svg") and 'role="img" aria-label="label"' in text.split(">", 1)[0]
    assert "<?xml" not in text and "DOCTYPE" not in text and "http://" not in text.split(">", 1)[0]


def test_the_matrix_marks_failing_cells_in_text(model):
    figure, axes = draw_family_matrix(model.matrix)
    texts = {t.get_gid(): t.get_text() for t in axes.texts if t.get_gid()}
    families = model.matrix.families
    row, column = families.index("LVCMOS18"), families.index("LVCMOS33")
    assert texts[f"matrix-{row}-{column}"] == "L +600 mV\nH -400 mV\nFAIL\nhigh\n1 in design"
    same = families.index("LVCMOS33")
    assert texts[f"matrix-{same}-{same}"].splitlines()[2] == "pass"
    assert svg_text(figure) == svg_text(draw_family_matrix(model.matrix)[0])


def test_the_map_draws_one_arrow_per_edge(model):
    figure = draw_crossing_map(model.crossing_map)
    gids = {p.get_gid() for p in figure.axes[0].patches}
    for edge in model.crossing_map.edges:
        assert f"edge-{edge.source}-{edge.target}" in gids
    assert {f"group-{g.rail}" for g in model.crossing_map.groups} <= gids
    text = svg_text(figure)
    assert "1 crossing" in text and "1 FAIL" in text

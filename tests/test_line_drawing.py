"""The line drawn to scale: in the line view (tests/test_widgets.py) and in the review pack's
report, from one function (rheoline.scenario.line_drawing)."""

from __future__ import annotations

import math

import numpy as np
import pytest

from rheoline.scenario.line_drawing import (
    _NARROWEST_PX,
    _label_places,
    line_drawing,
    shares_percent,
)


def test_each_part_is_drawn_to_its_length_and_bore():
    # invented demo line: 150 cm of 3 mm tube, a fitting, 30 cm of 1 mm tube, the exit
    fig = line_drawing(
        ["tube a", "fitting", "tube b", "exit"],
        [3.0, None, 1.0, float("nan")],
        [1.5, None, 0.3, float("nan")],
        [2.0, 1.0, 12.0, 5.0],
    )
    outlines = [t for t in fig.data if t.fill == "toself"]
    assert [(min(t.x), max(t.x)) for t in outlines] == [(0.0, 150.0), (150.0, 180.0)]
    assert [max(t.y) - min(t.y) for t in outlines] == [3.0, 1.0]
    ticks = [t for t in fig.data if t.mode == "lines+markers"]
    assert [t.x[0] for t in ticks] == [150.0, 180.0]  # the fitting and the exit, in place
    labels = [a.text for a in fig.layout.annotations]
    assert labels == [
        "tube a: 10.0 %",
        "fitting: 5.00 %",
        "<b>tube b: 60.0 % (dominant)</b>",
        "exit: 25.0 %",
    ]
    assert outlines[1].fillpattern.shape == "x" and outlines[0].fillpattern.shape is None


def test_a_dominant_part_without_a_length_is_marked_by_a_symbol():
    fig = line_drawing(["tube", "filter"], [3.0, None], [1.0, None], [1.0, 9.0])
    stars = [t for t in fig.data if t.mode == "markers" and t.marker.symbol == "star"]
    assert len(stars) == 1 and stars[0].x[0] == 100.0
    assert "(dominant)" in fig.layout.annotations[1].text


def test_shares_of_no_drop_are_zero():
    assert shares_percent([0.0, 0.0]) == [0.0, 0.0]
    assert shares_percent([float("nan"), 2.0]) == [0.0, 100.0]


def test_the_review_pack_draws_each_scenarios_line(tmp_path):
    from rheoline.scenario.compare import run_scenarios
    from rheoline.scenario.export import write_pack
    from rheoline.scenario.files import load_scenarios
    from rheoline.scenario.pack_report import pack_figures
    from rheoline.scenario.reading import example_path

    run = run_scenarios(load_scenarios(example_path("minimal")))
    drawings = [f for f in pack_figures(run) if f.layout.title.text.startswith("The line to scale")]
    assert len(drawings) == run.table["scenario"].nunique()
    first = run.table["case"].iloc[0]
    rows = run.parts[run.parts["case"] == first]
    labels = [a.text.replace("<b>", "").replace("</b>", "") for a in drawings[0].layout.annotations]
    for part, share, label in zip(rows["part"], rows["share [%]"], labels, strict=True):
        shown = float(label.split(": ")[1].split(" %")[0].replace(",", ""))
        assert label.startswith(f"{part}: ")
        assert shown == pytest.approx(share, rel=5e-3)  # three significant figures
    lumens = rows[rows["kind"] == "lumen"]
    outlines = [t for t in drawings[0].data if t.fill == "toself"]
    assert np.allclose([max(t.x) - min(t.x) for t in outlines], 100.0 * lumens["length [m]"])
    assert np.allclose([max(t.y) - min(t.y) for t in outlines], lumens["inner diameter [mm]"])
    folder = write_pack(run, tmp_path / "pack")
    report = (folder / "report.html").read_text(encoding="utf-8")
    assert "The line to scale" in report and "(dominant)" in report
    assert not math.isnan(float(rows["share [%]"].max()))


def _clashes(anchors, widths, places):
    """Label pairs that overlap in a row, or a leader through a lower row's label box."""
    boxes = []
    for a, w, (_, side) in zip(anchors, widths, places, strict=True):
        lo = {"center": a - w / 2, "right": a - w, "left": a}[side]
        boxes.append((lo, lo + w))
    found = []
    for i, (row_i, _) in enumerate(places):
        for j, (row_j, _) in enumerate(places):
            lo, hi = boxes[i]
            if i < j and row_i == row_j and min(hi, boxes[j][1]) > max(lo, boxes[j][0]):
                found.append(("overlap", i, j))
            # a leader along a box's edge (1 px) does not cross it
            if row_j > row_i and lo + 1 / _NARROWEST_PX < anchors[j] < hi - 1 / _NARROWEST_PX:
                found.append(("crossed", j, i))
    return found


@pytest.mark.parametrize(
    "anchors, widths",
    [
        ([0.45, 0.91, 0.915], [0.45, 0.7, 0.3]),  # a long set, a short catheter, the exit
        # five short parts at the end of a long line
        ([0.3, 0.7, 0.9, 0.905, 0.91, 0.915, 0.92], [0.3, 0.55, 0.4, 0.75, 0.3, 0.55, 0.4]),
        ([0.0, 0.0, 0.5, 0.96], [0.3, 0.55, 0.4, 0.75]),  # ticks at the source
        # parts spread evenly, labels twice their spacing
        ([0.08, 0.24, 0.4, 0.56, 0.72, 0.88], [0.3, 0.32, 0.3, 0.32, 0.3, 0.32]),
    ],
)
def test_no_label_hides_another_or_is_crossed_by_a_leader(anchors, widths):
    places = _label_places(anchors, widths)
    assert _clashes(anchors, widths, places) == []
    for (_, side), a, w in zip(places, anchors, widths, strict=True):
        lo = {"center": a - w / 2, "right": a - w, "left": a}[side]
        assert lo >= -0.01 and lo + w <= 1.05  # inside the plot
    assert max(row for row, _ in places) < len(anchors)


def test_labels_that_fit_share_a_row():
    places = _label_places([0.1, 0.5, 0.9], [0.15, 0.15, 0.15])
    assert {row for row, _ in places} == {0}


def test_labels_too_wide_for_any_order_are_still_all_placed():
    # labels far wider than their spacing may clash whatever the order of rows (a limit of
    # vertical leaders); every label still gets a row and a side
    anchors = [0.08, 0.24, 0.4, 0.56, 0.72, 0.88]
    places = _label_places(anchors, [0.3, 0.55, 0.4, 0.75, 0.3, 0.55])
    assert len(places) == 6 and all(side in ("left", "right", "center") for _, side in places)


def test_the_clash_check_sees_a_leader_through_a_label():
    # the layout before this placement: centred labels staggered over three rows by index
    anchors, widths = [0.45, 0.91, 0.915], [0.45, 0.7, 0.3]
    assert ("crossed", 2, 1) in _clashes(
        anchors, widths, [(0, "center"), (1, "center"), (2, "center")]
    )


def test_parts_drawn_at_one_place_do_not_cross_each_others_labels():
    # a filter then a stopcock: two parts without length at the same place (review finding:
    # both were centred and the upper one's leader ran through the lower label)
    anchors, widths = [0.24, 0.48, 0.48, 0.72], [0.2] * 4
    places = _label_places(anchors, widths)
    assert _clashes(anchors, widths, places) == []
    assert places[1][1] != "center" and places[2][1] != "center"


def test_many_labels_keep_the_drawing_its_height_and_the_title_clear():
    # an invented line of seven parts: the rows of labels grow, the plot area does not
    names = ["1. gravity set", "2. in-line filter", "3. three-way stopcock", "4. extension set"]
    names += ["5. three-way stopcock", "6. 20G catheter", "exit"]
    bores = [3.0, None, None, 1.5, None, 0.8, None]
    lengths = [1.8, None, None, 0.5, None, 0.032, None]
    fig = line_drawing(names, bores, lengths, [5.0, 20.0, 3.0, 8.0, 3.0, 60.0, 1.0])
    layout = fig.layout
    rows = 1 + max(round((-a.ay - 34) / 22) for a in layout.annotations)
    assert rows >= 3
    assert layout.height - layout.margin.t - layout.margin.b == 156
    assert layout.margin.t >= 50 + 22 * rows  # every row of labels fits above the plot
    assert layout.title.yref == "container" and layout.title.y == 1.0

"""Reliability: a hostile scenario file loaded into the app shows its text as text.

The files view loads a file whose title, names and labels carry HTML and script payloads
into the line and comparison views; every HTML widget of the app (and the status line)
must then hold the payloads escaped, never as tags.  A malformed file is reported in the
status line as a flag, without an exception escaping to the notebook.

The tests call ``view._run(handler)``, which is what the view's buttons call: it lets any
exception the view does not turn into a flag reach the test, where ipywidgets would only log it.
"""

from __future__ import annotations

import html

import pytest
from rel_record import bump, hostile_scenario_file, module_recorder, upload

pytest.importorskip("ipywidgets")

import ipywidgets as widgets  # noqa: E402

_record = module_recorder("views", "views:")

PAYLOAD = "<img src=x onerror=alert(1)><script>alert(2)</script>"

HOSTILE = hostile_scenario_file(
    title=PAYLOAD,
    name=PAYLOAD[:60],
    tube_label=PAYLOAD[:60],
    catheter_label="<b onmouseover=alert(3)>x</b>",
)


def _html_values(widget):
    stack, out = [widget], []
    while stack:
        w = stack.pop()
        if isinstance(w, widgets.HTML):
            out.append(w.value)
        stack.extend(getattr(w, "children", ()))
    return out


@pytest.fixture(scope="module")
def app(tmp_path_factory):
    from rheoline.widgets.app import build_app

    built = build_app(workspace=tmp_path_factory.mktemp("views"))
    assert built.failures == {}
    path = built.views["files"].workspace.root / "hostile.toml"
    path.write_text(HOSTILE, encoding="utf-8")
    built.views["files"].load(path)
    return built


@pytest.fixture()
def work(app, tmp_path):
    """A fresh folder inside the app's workspace (the files view reads and writes there)."""
    folder = app.views["files"].workspace.root / tmp_path.name
    folder.mkdir()
    return folder


def test_loaded_hostile_text_is_escaped_in_every_view(app):
    values = _html_values(app)
    bump("views:html_widgets_checked", len(values))
    raw = [
        v for v in values for bad in ("<img src=x", "<script>alert", "<b onmouseover") if bad in v
    ]
    assert raw == []


def _figure_strings(node):
    """Every string in a figure's JSON (trace names, categories, hover text, titles...)."""
    if isinstance(node, str):
        yield node
    elif isinstance(node, dict):
        for value in node.values():
            yield from _figure_strings(value)
    elif isinstance(node, (list, tuple)):
        for value in node:
            yield from _figure_strings(value)
    elif hasattr(node, "tolist") and getattr(node, "dtype", None) is not None:
        if node.dtype.kind in "OUS":
            yield from _figure_strings(node.tolist())


def test_loaded_hostile_text_is_escaped_in_every_chart(app):
    # plotly renders <a href>, <b>, <i>, <span> in titles, legends, hover and axis labels: a
    # part label "<a href=...>" became a live link inside a chart
    for view in app.views.values():
        view.show_figures()
    strings = [
        s
        for view in app.views.values()
        for fig in view.figures.values()
        for s in _figure_strings(fig.to_plotly_json())
    ]
    bump("views:chart_strings_checked", len(strings))
    raw = [s for s in strings for bad in ("<img", "<script", "<b ", "<a ") if bad in s]
    assert raw == []
    assert any("&lt;img src=x" in s for s in strings)  # the labels are on the charts, escaped


def test_the_hostile_labels_did_reach_the_views(app):
    # the check above means something only if the text is on screen, escaped
    text = " ".join(_html_values(app))
    assert "&lt;b onmouseover=alert(3)&gt;" in text or "&lt;img src=x" in text


def test_a_malformed_file_becomes_a_flag_in_the_status_line(app, work):
    bad = work / "bad.toml"
    bad.write_text(
        'format_version = 1\n[[scenario]]\nname = "<i>x</i>"\nfluid = "water"\n'
        'head = "300 mmHg"\n[[scenario.part]]\ntype = "catheter"\ngauge = 18\n'
    )
    files = app.views["files"]
    files.controls["scenario_path"].value = str(bad)
    files._run(files.load)
    shown = files.messages.value + files.status.value
    assert "head" in shown and "<i>x</i>" not in shown


def test_the_files_view_never_overwrites_unless_asked(app, work):
    files = app.views["files"]
    assert files.controls["overwrite"].value is False
    target = work / "mine.toml"
    target.write_text("# my own notes\n")
    files.controls["scenario_path"].value = str(target)
    assert files._run(files.save) is False  # refused, shown as a flag
    assert target.read_text() == "# my own notes\n"
    folder = work / "pack"
    folder.mkdir()
    (folder / "keep.txt").write_text("earlier pack")
    files.controls["pack_path"].value = str(folder)
    assert files._run(files.write_pack) is False
    assert [p.name for p in folder.iterdir()] == ["keep.txt"]
    status = html.unescape(files.status.value)
    # a folder that is not an earlier pack: said at once, ticking the box would not help
    assert "not an unchanged rheoline review pack" in status
    assert "'replace an existing file or pack'" in status
    assert "--force" not in status and "force=" not in status  # the page has a box, no flags


def test_every_control_at_its_limits_never_raises(app):
    # a view turns bad input into a flag; nothing may escape to the page as a traceback
    tried = 0
    for view in app.views.values():
        for control in view.controls.values():
            start = control.value
            if hasattr(control, "min") and hasattr(control, "max"):
                values = [control.min, control.max]
            elif isinstance(control, widgets.Dropdown):
                values = [o[1] if isinstance(o, tuple) else o for o in control.options]
            elif isinstance(control, widgets.Checkbox):
                values = [not start]
            else:
                continue
            for value in [*values, start]:
                control.value = value
                tried += 1
    bump("views:control_limits_tried", tried)
    assert tried > 10


def test_the_largest_bore_tolerance_the_comparison_offers_is_computed():
    # 30 % is the top of the comparison's bore-tolerance control: valid input, so a band
    from rheoline.widgets.compare_view import ComparisonView

    compare = ComparisonView()  # the default candidates
    control = compare.controls["bore_tolerance_percent"]
    control.value = control.max
    assert "not computed" not in compare.messages.value, compare.messages.value


def test_unwritable_targets_become_flags_not_tracebacks(app, work):
    # saving onto a folder, into a folder that does not exist, or a pack where nothing can be
    # written: the files view must say so in its status line, with no exception on the page
    files = app.views["files"]
    (work / "a folder").mkdir()
    files.controls["overwrite"].value = True
    try:
        for target in (work / "a folder", work / "no such folder" / "s.toml"):
            files.controls["scenario_path"].value = str(target)
            assert files._run(files.save) is False
            assert "[X] failed" in files.status.value and not files.messages.value
        blocker = work / "a file"
        blocker.write_text("x")
        files.controls["pack_path"].value = str(blocker / "pack")  # parent is a file
        assert files._run(files.write_pack) is False
        assert "[X] failed" in files.status.value and not files.messages.value
    finally:
        files.controls["overwrite"].value = False
    assert (work / "a folder").is_dir() and blocker.read_text() == "x"


@pytest.mark.parametrize(
    "name, content",
    [
        ("latin-1.toml", 'format_version = 1\ntitle = "caf\u00e9"\n'.encode("latin-1")),
        ("binary.toml", b"\xff\xfe\x00\x01 not text"),
        ("huge.json", b"[" * 1_100_000),
    ],
    ids=["latin-1", "binary", "oversized"],
)
def test_an_uploaded_bad_file_becomes_a_flag(app, name, content):
    # the app's upload button gets whatever bytes a colleague sent
    files = app.views["files"]
    upload(files, name, content)  # the upload's observer runs the load
    assert "[X] failed" in files.status.value and not files.messages.value

"""Every number in a label or title of the app carries a unit (issue 15).

Reads every control's description, every chart's title, axis titles, annotations and bar
texts, of every tab's view, and the line view's results.  A number is followed by a unit,
or it is part of a name (a gauge such as 18G, an author's year such as Pries 1992, a
percentile such as p5, a part's place in the line such as "2."), or the "0 = none" of a
limit that can be left off.
"""

from __future__ import annotations

import html
import re

import ipywidgets as widgets
import pytest

UNITS = (
    "mL/min",
    "mL/h",
    "L/min",
    "mL/s",
    "mL",
    "uL/mmHg",
    "mg/h",
    "mmHg",
    "kPa",
    "Pa",
    "cmH2O",
    "mPa s",
    "cP",
    "degC",
    "cm",
    "mm",
    "um",
    "m",
    "%",
    "% of nominal bore",
    "1/s",
    "s",
    "min",
    "h",
    "kg",
    "L",
    "Wood units",
    "mmHg min/mL",
    "-",
)
NAMED = re.compile(
    r"\b\d+G\b|[A-Z][a-z]+(?: (?:&|and) [A-Z][a-z]+| et al\.)? (?:19|20)\d\d\b|\bp\d+\b|"
    r"^\d+\. |<br>\d+\. |\(\d+ of \d+|\b0 = none\b|\bRe \d[\d,]*-\d[\d,]*|H2O|[A-Za-z]\d|"
    r"Reynolds number \d[\d,]*"  # a dimensionless number, named
)
NUMBER = re.compile(r"(?<![\w.])-?\d[\d,]*(?:\.\d+)?(?:e[-+]?\d+)?")


def _without_tags(text: str) -> str:
    inline = re.sub(r"</?(?:b|i|em|strong|span|sub|sup|a)\b[^>]*>", "", str(text))
    words = re.sub(r"<(?!br>)[^>]+>", " ", inline)  # a cell's or item's end parts words
    return html.unescape(words)


def numbers_without_unit(text: str) -> list[str]:
    """The numbers in ``text`` with no unit after them (after a space, in brackets, or
    before a dash and a second number with its unit)."""
    text = re.sub(r"\[[^\]]*\]", "[unit]", NAMED.sub(" ", _without_tags(text)))
    missing = []
    for match in NUMBER.finditer(text):
        after = text[match.end() :].lstrip()
        after = re.sub(r"^(?:-|to|and|,)\s*-?\d[\d,.]*\s*", "", after)  # a range: 5-95 %
        after = re.sub(r"^[)\]]\s*", "", after)
        if after.startswith("[unit]"):
            continue
        if not any(re.match(re.escape(u) + r"(?![A-Za-z])", after) for u in UNITS):
            if not re.search(r"\[[^\]]+\]", text[: match.start()]):  # "head [cm] 100"
                missing.append(f"{match.group()} | {text[match.start() : match.start() + 30]}")
    return missing


def test_the_rule_finds_a_bare_number():
    assert numbers_without_unit("flow 183 mL/min (11,000 mL/h)") == []
    assert numbers_without_unit("Pries 1992 relative viscosity at 0.45 [-]") == []
    assert numbers_without_unit("flow 183") == ["183 | 183"]
    assert numbers_without_unit("head 10 to 200") != []


def _widgets(view):
    """Every widget under ``view``, each once."""
    seen, stack = set(), [view]
    while stack:
        w = stack.pop()
        if id(w) in seen:
            continue
        seen.add(id(w))
        yield w
        stack.extend(getattr(w, "children", ()))


def _labels(view):
    texts = []
    for w in _widgets(view):
        description = getattr(w, "description", "")
        if description and isinstance(w, widgets.Widget):
            texts.append(("description", description))
    for name, fig in view.figures.items():
        layout = fig.layout
        texts.append((f"{name} title", layout.title.text or ""))
        for axis in ("xaxis", "yaxis"):
            texts.append((f"{name} {axis}", getattr(layout, axis).title.text or ""))
        texts += [(f"{name} annotation", a.text or "") for a in layout.annotations]
        for trace in fig.data:
            if trace.type == "bar" and trace.text is not None:
                texts += [(f"{name} bar", t) for t in trace.text]
    return texts


@pytest.fixture(scope="module")
def app(tmp_path_factory):
    from rheoline.widgets.app import build_app

    return build_app(workspace=tmp_path_factory.mktemp("labels"))


@pytest.mark.parametrize("tab", ["line", "compare", "network", "blood", "time", "files"])
def test_every_number_in_a_label_or_title_carries_a_unit(app, tab):
    app.tabs.selected_index = list(app.views).index(tab)  # opened as a user opens it: drawn
    view = app.views[tab]
    assert view.charts or tab == "files"
    bare = [(where, n) for where, text in _labels(view) for n in numbers_without_unit(text)]
    assert bare == []


def test_the_line_views_results_carry_units_in_the_pump_mode_and_every_flow_unit(app):
    line = app.views["line"]
    for unit in ("mL/min", "mL/h", "L/min", "mL/s"):
        line.set_control("flow_unit", unit)
        for mode in ("set flow (pump)", "gravity and pressure"):
            line.set_control("mode", mode)
            results = re.sub(r"\[[!ioX]k?\] \w+:[^<]*", "", line.results.value)  # flags: words
            assert numbers_without_unit(results) == [], (unit, mode)
            assert [n for _, t in _labels(line) for n in numbers_without_unit(t)] == []


@pytest.mark.parametrize("tab", ["network", "time"])
def test_the_results_in_words_carry_units(app, tab):
    """The network's flows and pressures and the time view's table (flags and notes are
    sentences about named parts, left out as in the line view's test)."""
    app.tabs.selected_index = list(app.views).index(tab)
    text = re.sub(r"<div class='rl-flag[^>]*>.*?</div>", "", app.views[tab].results.value)
    assert re.search(r"\d", text)
    assert numbers_without_unit(text) == []


#: A sentence that speaks of a reference range ("typical adult ranges", "normal range").
RANGE_WORDS = re.compile(r"\b(?:reference|typical|normal|usual|adult)\b[^.;:]*\branges?\b", re.I)
#: A range shown: two numbers and a unit, and a source (an author and year) in the sentence.
SHOWN_RANGE = re.compile(r"\d[\d,.]*\s*(?:-|to)\s*\d[\d,.]*\s*[A-Za-z%]")
SOURCE = re.compile(r"[A-Z][a-z]+(?: et al\.| (?:&|and) [A-Z][a-z]+)? (?:19|20)\d\d")


def _texts(view):
    """Every HTML text of a view: status, messages, results, and other HTML outputs."""
    return [
        _without_tags(w.value)
        for w in _widgets(view)
        if isinstance(w, widgets.HTML) and "rl-caution-banner" not in w._dom_classes
    ]


def test_the_rule_finds_a_range_mentioned_but_not_shown():
    said = "context: typical adult ranges apply"
    assert RANGE_WORDS.search(said) and not SHOWN_RANGE.search(said)
    shown = "typical adult range 800-1,200 dyn s cm^-5 (Smith 1999)"
    assert SHOWN_RANGE.search(shown) and SOURCE.search(shown)


@pytest.mark.parametrize("tab", ["line", "compare", "network", "blood", "time", "files"])
def test_no_note_mentions_a_range_it_does_not_show_with_its_source(app, tab):
    """A note that speaks of reference ranges shows the range and its source (issue 15:
    'a note mentions typical adult ranges that are never shown')."""
    app.tabs.selected_index = list(app.views).index(tab)
    texts = _texts(app.views[tab])  # the blood view's: its resistance calculator's note too
    assert texts
    for text in texts:
        for sentence in re.split(r"(?<=[.;])\s+|<br>", text):
            if RANGE_WORDS.search(sentence):
                assert SHOWN_RANGE.search(sentence) and SOURCE.search(sentence), sentence

"""The line drawing alone in a real browser (Chromium, as tests/test_browser_layout.py):
lines of many parts, drawn at the narrowest width the app gives it and at a wide one, with
no two texts over each other and no label's leader through another label
(benchmarks/page_checks.js), the plot keeping its height.

Chromium is ``/usr/bin/chromium``; without it the test skips, unless ``CI`` is set.
"""

from __future__ import annotations

import os
import sys
from pathlib import Path

import pytest

from rheoline.scenario.line_drawing import line_drawing

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "benchmarks"))
import served_page  # noqa: E402

pytestmark = [pytest.mark.browser, pytest.mark.timeout(300)]

CHECKS = (Path(served_page.__file__).parent / "page_checks.js").read_text()

# invented demo lines: (names, bores [mm], lengths [m], drops [mmHg])
LINES = {
    "seven parts": (
        ["1. gravity set", "2. in-line filter", "3. three-way stopcock", "4. extension set"]
        + ["5. three-way stopcock", "6. 20G catheter", "exit"],
        [3.0, None, None, 1.5, None, 0.8, None],
        [1.8, None, None, 0.5, None, 0.032, None],
        [5.0, 20.0, 3.0, 8.0, 3.0, 60.0, 1.0],
    ),
    "two parts at one place": (
        ["set", "filter", "stopcock", "extension"],
        [3.0, None, None, 1.5],
        [1.0, 0.0, 0.0, 1.0],
        [1.0, 2.0, 3.0, 4.0],
    ),
}


@pytest.fixture(scope="module")
def chromium():
    if not served_page.CHROMIUM.exists():
        if os.environ.get("CI"):
            pytest.fail(f"CI is set but {served_page.CHROMIUM} is missing")
        pytest.skip(f"{served_page.CHROMIUM} is missing")
    pytest.importorskip("playwright.sync_api")


@pytest.mark.parametrize("width", [430, 900])  # the drawing in a 1024 px window; a wide one
@pytest.mark.parametrize("line", sorted(LINES))
def test_a_long_line_is_drawn_with_nothing_over_anything(chromium, tmp_path, line, width):
    fig = line_drawing(*LINES[line])
    fig.update_layout(width=width)
    page_file = tmp_path / "drawing.html"
    body = fig.to_html(include_plotlyjs=True, full_html=False)
    page_file.write_text(
        f"<html><body><div class='rl-app' style='width:{width}px'>{body}</div></body></html>",
        encoding="utf-8",
    )
    with served_page.browser(tmp_path / "profile", width=width + 40, height=900) as context:
        page = context.new_page()
        page.goto(page_file.as_uri())
        page.wait_for_selector(".js-plotly-plot .annotation", timeout=60_000)
        problems = page.evaluate(CHECKS)
        plot = page.evaluate(
            "() => document.querySelector('.js-plotly-plot .nsewdrag').getBoundingClientRect().height"
        )
    assert problems == []
    assert plot == pytest.approx(156, abs=2)

"""The served app's layout in a real browser: for each tab, at 1024, 1280 and 1920 px wide,
no element leaves its container sideways, no box scrolls sideways, no text is cut (a
label, a drop-down's choice, a number box's value), no two texts of a chart are drawn
over each other and no label's leader runs through another label
(benchmarks/page_checks.js), and a
screenshot of the whole tab is taken (the 1280 px ones to ``$RHEOLINE_SCREENSHOTS`` when
set: ``docs/screenshots.py`` sets it to docs/, which the README shows).

Chromium is ``/usr/bin/chromium``; without it the test skips, unless ``CI`` is set.
"""

from __future__ import annotations

import os
import shutil
import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "benchmarks"))
import served_page  # noqa: E402

pytestmark = [pytest.mark.browser, pytest.mark.timeout(900)]

CHECKS = (Path(served_page.__file__).parent / "page_checks.js").read_text()
#: Every width from 1024 to 1920 px must show everything: the narrowest, the README's
#: and the widest are checked.
WIDTHS = (1024, 1280, 1920)
#: The width of the screenshots the README shows.
SHOWN_WIDTH = 1280
#: The height [px] of the page down to the app's bottom edge, and a margin.
TALLEST = "() => Math.ceil(document.querySelector('.rl-app').getBoundingClientRect().bottom) + 24"


@pytest.fixture(scope="module")
def served_url(tmp_path_factory):
    if not served_page.CHROMIUM.exists():
        if os.environ.get("CI"):
            pytest.fail(f"CI is set but {served_page.CHROMIUM} is missing")
        pytest.skip(f"{served_page.CHROMIUM} is missing")
    pytest.importorskip("playwright.sync_api")
    runtime = tmp_path_factory.mktemp("layout-runtime")
    env = {"JUPYTER_RUNTIME_DIR": str(runtime)}
    with served_page.served_app(runtime / "workspace", runtime / "voila.log", env) as url:
        yield url


def _slug(tab: str) -> str:
    return tab.lower().replace(" and ", "-").replace(" ", "-")


@pytest.mark.parametrize("width", WIDTHS)
def test_no_tab_clips_or_cuts_anything(served_url, tmp_path, width):
    shots = os.environ.get("RHEOLINE_SCREENSHOTS")
    with served_page.browser(tmp_path / "profile", width=width, height=1000) as context:
        page = context.new_page()
        page.set_default_timeout(180_000)
        page.goto(served_url, timeout=180_000)
        found = {}
        for tab in served_page.TAB_READY:
            served_page.open_tab(page, tab)
            page.wait_for_timeout(1500)  # the charts' first layout, as a person would wait
            found[tab] = page.evaluate(CHECKS)
            shot = tmp_path / f"app-{_slug(tab)}-{width}.png"
            # the page scrolls inside Voila's own box: the window is made as tall as the
            # tab for the screenshot, so it shows the whole tab
            page.set_viewport_size({"width": width, "height": page.evaluate(TALLEST)})
            page.wait_for_timeout(500)
            page.screenshot(path=str(shot), full_page=True)
            page.set_viewport_size({"width": width, "height": 1000})
            assert shot.stat().st_size > 10_000
            if shots and width == SHOWN_WIDTH:
                shutil.copyfile(shot, Path(shots) / shot.name)
    assert found == {tab: [] for tab in served_page.TAB_READY}

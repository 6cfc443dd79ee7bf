"""The served app in a real browser: Voila on a free local port, driven by Playwright in
Debian's headless Chromium.

The test changes the catheter gauge and the bag height in the line view and checks
that the flow shown on the page and the data of both charts become the values the
Python API gives for the new inputs; it also checks that the caution banner is
visible, cannot be closed, and links to the full text of CAUTIONS.md on the page.
A screenshot goes to pytest's temporary folder (and to ``$RHEOLINE_SCREENSHOT``
when that is set; docs/screenshots.py takes the README's screenshots).

The app is started the way a user starts it, with the launcher
(``python -m rheoline.widgets.serve``), and opened with the link it prints (token
included).  Every request the page makes is recorded: a request to any host but this
machine fails the test.  Another test types paths that leave the
workspace into the files view and loads a file whose part label is an HTML link.

Chromium is ``/usr/bin/chromium`` (never a browser download).  Without it the test
skips on a developer's machine; under CI (the ``CI`` variable set) it fails.
"""

from __future__ import annotations

import os
import shutil
import sys
import urllib.error
import urllib.parse
import urllib.request
from pathlib import Path

import numpy as np
import pytest

import rheoline
from rheoline.units import ML_PER_MIN, MMHG

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "benchmarks"))
import served_page  # noqa: E402  (the launcher and Chromium, shared with the page benchmark)

CHROMIUM = served_page.CHROMIUM

pytestmark = [pytest.mark.browser, pytest.mark.timeout(600)]

PAGE_TIMEOUT_MS = 180_000  # the first load starts a kernel and builds every view
UPDATE_TIMEOUT_MS = 180_000  # the machine is shared: waits are generous, never asserted


def _need_chromium():
    if CHROMIUM.exists():
        return
    if os.environ.get("CI"):
        pytest.fail(f"CI is set but {CHROMIUM} is missing: install Debian's chromium package")
    pytest.skip(f"{CHROMIUM} is missing (install Debian's chromium to run the browser test)")


LOOPBACK_HOSTS = {"127.0.0.1", "[::1]", "::1", "localhost"}


@pytest.fixture(scope="module")
def served_app(tmp_path_factory):
    """Start the app with the launcher, as a user does; yield (link, workspace); stop it."""
    _need_chromium()
    runtime = tmp_path_factory.mktemp("jupyter-runtime")
    workspace = tmp_path_factory.mktemp("browser") / "workspace"
    try:
        with served_page.served_app(
            workspace, runtime / "voila.log", {"JUPYTER_RUNTIME_DIR": str(runtime)}
        ) as url:
            yield url, workspace
    except served_page.LaunchError as exc:
        pytest.fail(str(exc))


@pytest.fixture()
def page(served_app, tmp_path):
    """The app's page in Chromium; every request it makes is kept in ``page.requests``."""
    pytest.importorskip("playwright.sync_api")
    url, _ = served_app
    with served_page.browser(tmp_path / "chromium-profile") as context:
        seen = []  # recorded, not intercepted: routing every request through this process
        # delays plotly's widget code past anywidget's start-up deadline
        context.on("request", lambda request: seen.append(request.url))
        page = context.new_page()
        page.on("websocket", lambda ws: seen.append(ws.url))
        page.requests = seen
        page.set_default_timeout(UPDATE_TIMEOUT_MS)
        page.goto(url, timeout=PAGE_TIMEOUT_MS)
        page.wait_for_selector(".rl-app .rl-caution-banner", timeout=PAGE_TIMEOUT_MS)
        page.wait_for_selector(
            ".rl-view .js-plotly-plot", state="attached", timeout=PAGE_TIMEOUT_MS
        )
        yield page


# --- what the Python API says, built here from the public names, not from the widgets ----
def _api(gauge: int, head_m: float):
    line = rheoline.Line(
        [rheoline.Tube(inner_diameter=3.0e-3, length=1.8), rheoline.Catheter(gauge=gauge)]
    )
    fluid = rheoline.fluid("saline-0.9", temperature_c=22.0)
    result = line.solve(fluid, head=head_m, source_pressure=0.0, back_pressure=0.0)
    heads = np.linspace(0.0, max(2.0 * head_m, 1.5), 41)
    curve = line.solve(fluid, head=heads, source_pressure=0.0, back_pressure=0.0).flow
    budget = np.append(result.part_pressure_drops, result.exit_pressure_drop) / MMHG
    return result.flow / ML_PER_MIN, budget, heads * 100.0, curve / ML_PER_MIN


_PLOT_DATA = """title => {
  for (const gd of document.querySelectorAll('.js-plotly-plot')) {
    const t = gd.layout && gd.layout.title && (gd.layout.title.text || gd.layout.title);
    if (typeof t === 'string' && t.startsWith(title)) {
      return gd.data.map(trace => ({x: Array.from(trace.x || []), y: Array.from(trace.y || [])}));
    }
  }
  return null;
}"""


_TRACE_MATCHES = """([title, index, axis, expected]) => {
  for (const gd of document.querySelectorAll('.js-plotly-plot')) {
    const t = gd.layout && gd.layout.title && (gd.layout.title.text || gd.layout.title);
    if (typeof t === 'string' && t.startsWith(title) && gd.data[index]) {
      const got = Array.from(gd.data[index][axis] || []);
      return got.length === expected.length && got.every(
        (v, i) => Math.abs(v - expected[i]) <= 1e-9 * Math.abs(expected[i]) + 1e-300);
    }
  }
  return false;
}"""


def _wait_for_trace(page, title, index, axis, expected):
    """Wait until a chart's trace shows ``expected`` (the kernel's messages arrive in turn)."""
    expected = [float(v) for v in np.ravel(expected)]
    try:
        page.wait_for_function(_TRACE_MATCHES, arg=[title, index, axis, expected])
    except Exception as exc:  # a Playwright timeout: say what the chart shows instead
        shown = page.evaluate(_PLOT_DATA, title)
        shown = shown[index][axis] if shown and len(shown) > index else shown
        pytest.fail(f"{title!r} trace {index} {axis} shows {shown}, not {expected}: {exc}")


def _shown_flow(page) -> float:
    return float(page.get_attribute(".rl-view .rl-flow", "data-flow-ml-min"))


def _wait_flow_change(page, before: float):
    page.wait_for_function(
        "before => Math.abs(parseFloat(document.querySelector('.rl-view .rl-flow')"
        ".getAttribute('data-flow-ml-min')) - before) > 1e-9 * Math.abs(before)",
        arg=before,
    )


def _check_against_api(page, gauge, head_m):
    flow, budget, heads_cm, curve = _api(gauge, head_m)
    _wait_for_trace(page, "Pressure budget", 0, "x", budget)
    _wait_for_trace(page, "Flow against bag height", 0, "y", curve)
    assert _shown_flow(page) == pytest.approx(flow, rel=1e-9)
    from rheoline.widgets.style import significant

    assert page.inner_text(".rl-view .rl-flow") == f"{significant(flow)} mL/min"
    bars = page.evaluate(_PLOT_DATA, "Pressure budget")
    assert np.allclose(bars[0]["x"], budget, rtol=1e-9)
    drive = page.evaluate(_PLOT_DATA, "Flow against bag height")
    assert np.allclose(drive[0]["x"], heads_cm, rtol=1e-12)
    assert np.allclose(drive[0]["y"], curve, rtol=1e-9)
    assert drive[1]["y"] == pytest.approx([flow], rel=1e-9)


def test_line_view_follows_controls_in_a_real_browser(page, tmp_path):
    line_view = page.locator(".rl-view").filter(has=page.locator(".rl-part-row")).first
    # the banner: visible, says what it must, cannot be closed, links to the cautions
    banner = line_view.locator(".rl-caution-banner")
    assert banner.is_visible()
    assert "not for clinical decisions" in banner.inner_text()
    assert banner.locator("button").count() == 0  # nothing to close it with
    href = banner.locator("a.rl-cautions-link").get_attribute("href")
    assert href.startswith("#rl-cautions")
    cautions = page.locator(href)
    cautions.locator("summary").click()
    assert "Air embolism" in cautions.inner_text()
    cautions.locator("summary").click()  # fold it again; the statement stays
    assert banner.is_visible()

    # the starting state is the API's answer for an 18G catheter at 100 cm
    _check_against_api(page, gauge=18, head_m=1.0)

    # a larger catheter: pick 14G in the second part's gauge list
    before = _shown_flow(page)
    line_view.locator(".rl-part-row").nth(1).locator(".rl-part-size select").select_option(
        label="14G"
    )
    _wait_flow_change(page, before)
    _check_against_api(page, gauge=14, head_m=1.0)
    assert _shown_flow(page) > before  # a larger bore runs faster

    # hang the bag higher: type 150 cm into the head field
    before = _shown_flow(page)
    head = line_view.locator(".rl-head input")
    head.fill("150")
    head.press("Enter")
    _wait_flow_change(page, before)
    _check_against_api(page, gauge=14, head_m=1.5)

    assert banner.is_visible()
    shot = tmp_path / "line-view.png"
    page.screenshot(path=str(shot), full_page=False)
    assert shot.stat().st_size > 10_000
    if os.environ.get("RHEOLINE_SCREENSHOT"):
        shutil.copyfile(shot, os.environ["RHEOLINE_SCREENSHOT"])


def test_blood_view_follows_the_vessel_radius_in_a_real_browser(page):
    page.get_by_role("tab", name="Blood and vessels").click()
    # let the charts of the newly shown tab finish their first layout, as a person would
    page.wait_for_function("""() => [...document.querySelectorAll('.js-plotly-plot')]
        .filter(gd => gd.layout.title.text.startsWith('Fahraeus'))
        .every(gd => gd.offsetWidth > 0 && gd._fullLayout)""")
    page.wait_for_timeout(2000)
    view = page.locator(".rl-view").filter(has=page.locator(".rl-vessel-radius")).first
    assert view.locator(".rl-caution-banner").is_visible()
    radius = view.locator(".rl-vessel-radius input")
    radius.fill("20")
    radius.press("Enter")
    expected = rheoline.pries_1992_relative_viscosity(40e-6, 0.45)  # defaults: Hct 0.45
    _wait_for_trace(page, "Fahraeus-Lindqvist", 1, "x", [40.0])
    fahraeus = page.evaluate(_PLOT_DATA, "Fahraeus-Lindqvist")
    assert fahraeus[1]["y"] == pytest.approx([expected], rel=1e-12)
    vessel = rheoline.Vessel(radius=20e-6, length=1e-3, hematocrit=0.45, temperature_c=37.0)
    # the chart shows mmHg min/mL: 1 mmHg min/mL = 133.322 Pa * 60 s / 1e-6 m^3
    _wait_for_trace(
        page, "Resistance of one vessel", 1, "y", [vessel.resistance / (MMHG * 60.0 / 1e-6)]
    )
    assert view.locator(".rl-caution-banner").is_visible()


# --- the page as a door into the machine (issue 12) --------------------------------------
FOREIGN_SECRET = "SECRET-from-outside-9c2e"
LINK = '<a href="http://example.invalid/x">link</a>'


def _off_machine(page):
    """The requests the page made to any host but this machine (data: URLs stay local)."""
    return [
        u
        for u in page.requests
        if urllib.parse.urlsplit(u).scheme not in ("data", "blob", "about")
        and urllib.parse.urlsplit(u).netloc.rsplit(":", 1)[0] not in LOOPBACK_HOSTS
    ]


def _files_view(page):
    page.get_by_role("tab", name="Files").click()
    view = page.locator(".rl-view").filter(has=page.locator(".rl-scenario-path")).first
    view.locator(".rl-scenario-path input").wait_for()
    return view


def _press(page, view, button, path, words):
    """Type ``path`` in the scenario path field, press ``button``, wait for ``words``."""
    field = view.locator(".rl-scenario-path input")
    field.fill(path)
    field.press("Tab")  # the value reaches the kernel before the click does
    view.locator(f".{button}").click()
    page.wait_for_function(
        "([words, path]) => [...document.querySelectorAll('.rl-messages, .rl-files-status')]"
        ".some(e => e.textContent.includes(words) && e.textContent.includes(path))",
        arg=[words, path[:60]],
    )


def test_the_files_view_refuses_paths_outside_the_workspace(page, served_app, tmp_path):
    _, workspace = served_app
    foreign = tmp_path / "foreign.toml"  # beside the workspace, not in it
    foreign.write_text(
        f'format_version = 1\n[[scenario]]\nname = "x"\nfluid = "{FOREIGN_SECRET}"\n'
    )
    link = workspace / f"door-{tmp_path.name}.toml"
    link.symlink_to(foreign)
    view = _files_view(page)
    assert str(workspace.resolve()) in view.locator(".rl-workspace").inner_text()
    relative = os.path.relpath(foreign, workspace)  # ../../...: through the parent folder
    for typed in (str(foreign), relative, link.name):
        _press(page, view, "rl-load", typed, "outside the workspace folder")
        assert FOREIGN_SECRET not in page.content()
    target = tmp_path / "written-by-the-page.toml"
    _press(page, view, "rl-save", str(target), "outside the workspace folder")
    assert not target.exists()
    assert _off_machine(page) == []


def test_a_link_in_a_part_label_stays_text_in_the_charts(page, served_app):
    from rel_record import hostile_scenario_file

    _, workspace = served_app
    (workspace / "linked.toml").write_text(
        hostile_scenario_file("linked", "linked", "tube", LINK), encoding="utf-8"
    )
    view = _files_view(page)
    _press(page, view, "rl-load", "linked.toml", "loaded linked.toml")
    page.get_by_role("tab", name="Line").click()
    page.wait_for_function(  # the label is on the pressure budget's axis, as text
        "() => [...document.querySelectorAll('.js-plotly-plot text')]"
        ".some(t => t.textContent.includes('<a href=\"http://example.invalid/x\">'))"
    )
    assert page.locator('a[href*="example.invalid"]').count() == 0  # never a live link
    assert _off_machine(page) == []


def test_the_page_asks_nothing_of_another_machine(page):
    # every tab opened, so each tab's widgets and charts load their code and styles
    for name in ("Compare", "Network", "Blood and vessels", "Files", "Line"):
        page.get_by_role("tab", name=name).click()
        page.wait_for_timeout(1000)
    page.wait_for_function("() => [...document.querySelectorAll('.js-plotly-plot')].length >= 4")
    assert _off_machine(page) == []
    hosts = {urllib.parse.urlsplit(u).netloc.rsplit(":", 1)[0] for u in page.requests}
    assert "127.0.0.1" in hosts  # the page's own requests were seen, so the check can fail
    assert any(u.startswith("ws://127.0.0.1") for u in page.requests)  # the kernel's socket
    icons = page.evaluate(
        "() => getComputedStyle(document.querySelector('.rl-load i.fa')).maskImage || "
        "getComputedStyle(document.querySelector('.rl-load i.fa')).webkitMaskImage"
    )
    assert icons.startswith('url("data:image/svg+xml')  # the app's own icon stylesheet

"""The served app in a real browser: Voila on a free local port, driven by Playwright in
Debian's headless Chromium.

The test changes the catheter gauge and the bag height in the line view and checks
that the flow shown on the page and the data of both charts become the values the
Python API gives for the new inputs; it also checks that the caution banner is
visible, cannot be closed, and links to the full text of CAUTIONS.md on the page.
A screenshot goes to pytest's temporary folder (and to ``$RHEOLINE_SCREENSHOT``
when that is set, which is how docs/line-view.png was taken).

Chromium is ``/usr/bin/chromium`` (never a browser download).  Without it the test
skips on a developer's machine; under CI (the ``CI`` variable set) it fails.
"""

from __future__ import annotations

import os
import shutil
import signal
import socket
import subprocess
import time
import urllib.error
import urllib.request
from pathlib import Path

import numpy as np
import pytest

import rheoline
from rheoline.units import ML_PER_MIN, MMHG

pytestmark = [pytest.mark.browser, pytest.mark.timeout(600)]

CHROMIUM = Path("/usr/bin/chromium")
CHROMIUM_ARGS = [
    "--headless",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-quic",
    "--no-first-run",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
]
PAGE_TIMEOUT_MS = 180_000  # the first load starts a kernel and builds every view
UPDATE_TIMEOUT_MS = 60_000


def _need_chromium():
    if CHROMIUM.exists():
        return
    if os.environ.get("CI"):
        pytest.fail(f"CI is set but {CHROMIUM} is missing: install Debian's chromium package")
    pytest.skip(f"{CHROMIUM} is missing (install Debian's chromium to run the browser test)")


def _free_port() -> int:
    with socket.socket(socket.AF_INET, socket.SOCK_STREAM) as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


@pytest.fixture(scope="module")
def served_app(tmp_path_factory):
    """Start the app with the launcher's own Voila command; yield its URL; stop it."""
    _need_chromium()
    from rheoline.widgets.serve import APP_NOTEBOOK, serve_environment, voila_command

    port = _free_port()
    runtime = tmp_path_factory.mktemp("jupyter-runtime")
    env = {**serve_environment(), "JUPYTER_RUNTIME_DIR": str(runtime)}
    log = open(runtime / "voila.log", "w")  # noqa: SIM115 (closed below)
    process = subprocess.Popen(
        voila_command(port=port),
        cwd=APP_NOTEBOOK.parent,
        env=env,
        stdout=log,
        stderr=subprocess.STDOUT,
        start_new_session=True,
    )
    url = f"http://127.0.0.1:{port}/"
    deadline = time.monotonic() + 90
    while True:
        try:  # any HTTP answer means the server is up; "/" itself would start a kernel
            urllib.request.urlopen(url + "voila/files/readiness-probe", timeout=5).close()
            break
        except urllib.error.HTTPError:
            break
        except OSError:
            pass
        if process.poll() is not None or time.monotonic() > deadline:
            log.close()
            text = (runtime / "voila.log").read_text()
            process.kill()
            pytest.fail(f"Voila did not start on {url}:\n{text[-3000:]}")
        time.sleep(0.5)
    yield url
    os.killpg(process.pid, signal.SIGTERM)
    try:
        process.wait(timeout=20)
    except subprocess.TimeoutExpired:
        os.killpg(process.pid, signal.SIGKILL)
    log.close()


@pytest.fixture()
def page(served_app, tmp_path):
    playwright_api = pytest.importorskip("playwright.sync_api")
    with playwright_api.sync_playwright() as p:
        context = p.chromium.launch_persistent_context(
            str(tmp_path / "chromium-profile"),
            executable_path=str(CHROMIUM),
            args=CHROMIUM_ARGS,
            headless=True,
            viewport={"width": 1400, "height": 1300},
        )
        page = context.new_page()
        page.set_default_timeout(UPDATE_TIMEOUT_MS)
        page.goto(served_app, timeout=PAGE_TIMEOUT_MS)
        page.wait_for_selector(".rl-app .rl-caution-banner", timeout=PAGE_TIMEOUT_MS)
        page.wait_for_selector(
            ".rl-view .js-plotly-plot", state="attached", timeout=PAGE_TIMEOUT_MS
        )
        yield page
        context.close()


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
    page.wait_for_function(_TRACE_MATCHES, arg=[title, index, axis, expected])


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

"""The served app in a real browser, for the page benchmark, the screenshots and the browser
tests: start the launcher (``python -m rheoline.widgets.serve``) on a free local port as a
user does, and open the link it prints in Debian's headless Chromium with Playwright.

Chromium is ``/usr/bin/chromium`` (never a browser download).
"""

from __future__ import annotations

import contextlib
import os
import re
import signal
import socket
import subprocess
import sys
import time
import urllib.request
from pathlib import Path

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
#: The tabs of the app, by the title the page shows, and what shows a tab is ready: its
#: first chart drawn, or (a tab without charts) its first control.
TAB_READY = {
    "Line": ".rl-chart .js-plotly-plot",
    "Compare": ".rl-chart .js-plotly-plot",
    "Network": ".rl-chart .js-plotly-plot",
    "Blood and vessels": ".rl-chart .js-plotly-plot",
    "Infusion in time": ".rl-chart .js-plotly-plot",
    "Files": ".rl-scenario-path input",
}


class LaunchError(RuntimeError):
    """The launcher printed no link, or Voila did not answer."""


def free_port() -> int:
    with socket.socket(socket.AF_INET, socket.SOCK_STREAM) as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


@contextlib.contextmanager
def served_app(workspace: Path, log_path: Path, extra_env=None, start_timeout_s=90.0):
    """Start the launcher with ``workspace``; yield the printed link; stop it."""
    from rheoline.widgets.serve import serve_environment

    port = free_port()
    env = {**serve_environment(), **(extra_env or {})}
    env.pop("JUPYTER_TOKEN", None)
    log = open(log_path, "w")  # noqa: SIM115 (closed below)
    process = subprocess.Popen(
        [sys.executable, "-m", "rheoline.widgets.serve", "--port", str(port)]
        + ["--workspace", str(workspace)],
        stdout=subprocess.PIPE,
        stderr=log,
        text=True,
        env=env,
        start_new_session=True,
    )
    try:
        printed = process.stdout.readline()
        found = re.search(r"(http://127\.0\.0\.1:(\d+)/\?token=\S+)", printed)
        if not found or int(found.group(2)) != port:
            raise LaunchError(f"the launcher printed no link to port {port}: {printed!r}")
        url = found.group(1)
        _wait_for_server(url, process, start_timeout_s, log_path)
        yield url
    finally:
        process.send_signal(signal.SIGTERM)  # the launcher is Voila: this stops the server
        try:
            process.wait(timeout=30)
        except subprocess.TimeoutExpired:
            os.killpg(process.pid, signal.SIGKILL)
        log.close()


def _wait_for_server(url, process, timeout_s, log_path):
    """Wait until Voila answers (its icon stylesheet, which starts no kernel)."""
    deadline = time.monotonic() + timeout_s
    while True:
        try:
            urllib.request.urlopen(url.split("?")[0] + "voila/static/rheoline-icons.css").close()
            return
        except OSError:
            pass
        if process.poll() is not None or time.monotonic() > deadline:
            text = Path(log_path).read_text()
            raise LaunchError(f"Voila did not start on {url}:\n{text[-3000:]}")
        time.sleep(0.5)


@contextlib.contextmanager
def browser(profile: Path, width=1400, height=1300):
    """A Chromium context (Playwright) with a window of ``width`` x ``height`` px."""
    from playwright.sync_api import sync_playwright

    with sync_playwright() as p:
        context = p.chromium.launch_persistent_context(
            str(profile),
            executable_path=str(CHROMIUM),
            args=CHROMIUM_ARGS,
            headless=True,
            viewport={"width": width, "height": height},
        )
        try:
            yield context
        finally:
            context.close()


def open_tab(page, name: str, timeout_ms=180_000):
    """Click tab ``name`` and wait until it is ready (see :data:`TAB_READY`)."""
    page.get_by_role("tab", name=name).click()
    view = page.locator(".rl-tabs .rl-view:visible").first
    view.locator(TAB_READY[name]).first.wait_for(state="visible", timeout=timeout_ms)
    return view

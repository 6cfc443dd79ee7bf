"""The launcher (``python -m rheoline.widgets.serve``), issue 12's served page as a door:

* an address other machines can reach is refused unless the risk flag is given;
* the page needs a token, handed to Voila through the environment (never the command line)
  and printed with the full link;
* the printed port is the one served: a taken port is an error, and Voila may not try others;
* the launcher becomes Voila, so stopping it stops the server;
* kernels of closed pages are culled, and the page's template asks nothing of another machine.

The last tests start the real launcher (Voila on a free local port) without a browser; the
page in a browser is tests/test_browser.py.
"""

from __future__ import annotations

import contextlib
import io
import json
import os
import re
import signal
import socket
import subprocess
import sys
import time
import urllib.error
import urllib.request
from pathlib import Path

import pytest

pytest.importorskip("ipywidgets")

from rheoline.widgets import serve  # noqa: E402

ALL_INTERFACES_V4 = ".".join(["0"] * 4)  # spelled out so no file of the repo binds it
ALL_INTERFACES_V6 = ":" * 2


def _run(argv):
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        status = serve.main(argv)
    return status, out.getvalue(), err.getvalue()


@pytest.fixture()
def no_exec(monkeypatch):
    """Record what the launcher would become instead of becoming it."""
    became = []
    monkeypatch.setattr(serve, "_become", lambda command, env: became.append((command, env)) or 0)
    return became


# --------------------------------------------------------------------------- the address
@pytest.mark.parametrize(
    "ip", ["192.0.2.10", ALL_INTERFACES_V4, ALL_INTERFACES_V6, "", "example.org", "10.0.0.1"]
)
def test_an_address_others_can_reach_is_refused_without_the_risk_flag(ip, no_exec, tmp_path):
    for extra in ([], ["--print-command"]):
        status, out, err = _run(["--ip", ip, "--workspace", str(tmp_path / "w"), *extra])
        assert status == 2 and out == ""
        assert serve.RISK_FLAG in err and "other machines" in err
    assert no_exec == [] and not (tmp_path / "w").exists()


def test_the_risk_flag_lets_another_address_through(no_exec, tmp_path):
    status, out, _ = _run(["--ip", "192.0.2.10", serve.RISK_FLAG, "--print-command"])
    assert status == 0 and "--Voila.ip=192.0.2.10" in out


@pytest.mark.parametrize("ip", ["127.0.0.1", "127.0.0.2", "::1", "localhost"])
def test_loopback_addresses_need_no_flag(ip):
    status, out, _ = _run(["--ip", ip, "--print-command"])
    assert status == 0 and f"--Voila.ip={ip}" in out


# --------------------------------------------------------------------------- the command
def test_the_command_asks_a_token_without_carrying_it():
    command = serve.voila_command()
    assert "--token" in command  # Voila's flag: a token is required
    assert not [a for a in command if re.match(r"--(Voila\.|ServerApp\.|)token=", a)]
    env = serve.serve_environment({}, token="t0k", workspace="/w")
    assert env["JUPYTER_TOKEN"] == "t0k" and env[serve.WORKSPACE_ENV] == "/w"
    assert env["JUPYTER_PATH"].split(os.pathsep)[0] == str(serve.TEMPLATE_ROOT)


def test_the_command_serves_one_port_culls_idle_kernels_and_uses_the_apps_template():
    command = serve.voila_command(port=9123, idle_minutes=2)
    assert "--port=9123" in command and "--Voila.port_retries=0" in command
    assert f"--template={serve.TEMPLATE}" in command
    assert "--MappingKernelManager.cull_idle_timeout=120" in command
    assert "--MappingKernelManager.cull_connected=False" in command
    assert "--MappingKernelManager.cull_interval=60" in command


@pytest.mark.parametrize(
    "argv, words",
    [(["--port", "0"], "not a port"), (["--idle-minutes", "0"], "above 0")],
)
def test_bad_numbers_are_refused(argv, words, no_exec):
    status, _, err = _run(argv)
    assert status == 2 and words in err and no_exec == []


def test_the_launcher_prints_the_link_with_its_token_and_makes_the_workspace(
    no_exec, tmp_path, monkeypatch
):
    monkeypatch.delenv("JUPYTER_TOKEN", raising=False)
    status, out, err = _run(["--port", str(_free_port()), "--workspace", str(tmp_path / "ws")])
    assert status == 0, err
    [(command, env)] = no_exec
    token = env["JUPYTER_TOKEN"]
    assert len(token) >= 32 and token not in " ".join(command)
    port = next(a.split("=")[1] for a in command if a.startswith("--port="))
    assert f"http://127.0.0.1:{port}/?token={token}" in out
    assert (tmp_path / "ws").is_dir() and env[serve.WORKSPACE_ENV] == str(tmp_path / "ws")
    assert str(tmp_path / "ws") in out


def test_a_taken_port_is_an_error_not_another_port(no_exec, tmp_path):
    with socket.socket() as holder:
        holder.bind(("127.0.0.1", 0))
        holder.listen()
        port = holder.getsockname()[1]
        status, out, err = _run(["--port", str(port), "--workspace", str(tmp_path)])
    assert status == 2 and out == "" and f"port {port} is already in use" in err
    assert no_exec == []


# --------------------------------------------------------------------------- the template
TEMPLATE_DIR = serve.TEMPLATE_ROOT / "voila" / "templates" / serve.TEMPLATE


def test_the_template_extends_voilas_lab_template_and_names_no_other_machine():
    assert json.loads((TEMPLATE_DIR / "conf.json").read_text())["base_template"] == "lab"
    for path in TEMPLATE_DIR.rglob("*"):
        if path.is_file():
            text = path.read_text(encoding="utf-8")
            hosts = set(re.findall(r"[a-z]+://([^/'\")\s]+)", text))
            assert hosts <= {"www.w3.org"}, (path.name, hosts)  # w3.org: SVG's namespace


def _app_icons():
    import ipywidgets as widgets

    from rheoline.widgets.app import build_app

    app = build_app(workspace=Path("unused"))
    stack, icons = list(app.views.values()), set()  # every tab's view, built
    while stack:
        w = stack.pop()
        if isinstance(w, (widgets.Button, widgets.FileUpload, widgets.ToggleButton)) and w.icon:
            icons.add(w.icon)
        stack.extend(getattr(w, "children", ()))
    return icons


def test_every_icon_the_app_uses_is_in_its_own_stylesheet():
    css = (TEMPLATE_DIR / "static" / "rheoline-icons.css").read_text()
    icons = _app_icons()
    assert {"folder-open", "save", "upload"} <= icons
    drawn = set(re.findall(r"^\.fa\.fa-([a-z-]+) \{ --rl-icon: url\(", css, re.M))
    listed = re.search(r"^(\.fa\.fa-.*) \{\n  background-color", css, re.M).group(1)
    masked = set(re.findall(r"\.fa\.fa-([a-z-]+)", listed))
    assert icons <= drawn and icons <= masked


# --------------------------------------------------------------------------- the real server
def _free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


def _get(url):
    """(status, final url) of a GET that does not follow redirects."""

    class NoRedirect(urllib.request.HTTPRedirectHandler):
        def redirect_request(self, *args, **kwargs):
            return None

    opener = urllib.request.build_opener(NoRedirect)
    try:
        with opener.open(url, timeout=120) as response:
            return response.status
    except urllib.error.HTTPError as exc:
        return exc.code


def _kernels_of(pid):
    """Process ids of the kernels started by ``pid`` (Linux /proc)."""
    found = []
    for stat in Path("/proc").glob("[0-9]*/stat"):
        try:
            fields = stat.read_text().rsplit(")", 1)[1].split()
            cmdline = (stat.parent / "cmdline").read_bytes()
        except OSError:
            continue
        if int(fields[1]) == pid and b"ipykernel" in cmdline:
            found.append(int(stat.parent.name))
    return found


@pytest.fixture()
def launched(tmp_path):
    """The real launcher on a free port, idle kernels culled after 3 s; yields (process, url)."""
    if not Path("/proc/self/stat").exists():
        pytest.skip("needs Linux /proc")
    port = _free_port()
    env = {**os.environ, "JUPYTER_RUNTIME_DIR": str(tmp_path / "runtime")}
    env.pop("JUPYTER_TOKEN", None)
    process = subprocess.Popen(
        [sys.executable, "-m", "rheoline.widgets.serve", "--port", str(port)]
        + ["--workspace", str(tmp_path / "ws"), "--idle-minutes", "0.05"],
        stdout=subprocess.PIPE,
        stderr=subprocess.DEVNULL,
        text=True,
        env=env,
        start_new_session=True,
    )
    try:
        first = process.stdout.readline()
        url = re.search(r"(http://\S+)", first).group(1)
        base = url.split("?")[0]
        deadline = time.monotonic() + 120
        while _get_quietly(base + "voila/static/rheoline-icons.css") != 200:
            assert process.poll() is None and time.monotonic() < deadline, "Voila did not start"
            time.sleep(0.5)
        yield process, url
    finally:
        with contextlib.suppress(ProcessLookupError):
            os.killpg(process.pid, signal.SIGKILL)
        process.wait(timeout=30)


def _get_quietly(url):
    try:
        return _get(url)
    except OSError:
        return None


@pytest.mark.timeout(600)
def test_the_served_page_needs_its_token_and_stopping_the_launcher_stops_it(launched):
    process, url = launched
    base, token = url.split("?token=")
    assert base == f"http://127.0.0.1:{base.rsplit(':', 1)[1]}" and len(token) >= 32
    # the launcher became Voila: the process that printed the link is the server
    assert b"voila" in Path(f"/proc/{process.pid}/cmdline").read_bytes()
    assert _get(base) in (302, 403)  # no token: sent to the login page, no app
    assert _get(base + "?token=wrong") in (302, 403)
    process.send_signal(signal.SIGTERM)  # to the launcher's own process only
    process.wait(timeout=60)
    with pytest.raises(OSError):
        urllib.request.urlopen(base, timeout=5)


@pytest.mark.timeout(600)
def test_the_kernel_of_a_page_nobody_keeps_open_is_culled(launched):
    process, url = launched
    deadline = time.monotonic() + 300
    while not _kernels_of(process.pid):  # the pool's kernel, kept ready with the app built
        assert time.monotonic() < deadline, "no kernel was made ready for the page"
        time.sleep(0.5)
    assert _get(url) == 200  # no browser ever connects to the page's kernel
    # The page takes the pool's kernel when it is ready (the pool starts another) or, when
    # the request comes first, a kernel of its own: either way, one kernel seen in the
    # seconds after the request is the page's, and only culling ever ends one.
    seen = set()
    for _ in range(6):
        seen |= set(_kernels_of(process.pid))
        time.sleep(0.5)
    while seen <= set(_kernels_of(process.pid)):
        assert time.monotonic() < deadline, "the idle kernel was never shut down"
        time.sleep(1)
    assert process.poll() is None  # the server itself goes on

"""Reliability: the web app binds to this machine only unless told otherwise.

The widget owner's ``python -m rheoline.widgets.serve`` builds a Voila command; by default
it must bind 127.0.0.1 (never all interfaces), open no browser, and hand out pictures only
(its own allowlist or Voila's default one).  Another address needs the flag that names the
risk (tests/test_serve.py has the rest of the launcher's promises).
Voila's own default address is "localhost" (voila.app.Voila.ip), also loopback, so the
plain Voila command is safe as well; no file in the repository may configure 0.0.0.0.
"""

from __future__ import annotations

import contextlib
import io
import re
from pathlib import Path

import pytest

pytest.importorskip("ipywidgets")

from rheoline.widgets import serve  # noqa: E402

REPO = Path(serve.__file__).resolve().parents[2]


def _printed(argv):
    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        assert serve.main([*argv, "--print-command"]) == 0
    return out.getvalue()


def test_default_command_binds_loopback_only():
    command = serve.voila_command()
    ips = [a.split("=", 1)[1] for a in command if a.startswith("--Voila.ip=")]
    assert ips == ["127.0.0.1"]
    assert "--no-browser" in command
    printed = _printed([])
    assert "--Voila.ip=127.0.0.1" in printed and "0.0.0.0" not in printed


def test_another_address_only_when_asked_with_the_risk_named(capsys):
    # TEST-NET-1 address: refused alone, served only with the flag that names the risk
    assert serve.main(["--ip", "192.0.2.10", "--print-command"]) == 2
    assert serve.RISK_FLAG in capsys.readouterr().err
    assert "--Voila.ip=192.0.2.10" in _printed(["--ip", "192.0.2.10", serve.RISK_FLAG])


def test_served_files_are_pictures_only():
    # the command's own allowlist if it sets one, else Voila's default (VoilaConfiguration)
    command = " ".join(serve.voila_command())
    given = re.search(r"file_allowlist=(\S+)", command)
    if given:
        patterns = [given.group(1)]
    else:
        configuration = pytest.importorskip("voila.configuration")
        patterns = configuration.VoilaConfiguration().file_allowlist
    extensions = {
        e for p in patterns for group in re.findall(r"\.\(([^)]*)\)", p) for e in group.split("|")
    }
    assert extensions and extensions <= {"png", "jpg", "jpeg", "gif", "svg"}


def test_voila_default_is_loopback_too():
    voila_app = pytest.importorskip("voila.app")
    assert voila_app.Voila.ip.default_value in ("localhost", "127.0.0.1")


def test_no_repository_file_binds_all_interfaces():
    suspects = []
    for path in REPO.rglob("*"):
        hidden = any(part.startswith(".") for part in path.relative_to(REPO).parts)
        if (
            hidden
            or not path.is_file()
            or path.suffix
            not in (".py", ".json", ".toml", ".cfg", ".yml", ".yaml", ".ipynb", ".md", ".sh", "")
        ):
            continue
        if path.name == Path(__file__).name:
            continue
        try:
            text = path.read_text(encoding="utf-8")
        except (UnicodeDecodeError, OSError):
            continue
        if (
            re.search(r"(ip|host|bind)\W{0,4}[=: ]\W{0,2}(0\.0\.0\.0|\*|::)\b", text, re.I)
            or "0.0.0.0" in text
        ):
            suspects.append(str(path.relative_to(REPO)))
    assert suspects == []

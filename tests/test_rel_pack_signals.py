"""Reliability: signals while a review pack is written, and an empty ``--out``.

Each case runs ``rheoline run FILE --out pack`` in a child process whose pack writer
signals its own process at a chosen moment (while the files are written, just before and
just after the folder is renamed into place), so the moment is exact and the test cannot
pass by luck.  Before the pack is in place SIGTERM, SIGHUP and SIGINT stop the command
with nothing left behind (no hidden ``.pack.*.partial`` folder; an earlier pack stays);
after it, a signal no longer changes the exit status.
"""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import textwrap
from pathlib import Path

import pytest

from rheoline.scenario.files import example_path

ROOT = Path(__file__).resolve().parents[1]

_CHILD = textwrap.dedent(
    """
    import os, signal, sys
    from rheoline import cli
    from rheoline.scenario import pack_folder, pack_report
    when, signum = sys.argv[1], getattr(signal, sys.argv[2])

    sent = []

    def kill():
        if not sent:  # once
            sent.append(signum)
            os.kill(os.getpid(), signum)

    if when == "writing":
        real = pack_report.write_html
        def write_html(*args, **kwargs):
            kill()
            return real(*args, **kwargs)
        pack_report.write_html = write_html
    else:
        real_mark = pack_folder.mark_placed
        def mark_placed():
            if when == "before-mark":
                kill()
            real_mark()
            if when == "after-mark":
                kill()
        pack_folder.mark_placed = mark_placed
    sys.exit(cli.main(["run", sys.argv[3], "--out", "pack"] + sys.argv[4:]))
    """
)


def _run(tmp_path, when, signame, *extra):
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    return subprocess.run(
        [sys.executable, "-c", _CHILD, when, signame, str(example_path("minimal")), *extra],
        cwd=tmp_path,
        env=env,
        capture_output=True,
        text=True,
        timeout=300,
    )


@pytest.mark.parametrize("signame", ["SIGTERM", "SIGHUP", "SIGINT"])
def test_a_signal_while_writing_leaves_nothing_behind(tmp_path, signame):
    done = _run(tmp_path, "writing", signame)
    signum = getattr(signal, signame)
    assert done.returncode == (130 if signame == "SIGINT" else 128 + signum), done.stderr
    assert "rheoline:" in done.stderr and "Traceback" not in done.stderr
    assert sorted(p.name for p in tmp_path.iterdir()) == []  # no pack, no hidden folder


@pytest.mark.parametrize("signame", ["SIGTERM", "SIGHUP"])
def test_a_signal_while_replacing_keeps_the_earlier_pack(tmp_path, signame):
    first = _run(tmp_path, "none", signame)
    assert first.returncode == 0, first.stderr
    before = {p.name: p.read_bytes() for p in (tmp_path / "pack").iterdir()}
    done = _run(tmp_path, "writing", signame, "--force")
    assert done.returncode == 128 + getattr(signal, signame), done.stderr
    assert sorted(p.name for p in tmp_path.iterdir()) == ["pack"]
    assert {p.name: p.read_bytes() for p in (tmp_path / "pack").iterdir()} == before


@pytest.mark.parametrize("when", ["before-mark", "after-mark"])
@pytest.mark.parametrize("signame", ["SIGTERM", "SIGINT"])
def test_a_late_signal_after_the_pack_is_in_place_keeps_success(tmp_path, when, signame):
    done = _run(tmp_path, when, signame)
    assert done.returncode == 0, done.stderr
    assert "review pack written" in done.stdout + done.stderr
    assert sorted(p.name for p in tmp_path.iterdir()) == ["pack"]
    assert (tmp_path / "pack" / "manifest.json").is_file()


@pytest.mark.parametrize("command", [["run", "FILE"], ["demo"], ["validate"]])
@pytest.mark.parametrize("value", ["", "  "])
def test_an_empty_out_is_an_error(tmp_path, command, value):
    import contextlib
    import io

    from rheoline import cli

    argv = [str(example_path("minimal")) if a == "FILE" else a for a in command]
    err = io.StringIO()
    with contextlib.redirect_stderr(err), contextlib.redirect_stdout(io.StringIO()):
        status = cli.main([*argv, "--out", value])
    assert status == 2
    assert "--out is empty" in err.getvalue()

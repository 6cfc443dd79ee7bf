"""Reliability: every view, export and command-line output carries :data:`rheoline.CAUTION`.

One parametrized test walks every output the toolkit produces for a person to read:

* command line: every command of the parser alone (with the example file where it needs
  one), ``run --json``, a printed example, and ``--help`` of the program and of each command;
* the review pack: every CSV file, every sheet of the workbook, the HTML report and the
  manifest;
* the views: each tab of the app (line, comparison, blood and vessels, files), each with
  the banner as its first child.

HTML is compared after removing tags and unescaping entities (the banner links the words
"CAUTIONS.md"; the report escapes the apostrophe).
"""

from __future__ import annotations

import contextlib
import csv
import html
import io
import json
import re

import pytest
from rel_record import bump, module_recorder

import rheoline
from rheoline import cli
from rheoline.scenario.export import PACK_FILES
from rheoline.scenario.files import example_path

_record = module_recorder("cautions", "cautions:")

EXAMPLE = str(example_path("minimal"))


def _commands():
    """Every command of the parser, so that a new command is checked too."""
    parser = cli.build_parser()
    sub = next(a for a in parser._actions if a.__class__.__name__ == "_SubParsersAction")
    return list(sub.choices)


def _plain_invocation(command):
    """The command alone, or with the example file where it needs one."""
    if command == "validate":  # writes its report: into a scratch folder, not the work tree
        import tempfile

        return [command, "--out", tempfile.mkdtemp(prefix="rheoline-validate-")]
    try:
        cli.build_parser().parse_args([command])
    except Exception:  # noqa: BLE001 - the parser refuses: it needs FILE
        return [command, EXAMPLE]
    return [command]


def _tabs():
    """The app's tabs as build_app builds them by default (a new view is checked too)."""
    import inspect

    try:
        from rheoline.widgets.app import build_app
    except ImportError:  # pragma: no cover - the widgets extra is not installed
        return []
    return list(inspect.signature(build_app).parameters["tabs"].default)


COMMANDS = _commands()


def _plain(text):
    return " ".join(html.unescape(re.sub(r"<[^>]+>", " ", text)).split())


def _cli_output(argv):
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        try:
            status = cli.main(argv)
        except SystemExit as exc:  # --help exits through argparse
            status = exc.code
    assert status == 0, (argv, err.getvalue())
    return out.getvalue() + "\n" + err.getvalue()


@pytest.fixture(scope="module")
def pack(tmp_path_factory):
    folder = tmp_path_factory.mktemp("cautions") / "pack"
    _cli_output(["run", EXAMPLE, "--out", str(folder)])
    return folder


@pytest.fixture(scope="module")
def app():
    pytest.importorskip("ipywidgets")
    from rheoline.widgets.app import build_app

    built = build_app()
    assert built.failures == {}
    return built


def _csv_text(path):
    with path.open(newline="", encoding="utf-8") as fh:
        return " ".join(" ".join(row) for row in list(csv.reader(fh))[:3])


def _sheets(path):
    import openpyxl

    wb = openpyxl.load_workbook(path, read_only=True)
    out = {}
    for ws in wb.worksheets:
        cells = [str(c) for row in ws.iter_rows(max_row=5, values_only=True) for c in row if c]
        out[ws.title] = " ".join(cells)
    return out


OUTPUTS = (
    [
        (f"cli {' '.join(a).replace(EXAMPLE, 'minimal.toml')}", "cli", a)
        for a in (
            *[_plain_invocation(c) for c in COMMANDS],
            ["run", EXAMPLE, "--json"],
            ["examples", "minimal"],
            ["--help"],
        )
    ]
    + [(f"cli {c} --help", "cli", [c, "--help"]) for c in COMMANDS]
    + [
        (f"pack {n}", "pack", n)
        for n in PACK_FILES  # every file of a pack (the scenario copy is the user's own)
    ]
    + [(f"view {t}", "view", t) for t in _tabs()]
)


@pytest.mark.parametrize(("kind", "what"), [o[1:] for o in OUTPUTS], ids=[o[0] for o in OUTPUTS])
def test_every_output_carries_the_caution(kind, what, request):
    bump("cautions:outputs_checked")
    if kind == "cli":
        texts = {"output": _cli_output(list(what))}
        if "--json" in what:  # every JSON record carries it too
            records = json.loads(_cli_output(list(what)).split("\n" + rheoline.CAUTION)[0])
            texts.update({f"record {i}": r.get("caution", "") for i, r in enumerate(records)})
    elif kind == "pack":
        folder = request.getfixturevalue("pack")
        path = folder / what
        if what.endswith(".csv"):
            texts = {what: _csv_text(path)}
        elif what.endswith(".xlsx"):
            texts = _sheets(path)
        elif what.endswith(".json"):
            texts = {what: json.loads(path.read_text(encoding="utf-8")).get("caution", "")}
        else:
            page = path.read_text(encoding="utf-8")
            body = page[page.find("<body") :]
            texts = {what: _plain(body[:20000])}  # near the top of the page
    else:
        view = request.getfixturevalue("app").views[what]
        banner = view.children[0]
        texts = {f"{what} banner": _plain(banner.value)}
    missing = [name for name, text in texts.items() if rheoline.CAUTION not in _plain(text)]
    assert missing == [], f"no caution in: {missing}"

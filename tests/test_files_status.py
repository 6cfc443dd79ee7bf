"""The files view's status line in the page's words (issue 15): every load, save and pack
that fails says what did not happen and why, names the file as the workspace shows it,
speaks of the page's own checkbox, and never of a command-line flag or a Python argument
(the scenario layer's messages are written for the command line: ``--force``, ``--out``);
each status replaces the one before.

The tests drive the view as its buttons do (``view._run(handler)``).
"""

from __future__ import annotations

import html
import re

import pytest

pytest.importorskip("ipywidgets")

#: What the page must never say: a command-line flag, a Python keyword argument.
FLAG = re.compile(r"(?<![\w-])--[a-z]|\bforce\s*=|\bpass force\b", re.IGNORECASE)


@pytest.fixture()
def files(tmp_path):
    from rheoline.widgets.files_view import FilesView

    work = tmp_path / "work"
    work.mkdir()
    (work / "notes").mkdir()
    (work / "notes" / "keep.txt").write_text("a folder of the user's, not a pack")
    (work / "plain.txt").write_text("a file")
    (work / "to-notes").symlink_to(work / "notes")
    (work / "bad.toml").write_text('[[scenario]]\nname = "no version"\n')
    view = FilesView(workspace=work)
    assert view._run(lambda: view.save("saved.toml"))
    assert view._run(lambda: view.write_pack("earlier-pack"))
    return view


def _status(view) -> str:
    return html.unescape(re.sub(r"<[^>]+>", "", view.status.value))


#: (action, target, box ticked, what the status says), each a failure a user can meet.
FAILURES = [
    ("load", "missing.toml", False, r"nothing was loaded: missing\.toml: cannot read"),
    ("load", "bad.toml", False, r"nothing was loaded: bad\.toml.*format_version"),
    ("load", "notes", False, r"nothing was loaded: notes"),
    ("save", "saved.toml", False, r"not saved: saved\.toml: exists already.*tick 'replace"),
    ("save", "notes", True, r"not saved: notes: is a folder"),
    ("save", "plain.txt/s.toml", True, r"not saved: plain\.txt/s\.toml: .*not a folder"),
    ("pack", "earlier-pack", False, r"not written: earlier-pack: exists already.*tick 'replace"),
    ("pack", "notes", False, r"not written: the folder notes is not an unchanged rheoline review"),
    ("pack", "notes", True, r"kept as it is even with 'replace an existing file or pack' ticked"),
    ("pack", "plain.txt", True, r"not written: plain\.txt is a file, not a folder"),
    ("pack", "to-notes", True, r"not written: the folder notes is not an unchanged"),
]


@pytest.mark.parametrize(("action", "target", "ticked", "says"), FAILURES)
def test_a_failure_says_what_did_not_happen_in_the_pages_words(files, action, target, ticked, says):
    files.controls["overwrite"].value = ticked
    handler = {"load": files.load, "save": files.save, "pack": files.write_pack}[action]
    assert files._run(lambda: handler(target)) is False
    status = _status(files)
    assert re.search(says, status), status
    assert status.startswith("[X] failed: ") and status.count("[X]") == 1
    assert not FLAG.search(status), status
    assert str(files.workspace.root) not in status.split(": ", 3)[2]  # named as shown
    assert "[ok]" not in status and "saved.toml to" not in status  # the last ok is gone


def test_the_scenario_layers_own_messages_do_name_the_flags(files):
    """What the test above guards against: the pack layer's message, meant for the
    command line, names --force and --out; the view renders its own words from the
    error's kind instead."""
    from rheoline.errors import PackExistsError
    from rheoline.scenario.pack_folder import check_target

    with pytest.raises(PackExistsError, match="--force") as caught:
        check_target(files.workspace.root / "notes", force=True)
    assert caught.value.kind == "not a pack" and caught.value.detail == "no manifest.json"
    with pytest.raises(PackExistsError, match="--force") as caught:
        check_target(files.workspace.root / "earlier-pack", force=False)
    assert caught.value.kind == "exists"
    with pytest.raises(PackExistsError, match="--out") as caught:
        check_target(files.workspace.root / "plain.txt", force=True)
    assert caught.value.kind == "not a folder"


def test_an_upload_that_fails_says_nothing_was_loaded(files):
    from rel_record import upload

    upload(files, "big.toml", b"\xff\xfe not text")
    status = _status(files)
    assert status.startswith("[X] failed: nothing was loaded: big.toml") and "UTF-8" in status
    assert not FLAG.search(status)


def test_each_status_replaces_the_one_before(files):
    files.controls["overwrite"].value = True
    assert files._run(lambda: files.write_pack("earlier-pack"))  # an earlier pack: replaced
    first = _status(files)
    assert first == "[ok] ok: wrote the review pack to earlier-pack (1 case)"
    assert not files._run(lambda: files.write_pack("notes"))
    assert "wrote" not in _status(files) and _status(files).count("[X] failed") == 1
    assert files._run(lambda: files.save("again.toml"))
    assert _status(files) == "[ok] ok: saved 1 scenario to again.toml"


def test_a_file_that_appears_before_the_save_is_said_in_the_pages_words(files, monkeypatch):
    # the view's own check passes, then the file appears before the write (another program
    # saved it): the scenario layer's refusal names force=True, the page names its box
    monkeypatch.setattr(type(files), "_refuse_existing", lambda self, path: None)
    (files.workspace.root / "late.toml").write_text("# written meanwhile\n", encoding="utf-8")
    files.controls["overwrite"].value = False
    assert files._run(lambda: files.save("late.toml")) is False
    status = _status(files)
    assert re.search(r"not saved: late\.toml: exists already.*tick 'replace", status), status
    assert not FLAG.search(status) and "force" not in status
    assert (files.workspace.root / "late.toml").read_text(
        encoding="utf-8"
    ) == "# written meanwhile\n"

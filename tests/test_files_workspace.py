"""The files view keeps to its workspace folder (issue 12, the served page as a door).

Anyone who reaches the page can type a path: every load, save and pack is resolved inside
the workspace the app was started with, a path that leaves it (absolute, ``..`` or a
symbolic link) is refused before any file is opened, and an error never shows a foreign
file's contents.  Uploaded text goes through the raw-text guard like any file.

The tests call ``view._run(handler)``, which is what the view's buttons call.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from rel_record import upload

pytest.importorskip("ipywidgets")

SECRET = "SECRET-contents-4b1d"  # in a file outside the workspace; must never be shown
FOREIGN = (
    'format_version = 1\n[[scenario]]\nname = "s"\n'
    f'fluid = "{SECRET}"\nhead = "1 m"\n[[scenario.part]]\ntype = "catheter"\ngauge = 18\n'
)
GOOD = (
    'format_version = 1\n[[scenario]]\nname = "in the workspace"\nfluid = "water"\n'
    'head = "0.5 m"\n[[scenario.part]]\ntype = "catheter"\ngauge = 14\n'
)


@pytest.fixture()
def places(tmp_path):
    """A workspace folder, a folder beside it with a file of its own, and links out."""
    work, outside = tmp_path / "work", tmp_path / "outside"
    work.mkdir()
    outside.mkdir()
    (outside / "notes.toml").write_text(FOREIGN)
    (work / "link.toml").symlink_to(outside / "notes.toml")
    (work / "door").symlink_to(outside)
    return work, outside


@pytest.fixture()
def files(places):
    from rheoline.widgets.files_view import FilesView
    from rheoline.widgets.line_view import LineView

    return FilesView(LineView(), None, workspace=places[0])


def _shown(files):
    return files.messages.value + files.status.value


def test_the_view_shows_its_workspace_folder(files, places):
    shown = [w.value for w in files.children if "rl-workspace" in getattr(w, "_dom_classes", ())]
    assert len(shown) == 1 and str(places[0].resolve()) in shown[0]


def test_the_default_workspace_is_the_launchers_or_a_folder_beside_the_start(monkeypatch, tmp_path):
    from rheoline.widgets.files_view import FilesView
    from rheoline.widgets.serve import DEFAULT_WORKSPACE, WORKSPACE_ENV

    monkeypatch.chdir(tmp_path)
    monkeypatch.delenv(WORKSPACE_ENV, raising=False)
    assert FilesView().workspace.root == tmp_path.resolve() / DEFAULT_WORKSPACE
    assert not (tmp_path / DEFAULT_WORKSPACE).exists()  # made when a file is first written
    monkeypatch.setenv(WORKSPACE_ENV, str(tmp_path / "chosen"))
    assert FilesView().workspace.root == tmp_path.resolve() / "chosen"


@pytest.mark.parametrize(
    "typed",
    ["{outside}/notes.toml", "../outside/notes.toml", "link.toml", "door/notes.toml"],
    ids=["absolute", "dot-dot", "linked-file", "linked-folder"],
)
def test_loading_from_outside_is_refused_and_shows_nothing_of_the_file(files, places, typed):
    work, outside = places
    files.controls["scenario_path"].value = typed.format(outside=outside)
    before = files.line_view.editor.parts()
    assert files._run(files.load) is False
    assert "outside the workspace folder" in _shown(files)
    assert SECRET not in _shown(files)
    assert files.line_view.editor.parts() == before  # nothing was loaded


def test_a_file_in_the_workspace_loads_by_its_name(files, places):
    (places[0] / "mine.toml").write_text(GOOD)
    files.controls["scenario_path"].value = "mine.toml"
    assert files._run(files.load) is True
    assert "loaded mine.toml" in files.status.value
    assert [p.fields["gauge"].si for p in files.line_view.editor.parts()] == [14]


@pytest.mark.parametrize(
    "typed",
    ["{outside}/notes.toml", "../outside/new.toml", "link.toml", "door/new.toml"],
    ids=["absolute", "dot-dot", "linked-file", "linked-folder"],
)
@pytest.mark.parametrize("action", ["save", "write_pack"])
def test_saving_or_packing_outside_is_refused_and_writes_nothing(files, places, typed, action):
    work, outside = places
    target = typed.format(outside=outside)
    files.controls["overwrite"].value = True  # even when replacing is allowed
    files.controls["scenario_path" if action == "save" else "pack_path"].value = target
    assert files._run(getattr(files, action)) is False
    assert "outside the workspace folder" in _shown(files)
    assert sorted(p.name for p in outside.iterdir()) == ["notes.toml"]
    assert (outside / "notes.toml").read_text() == FOREIGN  # not replaced


def test_save_and_pack_inside_create_the_workspace(tmp_path):
    from rheoline.widgets.files_view import FilesView
    from rheoline.widgets.line_view import LineView

    files = FilesView(LineView(), None, workspace=tmp_path / "new-workspace")
    assert files._run(lambda: files.save("s.toml")) is True
    assert (tmp_path / "new-workspace" / "s.toml").is_file()
    assert "saved 1 scenario to s.toml" in files.status.value
    assert files._run(lambda: files.write_pack("pack")) is True
    assert (tmp_path / "new-workspace" / "pack").is_dir()


def test_an_error_quotes_no_more_than_a_short_escaped_excerpt(files, places):
    key = "<script>alert(1)</script>" + "k" * 5000
    (places[0] / "odd.toml").write_text(f'format_version = 1\n"{key}" = 1\n')
    files.controls["scenario_path"].value = "odd.toml"
    assert files._run(files.load) is False
    shown = _shown(files)
    assert "unknown key" in shown and "<script>" not in shown and "&lt;script&gt;" in shown
    assert shown.count("k") < 200  # the key is shown cut short, never whole


@pytest.mark.parametrize(
    "name, content, line",
    [
        ("dotted.toml", b"format_version = 1\n" + b"a." * 20_000 + b"b = 1\n", 2),
        ("header.toml", b"[" + b"a." * 100_000 + b"b]\n", 1),
        ("deep.json", b"[" * 200_000 + b"]" * 200_000, 1),
    ],
    ids=["dotted-key", "table-header", "deep-json"],
)
def test_an_uploaded_bomb_is_refused_by_the_raw_text_guard(files, name, content, line):
    import tomllib

    with pytest.MonkeyPatch.context() as patch:  # the guard refuses before any parser
        patch.setattr(tomllib, "loads", lambda *a, **k: pytest.fail("the TOML reader ran"))
        upload(files, name, content)
    shown = _shown(files)
    assert "[X] failed" in shown and f"{name}: line {line}: " in shown and "limit" in shown


def test_the_status_line_names_files_relative_to_the_workspace(files, places):
    sub = places[0] / "cases"
    sub.mkdir()
    (sub / "a.toml").write_text(GOOD)
    assert files._run(lambda: files.load(str(sub / "a.toml"))) is True
    assert f"loaded {Path('cases') / 'a.toml'}" in files.status.value
    assert str(places[0]) not in files.status.value

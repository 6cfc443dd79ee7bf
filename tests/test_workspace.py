"""The workspace (rheoline.scenario.workspace): every path a served page is given stays in one
folder; ``..``, absolute paths and symbolic links that lead out are refused before any file is
opened, with a message that names the path and the folder and quotes no file."""

from __future__ import annotations

import os
from pathlib import Path

import pytest

from rheoline.errors import ScenarioError
from rheoline.scenario.files import OutputError
from rheoline.scenario.workspace import MAX_PATH_CHARS, Workspace

SECRET = "secret-contents-7f3a"


@pytest.fixture()
def ws(tmp_path):
    root = tmp_path / "work"
    root.mkdir()
    (root / "sub").mkdir()
    (root / "sub" / "case.toml").write_text("x = 1\n")
    outside = tmp_path / "outside"
    outside.mkdir()
    (outside / "notes.toml").write_text(f'title = "{SECRET}"\n')
    return Workspace(root)


def test_names_are_taken_inside_the_folder(ws):
    assert ws.resolve("a.toml") == ws.root / "a.toml"
    assert ws.resolve("sub/case.toml") == ws.root / "sub" / "case.toml"
    assert ws.resolve("sub/../b.toml", for_writing=True) == ws.root / "b.toml"
    assert ws.resolve(str(ws.root / "sub" / "case.toml")) == ws.root / "sub" / "case.toml"
    assert ws.resolve(Path("pack"), for_writing=True) == ws.root / "pack"
    assert ws.relative(ws.root / "sub" / "case.toml") == os.path.join("sub", "case.toml")


@pytest.mark.parametrize(
    "typed",
    ["../outside/notes.toml", "sub/../../outside/notes.toml", "/etc/passwd", "~/x.toml", ".."],
)
@pytest.mark.parametrize("for_writing", [False, True])
def test_paths_that_leave_the_folder_are_refused(ws, typed, for_writing):
    with pytest.raises(ScenarioError, match="outside the workspace folder") as err:
        ws.resolve(typed, for_writing=for_writing)
    assert str(ws.root) in str(err.value) and typed in str(err.value)
    assert SECRET not in str(err.value)
    assert isinstance(err.value, OutputError) == for_writing  # an OSError too, for writing


@pytest.mark.parametrize("for_writing", [False, True])
def test_symbolic_links_out_of_the_folder_are_refused(ws, for_writing):
    outside = ws.root.parent / "outside"
    (ws.root / "link.toml").symlink_to(outside / "notes.toml")
    (ws.root / "door").symlink_to(outside)
    (ws.root / "dangling.toml").symlink_to(outside / "not-yet.toml")
    for typed in ("link.toml", "door/notes.toml", "door/new.toml", "dangling.toml"):
        with pytest.raises(ScenarioError, match="outside the workspace folder") as err:
            ws.resolve(typed, for_writing=for_writing)
        assert SECRET not in str(err.value)
        assert str(outside) not in str(err.value)  # where a link leads is not told


def test_symbolic_links_within_the_folder_are_followed(ws):
    (ws.root / "alias.toml").symlink_to(ws.root / "sub" / "case.toml")
    assert ws.resolve("alias.toml") == ws.root / "sub" / "case.toml"


def test_a_root_given_through_a_link_holds_its_own_paths(tmp_path):
    real = tmp_path / "real"
    real.mkdir()
    (tmp_path / "via").symlink_to(real)
    ws = Workspace(tmp_path / "via")
    assert ws.root == real
    assert ws.resolve(str(tmp_path / "via" / "a.toml")) == real / "a.toml"


def test_a_loop_of_links_is_refused(ws):
    (ws.root / "loop1").symlink_to(ws.root / "loop2")
    (ws.root / "loop2").symlink_to(ws.root / "loop1")
    try:
        path = ws.resolve("loop1/x.toml")
    except ScenarioError as exc:  # refused outright on systems that report the loop
        assert "loop" in str(exc) or "outside" in str(exc)
    else:  # or resolved inside the folder, where opening it fails with ELOOP
        assert path.is_relative_to(ws.root)


@pytest.mark.parametrize(
    "typed, words",
    [("", "give a file name"), ("   ", "give a file name"), ("a\x00b", "not a usable path")],
    ids=["empty", "blank", "nul"],
)
def test_unusable_names_are_refused(ws, typed, words):
    with pytest.raises(ScenarioError, match=words):
        ws.resolve(typed)


def test_an_overlong_name_is_refused_and_shown_short(ws):
    with pytest.raises(ScenarioError, match="not a usable path") as err:
        ws.resolve("a" * (MAX_PATH_CHARS + 1))
    assert len(str(err.value)) < 300


def test_the_folder_itself_cannot_be_written_over(ws):
    with pytest.raises(OutputError, match="workspace folder itself"):
        ws.resolve(".", for_writing=True)
    assert ws.resolve(".") == ws.root  # reading it is a folder, refused by the loader


def test_create_makes_the_folder_and_refuses_a_file(tmp_path):
    ws = Workspace(tmp_path / "a" / "b").create()
    assert ws.root.is_dir()
    blocker = tmp_path / "file"
    blocker.write_text("x")
    with pytest.raises(OutputError, match="create the workspace folder"):
        Workspace(blocker / "ws").create()

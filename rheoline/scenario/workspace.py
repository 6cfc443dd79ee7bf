"""Workspace: the one folder a served page may read from and write to.

A page served to a browser takes file names from whoever can reach it.  The files view
therefore resolves every name it is given through a :class:`Workspace`: a relative
name is taken inside the workspace folder, ``..`` and symbolic links are resolved
first, and a path that ends outside the folder is refused before any file is opened,
so the page can neither read a file elsewhere (and echo it in an error message) nor
write over one.

A hard link inside the folder to a file elsewhere is the same file to the operating
system and cannot be told apart by its name; only someone who can already write into
the folder outside the page can make one.

Examples
--------
>>> import tempfile
>>> ws = Workspace(tempfile.mkdtemp())
>>> ws.resolve("scenarios.toml", for_writing=True) == ws.root / "scenarios.toml"
True
>>> ws.resolve("../elsewhere.toml")
Traceback (most recent call last):
...
rheoline.errors.ScenarioError: ../elsewhere.toml: is outside the workspace folder ...
"""

from __future__ import annotations

import os
from pathlib import Path

from rheoline.errors import ScenarioError

__all__ = ["Workspace", "MAX_PATH_CHARS"]

#: Longest path a user may type (characters).
MAX_PATH_CHARS = 1024


def _shown(text: str, limit: int = 80) -> str:
    """A user's path as short text for a message (control characters made visible)."""
    text = "".join(c if c.isprintable() else "?" for c in text)
    return text if len(text) <= limit else text[: limit - 3] + "..."


class Workspace:
    """The folder every load, save and pack of a served page stays in.

    Parameters
    ----------
    root : str or os.PathLike
        The folder.  It is resolved once (a symbolic link named here is followed: the
        person starting the app chose it); it need not exist yet (see :meth:`create`).
    """

    def __init__(self, root):
        self.root = Path(root).expanduser().resolve()

    def __repr__(self):
        return f"Workspace({str(self.root)!r})"

    def create(self) -> Workspace:
        """Make the folder (and its parents) if missing; returns the workspace."""
        from rheoline.scenario.files import output_error

        try:
            self.root.mkdir(parents=True, exist_ok=True)
        except OSError as exc:
            raise output_error(self.root, "create the workspace folder", exc) from None
        if not self.root.is_dir():
            raise ScenarioError(f"the workspace {self.root} is not a folder", source=None)
        return self

    def resolve(self, user_path, *, for_writing: bool = False) -> Path:
        """The real path of ``user_path`` inside the workspace, or an error naming both.

        Parameters
        ----------
        user_path : str or os.PathLike
            What the user typed: relative to the workspace folder, or absolute.
        for_writing : bool
            True for a file or folder about to be written: the workspace folder itself
            is refused too (a review pack may not replace it).

        Returns
        -------
        pathlib.Path
            The path with every symbolic link and ``..`` resolved; use it, not the
            user's text, for the operation.

        Raises
        ------
        ScenarioError
            For reading (``OutputError``, a ScenarioError, for writing): an empty or
            overlong name, a NUL character, or a path outside the workspace (directly,
            through ``..`` or through a symbolic link).  The message names the user's
            path and the workspace, never what a file there holds.
        """
        error = self._error_class(for_writing)
        text = os.fspath(user_path) if isinstance(user_path, os.PathLike) else user_path
        if not isinstance(text, str) or not text.strip():
            raise error("give a file name inside the workspace folder", source="path")
        shown = _shown(text)
        if len(text) > MAX_PATH_CHARS or "\x00" in text:
            raise error(
                f"is not a usable path (at most {MAX_PATH_CHARS} characters, no NUL)",
                source=shown,
            )
        path = Path(text.strip()).expanduser()
        try:
            real = (path if path.is_absolute() else self.root / path).resolve()
        except (OSError, RuntimeError):  # a loop of symbolic links
            raise error("cannot be resolved (a loop of symbolic links?)", source=shown) from None
        if not real.is_relative_to(self.root):
            raise error(
                f"is outside the workspace folder {self.root}; the app reads and writes "
                "files in that folder only: give a name such as 'scenarios.toml'",
                source=shown,
            )
        if for_writing and real == self.root:
            raise error(
                "is the workspace folder itself; give a file or folder name inside it",
                source=shown,
            )
        return real

    def relative(self, path) -> str:
        """``path`` (inside the workspace) as text relative to its folder."""
        real = Path(path)
        return str(real.relative_to(self.root)) if real.is_relative_to(self.root) else str(real)

    @staticmethod
    def _error_class(for_writing):
        if for_writing:
            from rheoline.scenario.files import OutputError

            return lambda message, source: OutputError(message, source=source)
        return lambda message, source: ScenarioError(message, source=source)

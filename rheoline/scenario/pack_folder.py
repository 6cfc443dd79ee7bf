"""The review pack's folder: what a pack holds, when one may be replaced, and the atomic swap.

A pack is built in a temporary folder beside its target and renamed into place
(:func:`write_folder_atomically`), so a failure leaves no half-written pack.  An existing
folder is replaced only with ``force``, and then only when it is an earlier, unchanged
review pack (:func:`is_review_pack`: its ``manifest.json`` names rheoline, and the folder
holds the pack's own files, each matching its recorded SHA-256 hash, and nothing else).  Any
other folder (a user's documents, a home folder, a pack with files added or edited) is
refused with :class:`PackExistsError` and left as it is; the old pack is removed file by
file, never with a recursive delete.

What goes into the files is :mod:`rheoline.scenario.export`'s business; this module knows
only their names and the manifest's shape.
"""

from __future__ import annotations

import hashlib
import json
import os
import re
import shutil
import tempfile
from collections.abc import Callable
from pathlib import Path

from rheoline.errors import PackExistsError  # re-exported from here
from rheoline.scenario.files import check_output_folder
from rheoline.scenario.interrupts import PackInterrupted, interrupt_guard, mark_placed

__all__ = [
    "PACK_FILES",
    "NETWORK_PACK_FILES",
    "TIME_PACK_FILES",
    "PackExistsError",
    "check_target",
    "is_review_pack",
    "sha256_file",
    "write_folder_atomically",
]

#: The files of a pack (besides the copy of the scenario file, ``scenario-NAME``).
PACK_FILES = (
    "results.csv",
    "parts.csv",
    "assumptions.csv",
    "model-evidence.csv",
    "results.xlsx",
    "report.html",
    "manifest.json",
)
#: The files a pack adds when its run has branched lines (:mod:`rheoline.scenario.pack_network`).
NETWORK_PACK_FILES = ("branches.csv", "nodes.csv")
#: The files a pack adds when its run has the time solve (:mod:`rheoline.scenario.pack_time`).
TIME_PACK_FILES = ("time-series.csv",)

#: The largest manifest read back when deciding whether a folder is a pack [bytes].
_MAX_MANIFEST_BYTES = 1_000_000


def write_folder_atomically(out: Path, force: bool, fill: Callable[[Path], None]) -> Path:
    """Make the folder ``out`` by calling ``fill(temporary_folder)``, then renaming it.

    The temporary folder is made beside ``out`` (same file system, so the rename is
    atomic).  When ``out`` exists it is checked again once the new folder is complete (it
    may have changed meanwhile), moved aside, and its own files deleted one by one.  Any
    exception (an interrupt, SIGTERM or SIGHUP included: :func:`interrupt_guard`) removes
    the temporary folder and puts an earlier pack back where it was; once the new pack is
    in place a signal no longer interrupts the write.

    Raises
    ------
    PackExistsError
        When ``out`` may not be written (:func:`check_target`), before or after ``fill``.
    OSError
        What the operating system or ``fill`` raised; nothing is left behind.
    """
    check_target(out, force)
    parent = out.parent if str(out.parent) else Path(".")
    parent.mkdir(parents=True, exist_ok=True)
    with interrupt_guard():
        return _write_and_swap(out, force, fill, parent)


def _write_and_swap(out, force, fill, parent):
    """The body of :func:`write_folder_atomically`, under its signal guard."""
    tmp = Path(tempfile.mkdtemp(prefix=f".{out.name}.", suffix=".partial", dir=parent))
    old = old_files = None
    try:
        os.chmod(tmp, 0o777 & ~_umask())  # mkdtemp makes it private; a pack is shared
        fill(tmp)
        if os.path.lexists(out):
            # checked again now that the new pack is ready: the folder may have changed
            # while the run was written; only ever move aside an unchanged earlier pack
            check_target(out, force)
            old_files = _pack_file_names(out)
            old = Path(tempfile.mkdtemp(prefix=f".{out.name}.", suffix=".old", dir=parent))
            os.rmdir(old)
            os.replace(out, old)
        os.replace(tmp, out)
        mark_placed()
    except BaseException as exc:
        if not os.path.lexists(tmp) and isinstance(exc, (KeyboardInterrupt, PackInterrupted)):
            mark_placed()  # a signal just after the rename: the pack is in place
        else:
            shutil.rmtree(tmp, ignore_errors=True)  # our own temporary folder
            if old is not None and old.exists() and not out.exists():
                os.replace(old, out)
            raise
    if old is not None:
        _remove_old_pack(old, old_files)
    return out


def _remove_old_pack(folder: Path, names):
    """Delete the named files of a replaced pack, then the folder if it is empty.

    No recursive delete: a file that appeared after the check is left where it is (in
    the hidden ``.NAME.*.old`` folder beside the pack), never lost.
    """
    for name in names:
        try:
            (folder / name).unlink()
        except OSError:
            pass
    try:
        os.rmdir(folder)
    except OSError:
        pass


def _umask():
    mask = os.umask(0o022)
    os.umask(mask)
    return mask


def check_target(out: Path, force: bool):
    """Raise :class:`PackExistsError` unless ``out`` may be written.

    ``out`` may be written when it does not exist, or, with ``force``, when it is an
    earlier review pack (:func:`is_review_pack`).  A file, a link, or a folder that is not
    an unchanged pack is never replaced.

    Raises
    ------
    PackExistsError
        As above; the message names the folder and the fix (``--force``, another folder).
    rheoline.scenario.files.OutputError
        When a file stands where a folder of ``out``'s path should be.
    """
    out = Path(out)
    check_output_folder(out, "pack")
    if out.is_symlink():
        raise PackExistsError(
            "is a symbolic link; rheoline does not replace links (nor "
            "what they point to); choose a new folder for --out",
            source=str(out),
            kind="link",
        )
    if not out.exists():
        return
    if not out.is_dir():
        raise PackExistsError(
            "exists and is not a folder; choose another --out", source=str(out), kind="not a folder"
        )
    reason = _not_a_pack_reason(out)
    if reason:
        raise PackExistsError(
            f"exists and is not a rheoline review pack ({reason}); it is "
            "left as it is, even with --force (which replaces only an "
            "earlier pack); choose a new folder for --out",
            source=str(out),
            kind="not a pack",
            detail=reason,
        )
    if not force:
        raise PackExistsError(
            "exists already; choose another folder or pass --force to replace it",
            source=str(out),
            kind="exists",
        )


def is_review_pack(folder) -> bool:
    """Whether ``folder`` is an unchanged rheoline review pack that ``force`` may replace.

    A pack is a real folder (not a link) whose ``manifest.json`` says ``"tool":
    "rheoline"`` and lists the pack's files with their SHA-256 hashes, and which holds
    exactly those files (the :data:`PACK_FILES` and the copy of the scenario file), each a
    regular file matching its hash, and nothing else.

    Examples
    --------
    >>> import tempfile
    >>> is_review_pack(tempfile.gettempdir())
    False
    """
    folder = Path(folder)
    return folder.is_dir() and not folder.is_symlink() and not _not_a_pack_reason(folder)


def _read_manifest(folder: Path):
    """The manifest of a pack as a dict, or a reason why there is none."""
    path = folder / "manifest.json"
    if path.is_symlink() or not path.is_file():
        return None, "no manifest.json"
    if path.stat().st_size > _MAX_MANIFEST_BYTES:
        return None, "manifest.json is not one of ours"
    try:
        manifest = json.loads(path.read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError, ValueError):
        return None, "manifest.json is not one of ours"
    if not isinstance(manifest, dict) or manifest.get("tool") != "rheoline":
        return None, "manifest.json is not one of ours"
    listed = manifest.get("files_sha256")
    copy = manifest.get("scenario_copy")
    if (
        not isinstance(listed, dict)
        or not isinstance(copy, str)
        or not all(isinstance(k, str) and isinstance(v, str) for k, v in listed.items())
    ):
        return None, "manifest.json does not list the pack's files"
    return manifest, ""


def _not_a_pack_reason(folder: Path) -> str:
    """Why ``folder`` is not a replaceable review pack ("" when it is one)."""
    manifest, reason = _read_manifest(folder)
    if manifest is None:
        return reason
    listed = manifest["files_sha256"]
    copy = manifest["scenario_copy"]
    allowed = set(PACK_FILES) | set(NETWORK_PACK_FILES) | set(TIME_PACK_FILES) | {copy}
    expected = set(listed) | {"manifest.json"}
    if (
        not expected <= allowed
        or not copy.startswith("scenario-")
        or re.search(r"[^A-Za-z0-9._-]", copy)
    ):
        return "manifest.json lists files that are not a pack's"
    names = []
    with os.scandir(folder) as entries:
        for entry in entries:
            names.append(entry.name)
            if entry.name not in expected:
                return f"it holds {entry.name!r}, which is not a pack file"
            if entry.is_symlink() or not entry.is_file(follow_symlinks=False):
                return f"{entry.name!r} is not a regular file"
    missing = expected - set(names)
    if missing:
        return f"{sorted(missing)[0]!r} is missing"
    for name, digest in listed.items():
        if sha256_file(folder / name) != digest:
            return f"{name!r} was changed after the pack was written"
    return ""


def _pack_file_names(folder: Path):
    manifest, _ = _read_manifest(folder)
    return sorted(set(manifest["files_sha256"]) | {"manifest.json"})


def sha256_file(path: Path) -> str:
    """The SHA-256 hex digest of a file, read in blocks."""
    digest = hashlib.sha256()
    with path.open("rb") as fh:
        for block in iter(lambda: fh.read(1 << 20), b""):
            digest.update(block)
    return digest.hexdigest()

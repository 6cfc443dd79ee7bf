"""Write the scenario description as a scenario file (TOML or JSON).

The writer serializes a :class:`~rheoline.scenario.description.ScenarioSet` field by field,
in the order of :mod:`rheoline.scenario.schema`, each value as it was written (or, for a
value built in code, in its field's unit: :func:`rheoline.scenario.written_values.written_form`).
Reading what it writes gives an equal description: ``load -> dump -> load`` is the identity.

:func:`save_scenarios` writes atomically (a temporary file, then a rename) and never
replaces a file unless asked; :class:`OutputError` names the path when the system refuses.

Examples
--------
>>> from rheoline.scenario.reading import example_path, load_scenarios, loads_scenarios
>>> s = load_scenarios(example_path("bench-sweep"))
>>> loads_scenarios(dump_scenarios(s)) == s
True
>>> 'step = "25 cm"' in dump_scenarios(s)  # the range table as written
True
"""

from __future__ import annotations

import json
import os
import tempfile
from collections.abc import Mapping
from pathlib import Path

from rheoline.errors import OutputError  # OutputError re-exported
from rheoline.scenario.description import Axis, ScenarioSet, Value
from rheoline.scenario.schema import (
    FORMAT_VERSION,
    PART_FIELDS,
    PART_TOLERANCE_FIELDS,
    SCENARIO_FIELDS,
    SCENARIO_TOLERANCE_FIELDS,
)
from rheoline.scenario.transient_fields import transient_data
from rheoline.scenario.written_values import written_form

__all__ = [
    "OutputError",
    "output_error",
    "check_output_folder",
    "scenario_set_data",
    "scenario_data",
    "dump_scenarios",
    "save_scenarios",
]


def output_error(path, what: str, exc: OSError) -> OutputError:
    """An :class:`OutputError` for ``path`` from the operating system's ``exc``."""
    reason = exc.strerror or str(exc)
    err = OutputError(f"{what}: {reason}", source=str(path), reason=reason)
    err.errno = exc.errno
    return err


def check_output_folder(path: Path, kind: str = "file"):
    """Raise :class:`OutputError` unless the folder that is to hold ``path`` exists (for a
    ``kind`` of ``"file"``) or can be created (``"pack"``): no file stands in the way."""
    parent = path.parent if str(path.parent) else Path(".")
    if kind == "file" and not parent.is_dir():
        why = "is not a folder" if parent.exists() else "does not exist"
        raise OutputError(
            f"the folder {str(parent)!r} {why}; choose an existing folder", source=str(path)
        )
    for folder in (parent, *parent.parents):
        if folder.exists():
            if not folder.is_dir():
                raise OutputError(
                    f"{str(folder)!r} is a file, not a folder; choose another place",
                    source=str(path),
                )
            return


# --------------------------------------------------------------------------- plain data
def scenario_set_data(sset: ScenarioSet) -> dict:
    """The set as the plain data of a scenario file (a dict ready for TOML or JSON)."""
    doc = {"format_version": FORMAT_VERSION}
    if sset.title:
        doc["title"] = sset.title
    if sset.notes:
        doc["notes"] = sset.notes
    doc["scenario"] = [scenario_data(s) for s in sset.scenarios]
    return doc


def scenario_data(sc) -> dict:
    """One :class:`~rheoline.scenario.description.Scenario` as a ``[[scenario]]`` table."""
    out = {"name": sc.name}
    if sc.notes:
        out["notes"] = sc.notes
    for group in sc.groups():
        for key, field in group.items():
            out[key] = _plain(field, SCENARIO_FIELDS[key])
    if not sc.model_band:
        out["model_band"] = False
    if sc.tolerance is not None:
        out["tolerance"] = {
            key: _plain(field, SCENARIO_TOLERANCE_FIELDS[key])
            for key, field in sc.tolerance.items()
        }
    out.update(transient_data(sc))  # the time solve's lists and tables
    if sc.topology is not None:  # a branched scenario: its nodes and branches
        from rheoline.scenario.topology_reading import topology_data

        out.update(topology_data(sc.topology, _plain, _part_data))
    else:
        out["part"] = [_part_data(p) for p in sc.parts]
    return out


def _part_data(part) -> dict:
    out = {"type": part.type}
    if part.label:
        out["label"] = part.label
    specs = PART_FIELDS[part.type]
    for key, field in part.fields.items():
        out[key] = _plain(field, specs[key])
    if part.tolerance:
        out["tolerance"] = {
            key: _written(w.written, PART_TOLERANCE_FIELDS[key], (w.kind, w.width))
            for key, w in part.tolerance.items()
        }
    return out


def _plain(field, spec):
    """A field as the file holds it: as written, or in the field's unit."""
    if isinstance(field, Value):
        return _written(field.written, spec, field.si)
    if not isinstance(field, Axis):
        raise TypeError(f"a field is a Value or an Axis, got {type(field).__name__}")
    if isinstance(field.written, Mapping):
        return dict(field.written)
    if field.written is not None:
        return list(field.written)
    return [written_form(spec, v) for v in field.values]


def _written(written, spec, si):
    if written is None:
        return written_form(spec, si)
    return list(written) if isinstance(written, tuple) else written


# --------------------------------------------------------------------------- text and files
def dump_scenarios(sset: ScenarioSet, fmt: str = "toml") -> str:
    """Write a scenario set as TOML (or JSON) text that ``loads_scenarios`` reads back equal."""
    doc = scenario_set_data(sset)
    if fmt == "json":
        return json.dumps(doc, indent=2, ensure_ascii=False, allow_nan=False) + "\n"
    import tomli_w

    return tomli_w.dumps(doc)


def save_scenarios(sset: ScenarioSet, path, force: bool = False) -> Path:
    """Write ``sset`` to ``path`` atomically (temporary file, then rename).

    JSON for a ``.json`` path, TOML otherwise.  An existing file is kept unless ``force``
    is true.

    Raises
    ------
    OutputError
        When ``path`` exists and ``force`` is false (``err.field`` "force", ``err.reason``
        "exists already": a caller words its own way to replace it), or when ``path`` is a folder or not a regular file, its folder does not exist, or the
        system refuses the write (the reason named); nothing is left behind.
    """
    path = Path(path)
    if path.is_dir():
        raise OutputError(
            "is a folder; give a file name, such as scenarios.toml inside it", source=str(path)
        )
    if path.exists() and not force:
        raise OutputError(
            "exists already; choose another name or pass force=True",
            source=str(path),
            reason="exists already",
            field="force",
        )
    if path.exists() and not path.is_file():
        raise OutputError("exists and is not a regular file; choose another name", source=str(path))
    check_output_folder(path, "file")
    text = dump_scenarios(sset, fmt="json" if path.suffix.lower() == ".json" else "toml")
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent or ".")
    except OSError as exc:
        raise output_error(path, "cannot write the scenario file", exc) from None
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="\n") as fh:
            fh.write(text)
        os.replace(tmp, path)
    except BaseException as exc:
        Path(tmp).unlink(missing_ok=True)
        if isinstance(exc, OSError):
            raise output_error(path, "cannot write the scenario file", exc) from None
        raise
    return path

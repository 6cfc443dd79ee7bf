"""Counts kept by the reliability tests (examples tried, grid points, files fuzzed).

The tests print nothing.  Each reliability test module bumps counters here and, at the end
of the module, merges them into ``reliability_figures.json`` under pytest's base temporary
directory, so a dedicated run (``python -m pytest --basetemp=DIR tests/test_rel_*.py``)
leaves the figures quoted in README's "Reliability" section in ``DIR``.
"""

from __future__ import annotations

import collections
import json

import pytest

COUNTS: collections.Counter = collections.Counter()

FIGURES_FILE = "reliability_figures.json"


def bump(key: str, n: int = 1) -> None:
    """Add ``n`` to the counter ``key``."""
    COUNTS[key] += int(n)


def merge_into(tmp_path_factory, section: str, data: dict) -> None:
    """Merge ``data`` into the section ``section`` of the figures file."""
    path = tmp_path_factory.getbasetemp() / FIGURES_FILE
    figures = json.loads(path.read_text()) if path.exists() else {}
    figures.setdefault(section, {}).update(data)
    path.write_text(json.dumps(figures, indent=2, sort_keys=True))


def module_recorder(section: str, prefix: str):
    """A module-scoped autouse fixture that records the counters starting with ``prefix``."""

    @pytest.fixture(scope="module", autouse=True)
    def _record(tmp_path_factory):
        yield
        data = {k[len(prefix) :]: v for k, v in COUNTS.items() if k.startswith(prefix)}
        merge_into(tmp_path_factory, section, data)

    return _record


def hostile_scenario_file(title, name, tube_label, catheter_label, notes="", scenario_notes=""):
    """A valid scenario file (TOML text) whose free-text fields carry the given strings."""
    import json as _json

    def q(text):
        return _json.dumps(text)  # a JSON string is a valid TOML basic string

    top = f"title = {q(title)}\n" + (f"notes = {q(notes)}\n" if notes else "")
    sc_notes = f"notes = {q(scenario_notes)}\n" if scenario_notes else ""
    return (
        f"format_version = 1\n{top}\n[[scenario]]\nname = {q(name)}\n{sc_notes}"
        'fluid = "saline-0.9"\nhead = "1 m"\n\n'
        f'[[scenario.part]]\ntype = "tube"\nlabel = {q(tube_label)}\n'
        'inner_diameter = "3 mm"\nlength = "1.8 m"\n\n'
        f'[[scenario.part]]\ntype = "catheter"\ngauge = 18\nlabel = {q(catheter_label)}\n'
    )


def upload(files_view, name, content: bytes) -> None:
    """Give the files view's upload button ``content`` as a file called ``name`` (as the
    browser does); its observer loads it at once."""
    import datetime

    files_view.upload.value = (
        {
            "name": name,
            "type": "",
            "size": len(content),
            "content": memoryview(content),
            "last_modified": datetime.datetime.now(datetime.UTC),
        },
    )

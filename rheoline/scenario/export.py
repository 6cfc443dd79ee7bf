"""Review packs: a folder an engineer can hand to a device review.

:func:`write_pack` writes, for one run of a scenario set (a
:class:`rheoline.scenario.compare.RunResult`):

- ``results.csv``: the comparison table, a row per scenario or sweep point;
- ``parts.csv``: a row per part of every line (pressure drop, Reynolds number, shear);
- ``assumptions.csv``: the models the run used, with their references (generated from the
  run's ``models_used`` and the provenance registry, :mod:`rheoline.scenario.pack_sources`);
- ``model-evidence.csv``: how close the fluids, part kinds and models behind the run came
  to packaged measurements (:mod:`rheoline.scenario.pack_evidence`; also a workbook sheet
  and a section of the report);
- ``results.xlsx``: sheets *results*, *parts*, *scenario inputs* (the scenario description
  echoed field by field), *assumptions* (as ``assumptions.csv``), *model evidence* (as
  ``model-evidence.csv``), *cautions* and *about*;
- ``report.html``: one self-contained page (plotly charts embedded, no network needed) with
  the caution at the top, the results, the inputs echoed, the tool version, the date and
  the SHA-256 hash of the scenario file;
- a byte-for-byte copy of the scenario file, and ``manifest.json`` (tool version, date, input
  hash, the provenance keys of the models used, caution, and the SHA-256 hash of every file).

Every file carries the caution text :data:`rheoline.CAUTION` (the first row of each CSV file
and sheet, the top of the HTML page, a field of the manifest).

The work is shared by idea:

- :mod:`rheoline.scenario.pack_folder`: the folder (atomic build-then-rename, ``force``
  replaces only an unchanged earlier pack, :func:`is_review_pack`);
- :mod:`rheoline.scenario.pack_tables`: spreadsheet-safe cells
  (:func:`neutralize_cell`), the CSV and XLSX writers;
- :mod:`rheoline.scenario.pack_report`: the HTML report (every text escaped);
- :mod:`rheoline.scenario.pack_sources`: the models used with their references, the
  cautions and the run's notes;
- :mod:`rheoline.scenario.pack_network`: a run with branched lines adds ``branches.csv``
  and ``nodes.csv`` (and the workbook's sheets and the report's section of the same name).
- :mod:`rheoline.scenario.pack_time`: a run with the time solve adds ``time-series.csv``
  (and the workbook's sheet "time series") and the report's time plots.
"""

from __future__ import annotations

import datetime as _dt
import hashlib
import json
import os
import re
from pathlib import Path

from rheoline.errors import OutputError, PackExistsError  # re-exported from here
from rheoline.scenario import (
    pack_evidence,
    pack_network,
    pack_report,
    pack_sources,
    pack_tables,
    pack_time,
)
from rheoline.scenario.files import output_error
from rheoline.scenario.pack_folder import (
    PACK_FILES,
    check_target,
    is_review_pack,
    write_folder_atomically,
)
from rheoline.scenario.pack_report import frame_html
from rheoline.scenario.pack_tables import neutralize_cell, neutralize_frame

__all__ = [
    "PackExistsError",
    "OutputError",
    "write_pack",
    "is_review_pack",
    "check_target",
    "pack_metadata",
    "neutralize_cell",
    "neutralize_frame",
    "frame_html",
    "PACK_FILES",
]


def _caution():
    from rheoline import CAUTION

    return CAUTION


def write_pack(run, out_dir, force: bool = False) -> Path:
    """Write the review pack of ``run`` into the folder ``out_dir``.

    Parameters
    ----------
    run : rheoline.scenario.compare.RunResult
        A solved scenario set.
    out_dir : str or os.PathLike
        The pack's folder; it must not exist unless ``force`` is true.
    force : bool
        Replace an existing pack (only once the new one is complete).

    Returns
    -------
    pathlib.Path
        The pack's folder.

    Raises
    ------
    PackExistsError
        When ``out_dir`` exists and ``force`` is false, or it is not an earlier pack.
    rheoline.scenario.files.OutputError
        When the pack cannot be written there (a file in the way, no permission, a full
        disk): a ScenarioError and an OSError, naming the folder and the reason.  Any
        earlier pack is kept as it was.
    """
    out = Path(out_dir)
    try:
        return write_folder_atomically(out, force, lambda folder: _write_all(run, folder))
    except OutputError:
        raise
    except OSError as exc:
        raise output_error(out, "cannot write the review pack", exc) from exc


def _write_all(run, folder: Path):
    """Every file of the pack into ``folder``, the manifest last."""
    caution = _caution()
    title_row = "caution: " + caution
    meta = pack_metadata(run)
    assumptions = pack_sources.assumptions_table(meta["models_used"])
    copy_name, scenario_text = _write_scenario_copy(run.scenario_set, folder)
    pack_tables.write_csv(run.table, folder / "results.csv", title_row)
    pack_tables.write_csv(run.parts, folder / "parts.csv", title_row)
    pack_tables.write_csv(assumptions, folder / "assumptions.csv", title_row)
    evidence = pack_evidence.evidence_table(run)
    pack_tables.write_csv(evidence, folder / "model-evidence.csv", title_row)
    for name, frame in pack_network.network_frames(run).items():  # branched lines only
        pack_tables.write_csv(frame, folder / f"{name}.csv", title_row)
    time_frames = pack_time.time_frames(run)  # the time solve only
    for name, frame in time_frames.items():
        pack_tables.write_csv(frame, folder / f"{name}.csv", title_row)
    cautions = pack_sources.cautions_list(run, caution)
    sheets = {}
    for name, frame in _sheets(run, meta, assumptions, cautions).items():
        sheets[name] = frame
        if name == "assumptions":  # the evidence for those models next to them
            sheets["model evidence"] = evidence
        if name == "parts":  # a time solve's series after the results and parts
            sheets.update((n.replace("-", " "), f) for n, f in time_frames.items())
    pack_tables.write_xlsx(folder / "results.xlsx", sheets, title_row)
    page = pack_report.report_html(
        run,
        meta,
        assumptions=assumptions,
        cautions=cautions[1:],
        notes=pack_sources.run_notes(run),
        scenario_text=scenario_text,
        caution=caution,
        evidence=evidence,
    )
    pack_report.write_html(folder / "report.html", page)
    files = {p.name: hashlib.sha256(p.read_bytes()).hexdigest() for p in sorted(folder.iterdir())}
    manifest = {**meta, "scenario_copy": copy_name, "files_sha256": files}
    (folder / "manifest.json").write_text(json.dumps(manifest, indent=2), encoding="utf-8")


def _sheets(run, meta, assumptions, cautions):
    """The workbook's sheets, in order: name -> DataFrame."""
    import pandas as pd

    about = {k: ", ".join(v) if isinstance(v, list) else str(v) for k, v in meta.items()}
    return {
        "results": run.table,
        "parts": run.parts,
        **pack_network.network_frames(run),
        "scenario inputs": run.inputs,
        "assumptions": assumptions,
        "cautions": pd.DataFrame({"caution": cautions}),
        "about": pd.DataFrame({"item": list(about), "value": list(about.values())}),
    }


def _write_scenario_copy(sset, folder: Path):
    """The scenario file into the pack, byte for byte where its bytes are known.

    Returns the copy's name and the file's text (for the report's echo).
    """
    copy_name = "scenario-" + _safe_filename(
        sset.source if sset.source.endswith((".toml", ".json")) else "scenarios.toml"
    )
    text = sset.text
    if not text:
        from rheoline.scenario.files import dump_scenarios

        text = dump_scenarios(sset)
    if sset.raw:
        (folder / copy_name).write_bytes(sset.raw)  # byte for byte, as given
    else:
        (folder / copy_name).write_text(text, encoding="utf-8", newline="")
    return copy_name, text


def pack_metadata(run):
    """What every pack records about itself: the toolkit and its version, the date, the
    scenario file and its SHA-256 hash, the size of the run, the provenance keys of the
    models it used (``models_used``, first-use order) and the caution."""
    from rheoline import __version__

    sset = run.scenario_set
    digest = sset.sha256 or hashlib.sha256(sset.raw or sset.text.encode("utf-8")).hexdigest()
    created = getattr(run, "created", None) or _dt.datetime.now(_dt.UTC)
    return {
        "tool": "rheoline",
        "version": __version__,
        "created_utc": created.strftime("%Y-%m-%dT%H:%M:%SZ"),
        "scenario_file": sset.source,
        "input_sha256": digest,
        "scenarios": len(sset.scenarios),
        "rows": int(len(run.table)),
        "models_used": list(dict.fromkeys(run.models_used)),
        "caution": _caution(),
    }


def _safe_filename(name: str) -> str:
    base = os.path.basename(name)
    base = re.sub(r"[^A-Za-z0-9._-]", "_", base).lstrip(".") or "scenarios.toml"
    return base[:80]

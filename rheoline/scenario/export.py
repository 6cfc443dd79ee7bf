"""Review packs: a folder an engineer can hand to a device review.

:func:`write_pack` writes, for one run of a scenario set (a
:class:`rheoline.scenario.compare.RunResult`):

- ``results.csv``: the comparison table, a row per scenario or sweep point;
- ``parts.csv``: a row per part of every line (pressure drop, Reynolds number, shear);
- ``results.xlsx``: sheets *results*, *parts*, *scenario inputs*, *assumptions* (the models
  used with their references) and *cautions*;
- ``report.html``: one self-contained page (plotly charts embedded, no network needed) with
  the cautions at the top, the results, the inputs echoed, the tool version, the date and
  the SHA-256 hash of the scenario file;
- a byte-for-byte copy of the scenario file, and ``manifest.json`` (file hashes).

Every file carries the caution text :data:`rheoline.CAUTION` (the first row of each CSV file
and sheet, the top of the HTML page).

Safe to hand around:

- text from scenario files is HTML-escaped in the report;
- text cells that a spreadsheet would run as a formula (starting with ``=``, ``+``, ``-``,
  ``@``, tab or carriage return) get a leading apostrophe, and control characters are
  replaced, in CSV and XLSX alike (:func:`neutralize_cell`);
- the pack is built in a temporary folder beside the target and renamed into place, so a
  failure leaves no half-written pack; an existing pack is replaced only with ``force=True``,
  and then only after the new one is complete;
- ``force`` replaces only an earlier review pack (:func:`is_review_pack`: its
  ``manifest.json`` names rheoline, and the folder holds the pack's own files, unchanged, and
  nothing else).  Any other folder (a user's documents, a home folder, a pack with files
  added or edited) is refused with :class:`PackExistsError` and left as it is; the old pack
  is removed file by file, never with a recursive delete.
"""

from __future__ import annotations

import csv
import datetime as _dt
import hashlib
import html
import json
import math
import os
import re
import shutil
import tempfile
from pathlib import Path

from rheoline.errors import OutputError, PackExistsError  # re-exported from here
from rheoline.scenario.files import check_output_folder, output_error

__all__ = [
    "PackExistsError",
    "OutputError",
    "write_pack",
    "is_review_pack",
    "neutralize_cell",
    "neutralize_frame",
    "PACK_FILES",
]

#: The files of a pack (besides the copy of the scenario file).
PACK_FILES = ("results.csv", "parts.csv", "results.xlsx", "report.html", "manifest.json")

_FORMULA_START = ("=", "+", "-", "@", "\t", "\r", "\n")
_CONTROL = re.compile(r"[\x00-\x08\x0b\x0c\x0e-\x1f\x7f]")


def neutralize_cell(value):
    """Make a cell safe for a spreadsheet: no formula, no control characters.

    Strings starting with ``=``, ``+``, ``-``, ``@``, tab, carriage return or line feed get a
    leading apostrophe (shown as text by spreadsheet programs, OWASP's advice for CSV
    injection); other control characters become U+FFFD.  Numbers pass unchanged.

    Examples
    --------
    >>> neutralize_cell("=HYPERLINK(\\"http://x\\")")
    '\\'=HYPERLINK("http://x")'
    >>> neutralize_cell("18G catheter"), neutralize_cell(-3.5)
    ('18G catheter', -3.5)
    """
    if not isinstance(value, str):
        return value
    value = _CONTROL.sub("\ufffd", value)
    if value.startswith(_FORMULA_START):
        value = "'" + value
    return value


def neutralize_frame(frame):
    """A copy of a DataFrame with every text cell and column name neutralized."""
    out = frame.copy()
    out.columns = [neutralize_cell(str(c)) for c in out.columns]
    for col in out.columns:
        if out[col].dtype == object or str(out[col].dtype) in ("string", "str"):
            out[col] = out[col].map(neutralize_cell).astype(object)
    return out


def _caution():
    from rheoline import CAUTION

    return CAUTION


# --------------------------------------------------------------------------- the pack
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
        return _write_pack(run, out, force)
    except OutputError:
        raise
    except OSError as exc:
        raise output_error(out, "cannot write the review pack", exc) from exc


def _write_pack(run, out: Path, force: bool) -> Path:
    check_target(out, force)
    parent = out.parent if str(out.parent) else Path(".")
    parent.mkdir(parents=True, exist_ok=True)
    tmp = Path(tempfile.mkdtemp(prefix=f".{out.name}.", suffix=".partial", dir=parent))
    old = old_files = None
    try:
        os.chmod(tmp, 0o777 & ~_umask())  # mkdtemp makes it private; a pack is shared
        _write_all(run, tmp)
        if os.path.lexists(out):
            # checked again now that the new pack is ready: the folder may have changed
            # while the run was written; only ever move aside an unchanged earlier pack
            check_target(out, force)
            old_files = _pack_file_names(out)
            old = Path(tempfile.mkdtemp(prefix=f".{out.name}.", suffix=".old", dir=parent))
            os.rmdir(old)
            os.replace(out, old)
        os.replace(tmp, out)
    except BaseException:
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
    """
    out = Path(out)
    check_output_folder(out, "pack")
    if out.is_symlink():
        raise PackExistsError(
            "is a symbolic link; rheoline does not replace links (nor "
            "what they point to); choose a new folder for --out",
            source=str(out),
        )
    if not out.exists():
        return
    if not out.is_dir():
        raise PackExistsError("exists and is not a folder; choose another --out", source=str(out))
    reason = _not_a_pack_reason(out)
    if reason:
        raise PackExistsError(
            f"exists and is not a rheoline review pack ({reason}); it is "
            "left as it is, even with --force (which replaces only an "
            "earlier pack); choose a new folder for --out",
            source=str(out),
        )
    if not force:
        raise PackExistsError(
            "exists already; choose another folder or pass --force to replace it", source=str(out)
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
    if path.stat().st_size > 1_000_000:
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
    allowed = set(PACK_FILES) | {manifest["scenario_copy"]}
    expected = set(listed) | {"manifest.json"}
    copy = manifest["scenario_copy"]
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
        if _sha256_file(folder / name) != digest:
            return f"{name!r} was changed after the pack was written"
    return ""


def _pack_file_names(folder: Path):
    manifest, _ = _read_manifest(folder)
    return sorted(set(manifest["files_sha256"]) | {"manifest.json"})


def _sha256_file(path: Path) -> str:
    digest = hashlib.sha256()
    with path.open("rb") as fh:
        for block in iter(lambda: fh.read(1 << 20), b""):
            digest.update(block)
    return digest.hexdigest()


def _write_all(run, folder: Path):
    meta = pack_metadata(run)
    sset = run.scenario_set
    copy_name = "scenario-" + _safe_filename(
        sset.source if sset.source.endswith((".toml", ".json")) else "scenarios.toml"
    )
    if sset.raw:
        (folder / copy_name).write_bytes(sset.raw)  # byte for byte, as given
    else:
        from rheoline.scenario.files import dump_scenarios

        (folder / copy_name).write_text(
            sset.text or dump_scenarios(sset), encoding="utf-8", newline=""
        )
    _write_csv(run.table, folder / "results.csv")
    _write_csv(run.parts, folder / "parts.csv")
    _write_xlsx(run, folder / "results.xlsx", meta)
    _write_html(run, folder / "report.html", meta)
    files = {}
    for p in sorted(folder.iterdir()):
        files[p.name] = hashlib.sha256(p.read_bytes()).hexdigest()
    manifest = {**meta, "scenario_copy": copy_name, "files_sha256": files}
    (folder / "manifest.json").write_text(json.dumps(manifest, indent=2), encoding="utf-8")


def pack_metadata(run):
    """Tool version, date, input hash and caution recorded in every pack."""
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
        "caution": _caution(),
    }


def _safe_filename(name: str) -> str:
    base = os.path.basename(name)
    base = re.sub(r"[^A-Za-z0-9._-]", "_", base).lstrip(".") or "scenarios.toml"
    return base[:80]


# --------------------------------------------------------------------------- CSV and XLSX
def _csv_value(v):
    if isinstance(v, float) and not math.isfinite(v):
        return ""
    return neutralize_cell(v)


def _write_csv(frame, path: Path):
    """CSV with the caution on its first line, then a header row; numbers as numbers."""
    safe = neutralize_frame(frame)
    with path.open("w", encoding="utf-8", newline="") as fh:
        w = csv.writer(fh)
        w.writerow([neutralize_cell("caution: " + _caution())])
        w.writerow(list(safe.columns))
        for row in safe.itertuples(index=False):
            w.writerow([_csv_value(_py(v)) for v in row])


def _py(v):
    """numpy scalars to Python scalars; missing values to None."""
    if hasattr(v, "item") and not isinstance(v, str):
        try:
            v = v.item()
        except (ValueError, AttributeError):
            pass
    if v is None:
        return None
    try:
        import pandas as pd

        if pd.isna(v):
            return None
    except (TypeError, ValueError):
        pass
    return v


def _xlsx_value(v):
    v = _py(v)
    if isinstance(v, float) and not math.isfinite(v):
        return None
    if isinstance(v, (bool, int, float)) or v is None:
        return v
    return neutralize_cell(str(v))


def _write_sheet(ws, frame, title_row):
    from openpyxl.styles import Font

    ws.append([neutralize_cell(title_row)])
    ws["A1"].font = Font(bold=True)
    ws.append([neutralize_cell(str(c)) for c in frame.columns])
    for cell in ws[2]:
        cell.font = Font(bold=True)
    for row in frame.itertuples(index=False):
        ws.append([_xlsx_value(v) for v in row])
    ws.freeze_panes = "A3"
    for col in ws.columns:
        width = max((len(str(c.value)) for c in col[1:] if c.value is not None), default=8)
        ws.column_dimensions[col[0].column_letter].width = min(max(width + 2, 8), 60)


def _write_xlsx(run, path: Path, meta):
    import pandas as pd
    from openpyxl import Workbook

    caution = "caution: " + _caution()
    wb = Workbook()
    ws = wb.active
    ws.title = "results"
    _write_sheet(ws, run.table, caution)
    _write_sheet(wb.create_sheet("parts"), run.parts, caution)
    _write_sheet(wb.create_sheet("scenario inputs"), run.inputs, caution)
    _write_sheet(wb.create_sheet("assumptions"), run.assumptions, caution)
    cautions = pd.DataFrame({"caution": cautions_list(run)})
    _write_sheet(wb.create_sheet("cautions"), cautions, caution)
    about = pd.DataFrame({"item": list(meta), "value": [str(v) for v in meta.values()]})
    _write_sheet(wb.create_sheet("about"), about, caution)
    for sheet in wb.worksheets:  # every cell: no formula may survive
        for row in sheet.iter_rows():
            for cell in row:
                if cell.data_type == "f":  # pragma: no cover - neutralize_cell prevents it
                    cell.value = "'" + str(cell.value)
                    cell.data_type = "s"
    wb.save(path)


def cautions_list(run):
    """The cautions of a pack: the short caution, the hazards, and this run's flags."""
    items = [
        _caution(),
        "Air embolism: pressure bags, infusers and emptying bags can push air into a vein; "
        "nothing here accounts for air in the line.",
        "Extravasation: higher pressure makes infiltration worse and is not visible in a flow "
        "estimate.",
        "Over-pressure: compare the required pressure with the rating of every part; rheoline "
        "knows only the limit you give.",
        "Hemolysis: the indicator is a screening flag from a laboratory correlation "
        "(Giersiepen 1990), not a prediction in a patient.",
        "Cold blood products flow far more slowly and can cool a patient; warm only with "
        "approved warmers and per protocol.",
        "Occlusion: kinks, clots, closed clamps and clogged filters are not modelled.",
        "Flagged results (turbulent or transitional flow, developing flow, correlations outside "
        "their range) need a bench test.",
        "Catalogue dimensions are typical nominal values, not a particular maker's; some are "
        "recalled from memory.",
    ]
    items += [f"This run: {w}" for w in getattr(run, "warnings", ())]
    return items


# --------------------------------------------------------------------------- HTML
_CSS = """
body{font-family:system-ui,-apple-system,'Segoe UI',sans-serif;margin:1.5rem auto;max-width:72rem;
color:#1b1b1b;line-height:1.4;padding:0 1rem}
.caution{border:2px solid #8a5a00;background:#fff6e0;padding:.8rem 1rem;margin-bottom:1.2rem}
table{border-collapse:collapse;font-size:.85rem;margin:.5rem 0 1.5rem}
th,td{border:1px solid #c8c8c8;padding:.25rem .45rem;text-align:left;vertical-align:top}
th{background:#eef1f4}td.num{text-align:right;font-variant-numeric:tabular-nums}
pre{background:#f4f4f4;padding:.8rem;overflow-x:auto;font-size:.8rem}
.meta td:first-child{font-weight:600}.scroll{overflow-x:auto}
td:first-child{white-space:nowrap}details{margin-bottom:1.5rem}
"""


def _e(text) -> str:
    return html.escape(str(text), quote=True)


def _visible_format_characters(text: str) -> str:
    """Invisible format characters (bidirectional overrides, zero-width spaces...) shown as
    ``[U+202E]``, so the echoed scenario file (its comments too) reads as it is stored.
    The zero-width joiner and non-joiner are kept.

    >>> _visible_format_characters("a\u202eb\u200dc")
    'a[U+202E]b\u200dc'
    """
    import unicodedata

    return "".join(
        f"[U+{ord(c):04X}]" if unicodedata.category(c) == "Cf" and c not in "\u200c\u200d" else c
        for c in text
    )


def _cell_html(v):
    v = _py(v)
    if v is None:
        return "<td></td>"
    if isinstance(v, bool):
        return f"<td>{'yes' if v else 'no'}</td>"
    if isinstance(v, int):
        return f'<td class="num">{v}</td>'
    if isinstance(v, float):
        text = f"{v:,.0f}" if abs(v) >= 1e4 and math.isfinite(v) else f"{v:.4g}"
        return f'<td class="num">{text}</td>'
    return f"<td>{_e(v)}</td>"


def frame_html(frame, max_rows: int = 2000) -> str:
    """An escaped HTML table of a DataFrame (every cell and header through html.escape)."""
    head = "".join(f"<th>{_e(c)}</th>" for c in frame.columns)
    rows = []
    for row in frame.head(max_rows).itertuples(index=False):
        rows.append("<tr>" + "".join(_cell_html(v) for v in row) + "</tr>")
    more = ""
    if len(frame) > max_rows:
        more = f"<p>{len(frame) - max_rows} more rows in results.csv.</p>"
    return (
        f'<div class="scroll"><table><thead><tr>{head}</tr></thead><tbody>'
        + "".join(rows)
        + "</tbody></table></div>"
        + more
    )


def _figures(run):
    """Plotly figures of the run: flow per case, and the pressure budget of each line."""
    import numpy as np
    import plotly.graph_objects as go

    table = run.table
    figs = []
    if len(table) == 0:
        return figs
    names = [_e(n) for n in table["case"]]
    flow = table["flow [mL/min]"]
    fig = go.Figure(
        go.Bar(
            x=flow,
            y=names,
            orientation="h",
            marker_color="#2f6f8f",
            hovertemplate="%{y}<br>%{x:.4g} mL/min<extra></extra>",
        )
    )
    fig.update_layout(
        title="Flow per case [mL/min]",
        xaxis_title="flow [mL/min]",
        height=max(300, 22 * len(names) + 120),
        margin={"l": 10, "r": 10},
        yaxis={"autorange": "reversed", "automargin": True},
    )
    figs.append(fig)
    parts = run.parts
    if len(parts):
        fig2 = go.Figure()
        # one trace per part of a line: a swept part keeps one colour (its rows name each
        # point's own size, shown on hover)
        keys = list(getattr(run, "part_keys", ()) or ())
        keys = np.asarray(keys if len(keys) == len(parts) else parts["part"], dtype=object)
        for key in dict.fromkeys(keys):
            sub = parts[keys == key]
            fig2.add_bar(
                x=sub["pressure drop [mmHg]"],
                y=[_e(c) for c in sub["case"]],
                orientation="h",
                name=_e(key),
                hovertext=[_e(p) for p in sub["part"]],
                hovertemplate="%{hovertext}<br>%{y}<br>%{x:.4g} mmHg<extra></extra>",
            )
        fig2.update_layout(
            barmode="stack",
            title="Pressure budget per part [mmHg]",
            xaxis_title="pressure drop [mmHg]",
            height=max(300, 22 * len(names) + 120),
            margin={"l": 10, "r": 10},
            yaxis={"autorange": "reversed", "automargin": True},
        )
        figs.append(fig2)
    return figs


def _write_html(run, path: Path, meta):
    import plotly.io as pio

    sset = run.scenario_set
    title = sset.title or "rheoline review pack"
    charts = []
    for i, fig in enumerate(_figures(run)):
        charts.append(
            pio.to_html(
                fig,
                include_plotlyjs=(i == 0),
                full_html=False,
                config={"displaylogo": False, "responsive": True},
            )
        )
    meta_rows = "".join(
        f"<tr><td>{_e(k)}</td><td>{_e(v)}</td></tr>" for k, v in meta.items() if k != "caution"
    )
    cautions = "".join(f"<li>{_e(c)}</li>" for c in cautions_list(run)[1:])
    text = sset.text
    if not text:
        from rheoline.scenario.files import dump_scenarios

        text = dump_scenarios(sset)
    notes = f"<p>{_e(sset.notes)}</p>" if sset.notes else ""
    run_notes = getattr(run, "warnings", ())
    notes_html = (
        (
            "<h3>Notes from the models</h3><ul>"
            + "".join(f"<li>{_e(w)}</li>" for w in run_notes)
            + "</ul>"
        )
        if run_notes
        else ""
    )
    body = f"""<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>{_e(title)}</title><style>{_CSS}</style></head>
<body>
<div class="caution" id="caution" role="note"><strong>Caution.</strong> {_e(_caution())}</div>
<h1>{_e(title)}</h1>
{notes}
<table class="meta">{meta_rows}</table>
<h2>Results</h2>
{frame_html(run.summary()) if hasattr(run, "summary") else ""}
{notes_html}
<details><summary>Every column (as in results.csv)</summary>
{frame_html(run.table)}
</details>
<h2>Charts</h2>
{"".join(charts)}
<h2>Parts of each line</h2>
{frame_html(run.parts)}
<h2>Scenario inputs</h2>
{frame_html(run.inputs)}
<h2>Assumptions and models used</h2>
{frame_html(run.assumptions)}
<h2>Cautions</h2>
<ul>{cautions}</ul>
<h2>Scenario file as given</h2>
<p>{_e(sset.source)}, SHA-256 {_e(meta["input_sha256"])}</p>
<pre>{_e(_visible_format_characters(text))}</pre>
<p>rheoline {_e(meta["version"])}, {_e(meta["created_utc"])}. {_e(_caution())}</p>
</body></html>
"""
    path.write_text(body, encoding="utf-8")

"""The validation report: a markdown summary, an HTML report, SVG plots and a CSV of rows.

The content is built once as sections of paragraphs and tables (rendered from the
:class:`~rheoline.validation.run.ValidationResult`), then written as markdown and as
HTML; both carry :data:`rheoline.CAUTION`.
"""

from __future__ import annotations

import csv
import io
import math
from dataclasses import dataclass, field
from html import escape
from pathlib import Path

from rheoline.validation.plots import scatter_svg
from rheoline.validation.run import EVIDENCE, ValidationResult

__all__ = ["Section", "report_sections", "render_markdown", "render_html", "write_report"]

#: Files :func:`write_report` writes (and only these).
REPORT_FILES = (
    "validation-summary.md",
    "validation-report.html",
    "validation-rows.csv",
    "plot-viscosity.svg",
    "plot-flow.svg",
    "plot-blood-models.svg",
)


@dataclass
class Section:
    """A heading, paragraphs and optional tables (header, rows of cell texts)."""

    title: str
    paragraphs: list = field(default_factory=list)
    tables: list = field(default_factory=list)


def _pct(v: float) -> str:
    return "-" if v is None or math.isnan(v) else f"{100 * v:.1f} %"


def _num(v: float) -> str:
    return "-" if math.isnan(v) else f"{v:.4g}"


def _stats_cells(s) -> list:
    if not s.validated:
        return ["0", "unvalidated", "-", "-"]
    return [str(s.n), _pct(s.median_abs_error), _pct(s.max_abs_error), _pct(s.median_error)]


def _caution() -> str:
    from rheoline import CAUTION

    return CAUTION


def _conditions(r) -> str:
    parts = [r.fluid]
    if not math.isnan(r.hematocrit):
        parts.append(f"H {r.hematocrit:g}")
    if not math.isnan(r.temperature_c):
        parts.append(f"{r.temperature_c:g} degC")
    if not math.isnan(r.shear_rate):
        parts.append(f"{r.shear_rate:g} 1/s")
    if r.quantity == "flow":
        parts.append(
            f"{r.geometry} {r.inner_diameter_mm:g} mm x {r.length_mm:g} mm, head {r.drive_value:g} m"
        )
    return ", ".join(parts)


def _target_section(result: ValidationResult) -> Section:
    rows = [
        [
            t.target.description,
            *_stats_cells(t.stats)[:3],
            f"median <= {_pct(t.target.median_limit)}, max <= {_pct(t.target.max_limit)}",
            t.status,
            EVIDENCE[t.evidence],
        ]
        for t in result.targets
    ]
    verdict = _verdict(result)
    untargeted = [
        [key, _family(result, key), *_stats_cells(s)] for key, s in result.untargeted.items()
    ]
    tables = [
        (
            ["target", "rows", "median abs. error", "max abs. error", "limits", "status"]
            + ["evidence"],
            rows,
        )
    ]
    if untargeted:
        tables.append(
            (
                ["held-out data set (no target)", "family", "rows", "median abs. error"]
                + ["max abs. error", "median error"],
                untargeted,
            )
        )
    return Section(
        "Stated accuracy",
        [
            verdict + " Errors are relative: (predicted - measured) / measured, over rows "
            "that were predicted and are not recalled.  'no data' means no packaged "
            "measurement covers the target: the toolkit's accuracy there is unvalidated.  "
            "Held-out rows no target covers are listed after the targets: shown, not judged."
        ],
        tables,
    )


def _family(result: ValidationResult, key: str) -> str:
    return next(d.source.family for d in result.datasets if d.key == key)


def _dataset_section(result: ValidationResult) -> Section:
    rows = []
    for d in result.datasets:
        s = result.by_dataset.get(d.key)
        counted = s.n if s else 0
        cells = _stats_cells(s)[1:] if s else ["-", "-", "-"]
        rows.append([d.key, d.source.family, d.source.role, f"{counted}/{len(d.rows)}", *cells])
    return Section(
        "Per data set",
        [
            "Role 'fit': a default of the toolkit was fitted to it, so its error is a fit "
            "error, not a prediction; 'test': never used to choose a default; 'check': not "
            "independent (recalled rows, never counted, or values built on the library's own "
            "assumption, counted but never taken as a test).  Rows counted / rows packaged."
        ],
        [
            (
                [
                    "data set",
                    "family",
                    "role",
                    "rows",
                    "median abs. error",
                    "max abs. error",
                    "median error",
                ],
                rows,
            )
        ],
    )


def _model_section(result: ValidationResult) -> Section:
    from rheoline.model.provenance import REGISTRY

    def title(key):
        return REGISTRY[key].title if key in REGISTRY else ""

    stat_head = ["rows", "median abs. error", "max abs. error", "median error"]
    rows = [
        [key, title(key), *_stats_cells(s), ", ".join(s.datasets)]
        for key, s in result.by_model.items()
    ]
    blood = [[name, *_stats_cells(s)] for name, s in result.by_blood_model.items()]
    missing = [k for k in REGISTRY if k not in result.by_model]
    return Section(
        "Per model",
        [
            "Keys are those of the provenance registry.  A prediction counts under every model "
            "behind it; the blood models other than the default count under their own keys "
            "only.  Every blood row is also predicted with each blood model (second table).",
            "Registry models no packaged measurement checks (unvalidated here; several are "
            "checked against reference implementations in the test suite): "
            + ", ".join(missing)
            + ".",
        ],
        [
            (["model key", "title", *stat_head, "data sets"], rows),
            (["blood model (every blood row)", *stat_head], blood),
        ],
    )


def _group_section(title: str, groups: dict, label: str) -> Section:
    rows = [[name, *_stats_cells(s), ", ".join(s.datasets)] for name, s in groups.items()]
    return Section(
        title,
        [],
        [
            (
                [label, "rows", "median abs. error", "max abs. error", "median error", "data sets"],
                rows,
            )
        ],
    )


def _worst_section(result: ValidationResult) -> Section:
    rows = []
    for p in result.worst:
        r = result.row(p)
        rows.append(
            [
                p.dataset,
                p.row,
                _conditions(r),
                _num(p.measured),
                _num(p.predicted),
                _pct(p.error),
                r.where,
            ]
        )
    return Section(
        "Worst rows (default models)",
        [],
        [
            (
                [
                    "data set",
                    "row",
                    "conditions",
                    "measured",
                    "predicted",
                    "error",
                    "where in the source",
                ],
                rows,
            )
        ],
    )


def _gaps_section(result: ValidationResult) -> Section:
    rows = []
    for p in result.predictions:
        if p.default and p.status != "ok":
            r = result.row(p)
            rows.append([p.dataset, p.row, _conditions(r), _num(p.measured), p.status])
    recalled = [p for p in result.predictions if p.default and result.row(p).recalled]
    return Section(
        "Not counted",
        [
            f"{len(rows)} rows could not be predicted ('no-model': no library fluid or part "
            "for them; 'incomplete': the source does not give a condition the prediction "
            f"needs).  {len(recalled)} rows are recalled rather than read and are shown in the "
            "plots (hollow) and the rows file, never in the statistics."
        ],
        [(["data set", "row", "conditions", "measured", "status"], rows)],
    )


def _sources_section(result: ValidationResult) -> Section:
    paragraphs = []
    for d in result.datasets:
        s = d.source
        text = f"**{s.key}** ({s.role}): {s.citation}. Read: {s.where}."
        if s.digitized_by:
            text += f" Digitized: {s.digitized_by}."
        if s.conditions:
            text += f" Conditions: {s.conditions}."
        if s.notes:
            text += f" {s.notes}"
        paragraphs.append(text)
    return Section("Sources", paragraphs, [])


def report_sections(result: ValidationResult) -> list[Section]:
    """The report's sections, in order."""
    return [
        _target_section(result),
        _dataset_section(result),
        _model_section(result),
        _group_section("Per fluid family (viscosity rows)", result.by_family, "fluid family"),
        _group_section("Per part kind (measured flows)", result.by_part_kind, "part kind"),
        _worst_section(result),
        _gaps_section(result),
        _sources_section(result),
    ]


def _md_table(header, rows) -> str:
    def line(cells):
        return "| " + " | ".join(str(c).replace("|", "\\|") for c in cells) + " |"

    return "\n".join([line(header), line(["---"] * len(header)), *(line(r) for r in rows)])


def render_markdown(result: ValidationResult, plots=()) -> str:
    """The markdown summary (the caution first)."""
    out = ["# rheoline validation report", "", f"> {_caution()}", ""]
    for s in report_sections(result):
        out += [f"## {s.title}", ""]
        for p in s.paragraphs:
            out += [p, ""]
        for header, rows in s.tables:
            out += [_md_table(header, rows) if rows else "(none)", ""]
    if plots:
        out += ["## Plots", ""] + [f"![{name}]({name})" for name in plots] + [""]
    out += [f"> {_caution()}", ""]
    return "\n".join(out)


def _html_table(header, rows) -> str:
    head = "".join(f"<th>{escape(str(h))}</th>" for h in header)
    body = "".join(
        "<tr>" + "".join(f"<td>{escape(str(c))}</td>" for c in r) + "</tr>" for r in rows
    )
    return f"<table><thead><tr>{head}</tr></thead><tbody>{body}</tbody></table>"


def render_html(result: ValidationResult, svgs=()) -> str:
    """The HTML report with the plots inline (the caution at top and bottom)."""
    caution = f'<p class="caution">{escape(_caution())}</p>'
    parts = [
        "<!DOCTYPE html><html><head><meta charset='utf-8'><title>rheoline validation</title>",
        "<style>body{font-family:sans-serif;max-width:70em;margin:1em auto}"
        "table{border-collapse:collapse;margin:.5em 0}td,th{border:1px solid #ccc;padding:2px 6px;"
        "font-size:90%}.caution{border:2px solid #a00;padding:.5em;color:#a00}</style></head><body>",
        "<h1>rheoline validation report</h1>",
        caution,
    ]
    for s in report_sections(result):
        parts.append(f"<h2>{escape(s.title)}</h2>")
        parts += [f"<p>{escape(p).replace('**', '')}</p>" for p in s.paragraphs]
        parts += [_html_table(h, r) if r else "<p>(none)</p>" for h, r in s.tables]
    if svgs:
        parts.append("<h2>Plots</h2>")
        parts += [f"<div>{svg}</div>" for svg in svgs]
    parts += [caution, "</body></html>"]
    return "\n".join(parts)


def _plots(result: ValidationResult) -> dict:
    caution = _caution()
    series: dict = {"viscosity": {}, "flow": {}, "blood": {}}
    for p in result.predictions:
        r = result.row(p)
        if not p.predicted_ok:
            continue
        point = (p.measured, p.predicted, r.recalled)
        if p.default and r.quantity in ("viscosity", "flow"):
            series[r.quantity].setdefault(p.dataset, []).append(point)
        if r.fluid == "whole-blood" and not r.recalled:
            label = "carreau (default)" if p.default else p.variant
            series["blood"].setdefault(label, []).append(point)
    return {
        "plot-viscosity.svg": scatter_svg(
            "Viscosity, default models", "mPa s", series["viscosity"], caution
        ),
        "plot-flow.svg": scatter_svg(
            "Measured flows, default models", "mL/min", series["flow"], caution
        ),
        "plot-blood-models.svg": scatter_svg(
            "Whole blood: each blood model", "mPa s", series["blood"], caution
        ),
    }


def rows_csv(result: ValidationResult) -> str:
    """Every prediction with its row's conditions, as CSV text (the caution in the first line)."""
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow([f"# {_caution()}"])
    w.writerow(
        [
            "dataset",
            "row",
            "variant",
            "default",
            "quantity",
            "unit",
            "conditions",
            "measured",
            "predicted",
            "error",
            "status",
            "recalled",
            "digitized",
            "models",
            "where",
        ]
    )
    for p in result.predictions:
        r = result.row(p)
        w.writerow(
            [
                p.dataset,
                p.row,
                p.variant,
                p.default,
                r.quantity,
                r.unit,
                _conditions(r),
                p.measured,
                p.predicted,
                p.error,
                p.status,
                r.recalled,
                r.digitized,
                " ".join(p.models),
                r.where,
            ]
        )
    return buf.getvalue()


def write_report(result: ValidationResult, out_dir) -> tuple[Path, ...]:
    """Write :data:`REPORT_FILES` into ``out_dir`` (created if needed); return their paths.

    Only these files are written (an earlier report's files are replaced); nothing else in
    the folder is touched.
    """
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    plots = _plots(result)
    texts = {
        "validation-summary.md": render_markdown(result, tuple(plots)),
        "validation-report.html": render_html(result, tuple(plots.values())),
        "validation-rows.csv": rows_csv(result),
        **plots,
    }
    paths = []
    for name in REPORT_FILES:
        path = out / name
        path.write_text(texts[name], encoding="utf-8")
        paths.append(path)
    return tuple(paths)


_ON = {
    "fit data only": "on fit data only",
    "not independent": "on data sharing the library's assumption",
}


def _rows(n: int) -> str:
    return f"{n} row" if n == 1 else f"{n} rows"


def _verdict(result: ValidationResult) -> str:
    """One sentence on the targets, naming those met without independent data."""
    if not result.passed:
        return "A target is NOT met."
    weak = [t for t in result.targets if t.status == "met" and t.evidence != "held out"]
    if not weak:
        return "All targets with data are met."
    return (
        f"All targets with data are met; {len(weak)} of them only on fit data or data that "
        "is not independent, so they are not yet tested."
    )


def summary_text(result: ValidationResult, written=()) -> str:
    """A few lines for a terminal: each target's status, then where the report is."""
    lines = ["Validation against packaged measurements (relative error, rows not recalled):"]
    for t in result.targets:
        s = t.stats
        numbers = (
            f"{_rows(s.n)}, median {_pct(s.median_abs_error)}, max {_pct(s.max_abs_error)}"
            if s.validated
            else "no packaged data"
        )
        if s.validated and t.evidence != "held out":
            numbers += f" ({_ON[t.evidence]}: not an independent test)"
        lines.append(f"  [{t.status:>7}] {t.target.description}: {numbers}")
    for key, s in result.untargeted.items():
        lines.append(
            f"  [no target] held-out {key} ({_family(result, key)}): {_rows(s.n)}, "
            f"median error {_pct(s.median_error)}, max {_pct(s.max_abs_error)} (shown, not judged)"
        )
    lines.append(_verdict(result))
    if written:
        lines.append(f"Report: {Path(written[1])} (summary: {Path(written[0]).name})")
    lines += ["", f"CAUTION: {_caution()}"]
    return "\n".join(lines)

"""The review pack's HTML report: one self-contained page, readable offline.

The page opens with the caution, then the results, the charts (plotly, its script embedded
once, no network needed) and, for a run with the time solve, the time plots, the parts of each line, the scenario inputs, the models the run
used with their references, the cautions, and the scenario file as given with its SHA-256
hash.  Every text that came from a scenario file is HTML-escaped; invisible format
characters of the echoed file (bidirectional overrides, zero-width spaces) are shown as
``[U+202E]`` so the file reads as it is stored.
"""

from __future__ import annotations

import html
import math
from pathlib import Path

from rheoline.scenario.pack_tables import plain_value

__all__ = [
    "frame_html",
    "pack_figures",
    "chart_rows",
    "report_html",
    "write_html",
    "CHART_MAX_CASES",
]

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

#: Height of one bar of a chart, and the chart's margin for title and axis [px].
_BAR_PX, _CHART_MARGIN_PX, _CHART_MIN_PX = 22, 120, 300


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
    v = plain_value(v)
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
    """An escaped HTML table of a DataFrame (every cell and header through html.escape).

    >>> import pandas as pd
    >>> frame_html(pd.DataFrame({"<b>": ["a&b"]}))
    '<div class="scroll"><table><thead><tr><th>&lt;b&gt;</th></tr></thead><tbody><tr><td>a&amp;b</td></tr></tbody></table></div>'
    """
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


def _bar_layout(title, axis, n_rows):
    return {
        "title": title,
        "xaxis_title": axis,
        "height": max(_CHART_MIN_PX, _BAR_PX * n_rows + _CHART_MARGIN_PX),
        "margin": {"l": 10, "r": 10},
        "yaxis": {"autorange": "reversed", "automargin": True},
    }


def _flow_figure(table):
    import plotly.graph_objects as go

    names = [_e(n) for n in table["case"]]
    fig = go.Figure(
        go.Bar(
            x=table["flow [mL/min]"],
            y=names,
            orientation="h",
            marker_color="#2f6f8f",
            hovertemplate="%{y}<br>%{x:.4g} mL/min<extra></extra>",
        )
    )
    fig.update_layout(**_bar_layout("Flow per case [mL/min]", "flow [mL/min]", len(names)))
    return fig


def _budget_figure(run, shown):
    import numpy as np
    import plotly.graph_objects as go

    parts = run.parts
    fig = go.Figure()
    # one trace per part of a line: a swept part keeps one colour (its rows name each
    # point's own size, shown on hover)
    keys = list(getattr(run, "part_keys", ()) or ())
    keys = np.asarray(keys if len(keys) == len(parts) else parts["part"], dtype=object)
    if len(shown) < len(run.table):  # only the parts of the cases the charts show
        mine = parts["case"].isin(shown["case"]).to_numpy()
        parts, keys = parts[mine], keys[mine]
    n_cases = len(shown)
    for key in dict.fromkeys(keys):
        sub = parts[keys == key]
        fig.add_bar(
            x=sub["pressure drop [mmHg]"],
            y=[_e(c) for c in sub["case"]],
            orientation="h",
            name=_e(key),
            hovertext=[_e(p) for p in sub["part"]],
            hovertemplate="%{hovertext}<br>%{y}<br>%{x:.4g} mmHg<extra></extra>",
        )
    fig.update_layout(
        barmode="stack",
        **_bar_layout("Pressure budget per part [mmHg]", "pressure drop [mmHg]", n_cases),
    )
    return fig


#: Most scenarios whose line the report draws to scale (the first ones of the file).
DRAWINGS_MAX = 12


def _drawings(run):
    """The line of each scenario drawn to scale at its first case (name, share of the
    pressure drop, the dominant part marked), as the line view draws it; the first
    :data:`DRAWINGS_MAX` scenarios, the last title saying how many more there are."""
    from rheoline.scenario.line_drawing import line_drawing

    parts, figs = run.parts, []
    if not len(parts) or "scenario" not in run.table:
        return figs
    firsts = run.table.drop_duplicates("scenario")["case"]
    for k, case in enumerate(firsts[:DRAWINGS_MAX]):
        more = len(firsts) - DRAWINGS_MAX
        after = f" ({more} more scenarios not drawn)" if k == DRAWINGS_MAX - 1 and more > 0 else ""
        rows = parts[parts["case"] == case]
        figs.append(
            line_drawing(
                [_e(n) for n in rows["part"]],
                rows["inner diameter [mm]"].tolist(),
                rows["length [m]"].tolist(),
                rows["pressure drop [mmHg]"].tolist(),
                title=f"The line to scale: {_e(case)}{after}",
            )
        )
    return figs


#: Most cases a chart shows: beyond it the charts show a sample (:func:`chart_rows`).
CHART_MAX_CASES = 300


def chart_rows(table, max_cases=CHART_MAX_CASES):
    """Row positions of ``table`` the charts show: every row up to ``max_cases``, else
    ``max_cases`` rows evenly spaced through the table plus each scenario's lowest- and
    highest-flow case (so no extreme is left out), in table order.

    >>> import pandas as pd
    >>> t = pd.DataFrame({"scenario": ["a"] * 10, "flow [mL/min]": [5, 1, 2, 3, 4, 9, 6, 7, 8, 0]})
    >>> chart_rows(t, 4).tolist()
    [0, 3, 5, 6, 9]
    """
    import numpy as np

    n = len(table)
    if n <= max_cases:
        return np.arange(n)
    picked = set(np.linspace(0, n - 1, max_cases).round().astype(int).tolist())
    flow = table["flow [mL/min]"].to_numpy(dtype=float, na_value=np.nan)
    for rows in table.groupby("scenario", sort=False).indices.values():
        finite = rows[np.isfinite(flow[rows])]
        if finite.size:
            picked.update(
                (int(finite[np.argmin(flow[finite])]), int(finite[np.argmax(flow[finite])]))
            )
    return np.array(sorted(picked))


def pack_figures(run, rows=None):
    """Plotly figures of the run: flow per case, and the pressure budget of each line, only
    the table rows at positions ``rows`` (default: :func:`chart_rows`); and each scenario's
    line drawn to scale at its first case."""
    table = run.table
    if len(table) == 0:
        return []
    if rows is None:
        rows = chart_rows(table)
    shown = table.iloc[rows]
    figs = [_flow_figure(shown)]
    if len(run.parts):
        figs.append(_budget_figure(run, shown))
    return figs + _drawings(run)


def _charts_html(run):
    import plotly.io as pio

    rows = chart_rows(run.table)
    note = ""
    if len(rows) < len(run.table):
        note = (
            f"<p><strong>The charts show {len(rows):,} of {len(run.table):,} cases</strong>: "
            f"{CHART_MAX_CASES} evenly spaced through the table, and each scenario's lowest "
            "and highest flow. Every case is in the tables above and below and in "
            "results.csv.</p>"
        )
    return note + "".join(
        pio.to_html(
            fig,
            include_plotlyjs=(i == 0),
            full_html=False,
            config={"displaylogo": False, "responsive": True},
        )
        for i, fig in enumerate(pack_figures(run, rows))
    )


def _list_html(heading, items):
    if not items:
        return ""
    return f"<h3>{_e(heading)}</h3><ul>" + "".join(f"<li>{_e(i)}</li>" for i in items) + "</ul>"


def _models_html(assumptions):
    if assumptions.empty:
        return "<p>The run recorded no models.</p>"
    return (
        "<p>Every model, correlation and data source this run applied, and only those.</p>"
        + frame_html(assumptions)
    )


def report_html(
    run, meta, *, assumptions, cautions, notes, scenario_text, caution, evidence=None
) -> str:
    """The report page of ``run`` as one string.

    Parameters
    ----------
    run : RunResult
        ``scenario_set``, ``table``, ``parts``, ``inputs`` and ``summary()`` are shown.
    meta : dict
        The manifest's metadata (version, date, input hash...), shown as a table.
    assumptions : pandas.DataFrame
        The models the run used with their references.
    cautions : list of str
        The hazards and limits to list (the short caution is shown at the top and bottom).
    notes : list of str
        This run's notes from the models.
    scenario_text : str
        The scenario file as given, echoed at the end.
    caution : str
        The short caution.
    evidence : pandas.DataFrame, optional
        The model evidence (:func:`rheoline.scenario.pack_evidence.evidence_table`).
    """
    sset = run.scenario_set
    title = sset.title or "rheoline review pack"
    meta_rows = "".join(
        f"<tr><td>{_e(k)}</td><td>{_e(', '.join(v) if isinstance(v, list) else v)}</td></tr>"
        for k, v in meta.items()
        if k != "caution"
    )
    file_notes = f"<p>{_e(sset.notes)}</p>" if sset.notes else ""
    summary = frame_html(run.summary()) if hasattr(run, "summary") else ""
    return f"""<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>{_e(title)}</title><style>{_CSS}</style></head>
<body>
<div class="caution" id="caution" role="note"><strong>Caution.</strong> {_e(caution)}</div>
<h1>{_e(title)}</h1>
{file_notes}
<table class="meta">{meta_rows}</table>
<h2>Results</h2>
{summary}
{_list_html("Notes from the models", notes)}
<details><summary>Every column (as in results.csv)</summary>
{frame_html(run.table)}
</details>
<h2>Charts</h2>
{_charts_html(run)}
{_time_section(run)}
<h2>Parts of each line</h2>
{frame_html(run.parts)}
{_network_section(run)}
<h2>Scenario inputs</h2>
{frame_html(run.inputs)}
<h2 id="models-used">Models used and their references</h2>
{_models_html(assumptions)}
{_evidence_section(evidence)}
<h2>Cautions</h2>
<ul>{"".join(f"<li>{_e(c)}</li>" for c in cautions)}</ul>
<h2>Scenario file as given</h2>
<p>{_e(sset.source)}, SHA-256 {_e(meta["input_sha256"])}</p>
<pre>{_e(_visible_format_characters(scenario_text))}</pre>
<p>rheoline {_e(meta["version"])}, {_e(meta["created_utc"])}. {_e(caution)}</p>
</body></html>
"""


def _evidence_section(evidence):
    if evidence is None:
        return ""
    from rheoline.scenario.pack_evidence import evidence_html

    return f'<h2 id="model-evidence">Model evidence</h2>\n{evidence_html(evidence, _e)}'


def _network_section(run) -> str:
    """The branched lines' section (:mod:`rheoline.scenario.pack_network`), or ""."""
    from rheoline.scenario.pack_network import network_html

    return network_html(run)


def _time_section(run) -> str:
    """The time solve's plots (:mod:`rheoline.scenario.pack_time`), or ""."""
    from rheoline.scenario.pack_time import time_html

    return time_html(run)


def write_html(path: Path, page: str):
    """Write the report page (UTF-8)."""
    Path(path).write_text(page, encoding="utf-8")

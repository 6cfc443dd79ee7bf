"""The time solve in a review pack and in the views: time series, their story, the time plots.

A run whose scenarios ask for the time solve carries ``RunResult.time_series``
(:func:`rheoline.scenario.transient_step.time_series_table`).  The pack writes it to
``time-series.csv`` (:func:`time_frames`) and the report shows three time plots
(:func:`time_figures`: the syringe's pressure, the outlet flow and each drug's delivery
against time); the time view draws the same for one case.

:func:`story` reads one case's phases back into what happened to the line: the run from
time 0 until the occlusion, the occluded line until the alarm, the release with the pumps
stopped (the bolus), and the run's continuation had there been no occlusion.  Nothing is
computed here but a join of the rows the step kept.

Examples
--------
>>> import pandas as pd
>>> frame = pd.DataFrame(
...     [["a", "run", "", t, 10.0 * t, 1.0, 0.0, float("nan")] for t in (0.0, 1.0, 2.0, 3.0)]
...     + [["a", "occluded", "", 1.5, 40.0, 0.0, 0.0, float("nan")]],
...     columns=TIME_SERIES_COLUMNS,
... )
>>> s = story(frame, "a")
>>> s["line"]["time [min]"].tolist(), s["without occlusion"]["time [min]"].tolist()
([0.0, 1.0, 1.5], [2.0, 3.0])
"""

from __future__ import annotations

import html

from rheoline.scenario.transient_step import TIME_SERIES_COLUMNS

__all__ = [
    "TIME_SERIES_COLUMNS",
    "TIME_PLOTS",
    "MAX_PLOTTED_CASES",
    "time_frames",
    "story",
    "time_figures",
    "time_html",
]

#: The time plots: (column plotted, title).
TIME_PLOTS = (
    ("syringe pressure [mmHg]", "Pressure at the syringe against time"),
    ("outlet flow [mL/h]", "Flow at the outlet against time"),
    ("drug delivery [mg/h]", "Drug leaving the outlet against time"),
)
#: Most cases drawn in one time plot of a report (every case is in time-series.csv).
MAX_PLOTTED_CASES = 12


def _e(text):
    return html.escape(str(text), quote=True)


def time_frames(run):
    """``{"time-series": DataFrame}`` for a run with the time solve, else ``{}``."""
    frame = getattr(run, "time_series", None)
    if frame is None or frame.empty:
        return {}
    return {"time-series": frame}


def story(frame, case):
    """One case's time series as the line lived it.

    Returns
    -------
    dict
        ``"line"``: the run until the occlusion, the occluded line until the alarm, then the
        release (the whole run when there is no occlusion); ``"without occlusion"``: the
        run's rows from the occlusion on (empty without one); ``"drugs"``: port name -> its
        rows.  Each a DataFrame of :data:`TIME_SERIES_COLUMNS`, in time order.
    """
    import pandas as pd

    rows = frame[frame["case"] == case]
    phases = {p: rows[rows["phase"] == p] for p in ("run", "occluded", "release", "drug")}
    run, occluded = phases["run"], phases["occluded"]
    if occluded.empty:
        line, without = run, run.iloc[:0]
    else:
        start = occluded["time [min]"].min()
        line = pd.concat([run[run["time [min]"] < start], occluded, phases["release"]])
        without = run[run["time [min]"] >= start]
    drugs = {name: group for name, group in phases["drug"].groupby("port", sort=False)}
    return {"line": line, "without occlusion": without, "drugs": drugs}


def _cases(frame):
    return list(dict.fromkeys(frame["case"]))[:MAX_PLOTTED_CASES]


def time_figures(run):
    """The report's time plots (plotly figures; none without the time solve)."""
    import plotly.graph_objects as go

    frame = getattr(run, "time_series", None)
    if frame is None or frame.empty:
        return []
    cases = _cases(frame)
    stories = {case: story(frame, case) for case in cases}
    figures = []
    for column, title in TIME_PLOTS:
        fig = go.Figure()
        for case, s in stories.items():
            if column == "drug delivery [mg/h]":
                for port, rows in s["drugs"].items():
                    _trace(fig, rows, column, f"{case}: {port}")
                continue
            _trace(fig, s["line"], column, case)
            if not s["without occlusion"].empty:
                _trace(fig, s["without occlusion"], column, f"{case} (no occlusion)", "dot")
        if fig.data:
            fig.update_layout(title=title, xaxis_title="time [min]", yaxis_title=column, height=380)
            figures.append(fig)
    return figures


def _trace(fig, rows, column, name, dash="solid"):
    fig.add_scatter(
        x=rows["time [min]"],
        y=rows[column],
        mode="lines",
        name=_e(name),
        line={"dash": dash},
        hovertemplate=f"{_e(name)}<br>%{{x:.4g}} min<br>%{{y:.4g}}<extra></extra>",
    )


def time_html(run):
    """The report's section of the time solve ("" without one): the plots and a note."""
    figures = time_figures(run)
    if not figures:
        return ""
    import plotly.io as pio

    shown = len(_cases(run.time_series))
    every = len(dict.fromkeys(run.time_series["case"]))
    more = f" The first {shown} of {every} cases are drawn." if every > shown else ""
    charts = "".join(
        pio.to_html(
            fig,
            include_plotlyjs=False,
            full_html=False,
            config={"displaylogo": False, "responsive": True},
        )
        for fig in figures
    )
    return (
        "<h2>Pressure, flow and drug delivery in time</h2>"
        "<p>The line from the pump's start: with an occlusion, the occluded line until the "
        "alarm and the bolus when it clears (dotted: the line had there been no occlusion). "
        f"Every case's series is in time-series.csv.{_e(more)}</p>" + charts
    )

"""The branched lines of a review pack: per-branch and per-node tables, and their section.

A run with branched scenarios (:attr:`rheoline.scenario.run.RunResult.branches` not empty)
adds to its pack ``branches.csv`` and ``nodes.csv`` (:data:`NETWORK_PACK_FILES`), the
workbook's *branches* and *nodes* sheets, and a report section that states in words every
branch whose flow runs backwards and every bag or source that takes fluid in, rendered
from the tables' data (never from a model's sentences).  A run of lines only adds nothing.

Examples
--------
>>> import pandas as pd
>>> run = type("Run", (), {"branches": pd.DataFrame(), "nodes": pd.DataFrame()})()
>>> network_frames(run), network_html(run)
({}, '')
"""

from __future__ import annotations

from rheoline.scenario.pack_folder import NETWORK_PACK_FILES
from rheoline.scenario.pack_report import _e, frame_html

__all__ = ["NETWORK_PACK_FILES", "network_frames", "network_html", "reversal_sentences"]


def network_frames(run) -> dict:
    """``{"branches": DataFrame, "nodes": DataFrame}`` for a run with branched cases, else
    an empty dict (the file names are these keys with ``.csv``)."""
    branches = getattr(run, "branches", None)
    if branches is None or not len(branches):
        return {}
    return {"branches": branches, "nodes": run.nodes}


def reversal_sentences(run) -> list[str]:
    """One sentence per case and branch whose flow runs against its from -> to direction,
    and per case and bag or source that takes fluid in (from the tables' columns)."""
    frames = network_frames(run)
    if not frames:
        return []
    out = []
    for r in frames["branches"].to_dict("records"):
        if r["reversed"]:
            out.append(
                f"{r['case']}: flow runs backwards in branch {r['branch']}, "
                f"{abs(r['flow [mL/min]']):.3g} mL/min from {r['to']} to {r['from']}"
            )
    for r in frames["nodes"].to_dict("records"):
        if r["type"] in ("bag", "source") and r["flow in [mL/min]"] < 0:
            out.append(
                f"{r['case']}: {abs(r['flow in [mL/min]']):.3g} mL/min flows back into "
                f"{r['node']} ({r['type']})"
            )
    return out


def network_html(run) -> str:
    """The report's section on branched lines ("" for a run of lines only)."""
    frames = network_frames(run)
    if not frames:
        return ""
    sentences = reversal_sentences(run)
    reversed_items = (
        "<ul>"
        + "".join(f"<li><strong>Reversed:</strong> {_e(s)}</li>" for s in sentences)
        + "</ul>"
        if sentences
        else "<p>No branch carries flow against its direction in any case.</p>"
    )
    return (
        '<h2 id="branches">Branches of each branched line</h2>\n'
        "<p>Flow is positive from a branch's <em>from</em> node to its <em>to</em> node; a "
        "negative flow runs backwards (direction <em>reversed</em>). Pressures are referred "
        "to the reference level (the outlets').</p>\n"
        f"{reversed_items}\n{frame_html(frames['branches'])}\n"
        f'<h2 id="nodes">Nodes of each branched line</h2>\n{frame_html(frames["nodes"])}\n'
    )

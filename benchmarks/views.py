"""Benchmark case: one control change in each view, observer call to figure data set.

* the line view's head;
* the comparison view's own responsiveness case (7 catheters 14G-26G behind the set, 200
  points, a 5 % bore tolerance band of ``BAND_SAMPLES`` samples): a temperature change
  (every curve, band and table row recomputed), a head change (head-sweep curves and bands
  cached), then the temperature again with a 2 degC temperature spread added to the band
  (every band sample solved: bore and temperature differ per sample, the general path);
* the blood view's hematocrit;
* the network view's bag head (every branch of the four-branch demo network re-solved);
* the time view's set rate (the infusion solved in time again: start-up, occlusion to the
  alarm and the release).

Each time is the median over ``repeats`` changes to new values (no cache hit), measured by
the view's own ``set_control`` hook where it has one (Python time of the update).
"""

from __future__ import annotations

import gc
import statistics
import time

__all__ = ["widget_ms"]

TEMPERATURE_C = 22.0


def _timed_change(view, name, value):
    """Seconds of one control change: the views' hook, or the observer call timed here."""
    if hasattr(view, "set_control"):
        return view.set_control(name, value)
    start = time.perf_counter()  # observers run synchronously inside the setter
    view.controls[name].value = value
    return time.perf_counter() - start


def _median_change(view, name, values):
    """Median ms of setting ``name`` to each of ``values`` (each must differ from the last)."""
    seconds = []
    for value in values:
        gc.collect()
        seconds.append(_timed_change(view, name, value))
    return 1e3 * statistics.median(seconds)


def _comparison(out, repeats):
    try:
        from rheoline.widgets import compare_view
    except ImportError as exc:
        out["comparison_view pending"] = f"comparison view not importable: {exc}"
        return
    out["comparison_band_samples"] = compare_view.BAND_SAMPLES
    view = compare_view.responsiveness_case(points=200, bore_tolerance_percent=5.0)
    # temperature: every curve, band and table row is recomputed (nothing cached)
    out["comparison_view temperature"] = _median_change(
        view, "temperature_c", [TEMPERATURE_C + 0.1 * (k + 1) for k in range(repeats)]
    )
    # head: the head-sweep curves and bands are cached; the table's operating points are not
    out["comparison_view head"] = _median_change(
        view, "head_cm", [100.0 + (k + 1) for k in range(repeats)]
    )
    # a temperature spread as well: every band sample is solved (no bore-only shortcut)
    view.controls["temperature_tolerance_c"].value = 2.0
    out["comparison_view temperature, bore+temperature band"] = _median_change(
        view, "temperature_c", [TEMPERATURE_C - 0.1 * (k + 1) for k in range(repeats)]
    )


def widget_ms(repeats):
    """{view and control: median ms of one control change} (new values each time)."""
    out = {}
    try:
        from rheoline.widgets.line_view import LineView
    except ImportError as exc:
        return {"pending": f"line view not importable: {exc}"}
    view = LineView(fluid="water")
    out["line_view head"] = _median_change(
        view, "head_cm", [100.0 + (k + 1) for k in range(repeats)]
    )
    _comparison(out, repeats)
    try:
        from rheoline.widgets.blood_view import BloodVesselView
    except ImportError as exc:
        out["blood_view pending"] = f"blood view not importable: {exc}"
        return out
    blood = BloodVesselView()
    out["blood_view hematocrit"] = _median_change(
        blood, "hematocrit", [round(0.30 + 0.01 * (k % 40), 2) for k in range(repeats)]
    )
    _network_and_time(out, repeats)
    return out


def _network_and_time(out, repeats):
    from rheoline.widgets.network_view import NetworkView
    from rheoline.widgets.transient_view import TransientView

    network = NetworkView()
    head = next(name for name in network.controls if name.endswith(".head"))
    start = network.controls[head].value
    out["network_view head"] = _median_change(
        network, head, [start + 1.0 * (k + 1) for k in range(repeats)]
    )
    timed = TransientView()
    rate = timed.controls["flow_ml_h"].value
    out["time_view set rate"] = _median_change(
        timed, "flow_ml_h", [rate + 1.0 * (k + 1) for k in range(repeats)]
    )

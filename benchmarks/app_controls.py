"""Python time of every control change of the app, tab by tab (issue 15's target: at most
150 ms a change, tolerance bands included).

```
python benchmarks/app_controls.py            # a table: each view's slowest changes
python benchmarks/app_controls.py --json     # one JSON object
```

Builds the app as the served page does (``build_app()``, ``App.prepare()``), opens every tab,
then changes each control of each view once to a new value (a number box by one step, a
drop-down to its next choice, a box ticked or cleared) and once back, timed by the view's
own hook (``View.set_control``: observer call to figure data set).  The comparison is also
timed with a 5 % bore tolerance and a 2 degC temperature spread, its bands drawn.  A
report, not a test.
"""

from __future__ import annotations

import argparse
import json
import statistics
import time

import ipywidgets as widgets

TARGET_MS = 150.0
#: Controls that start a file action or hold text, not a recomputation.
SKIPPED = {"scenario_path", "pack_path", "overwrite", "parts"}


def _next_value(control):
    """A new value for ``control`` and its old one, or None where it has no other."""
    old = control.value
    if isinstance(control, widgets.Checkbox):
        return (not old), old
    if isinstance(control, (widgets.Dropdown, widgets.ToggleButtons)):
        values = [o[1] if isinstance(o, tuple) else o for o in control.options]
        if len(values) < 2:
            return None
        return values[(values.index(old) + 1) % len(values)], old
    if isinstance(control, (widgets.BoundedFloatText, widgets.FloatSlider, widgets.FloatText)):
        step = control.step or abs(old) * 0.05 or 0.1
        low = getattr(control, "min", -float("inf"))
        high = getattr(control, "max", float("inf"))
        new = old + step if old + step <= high else old - step
        return (new, old) if low <= new <= high and new != old else None
    return None


def view_changes(view):
    """{control: [ms there, ms back]} of one view."""
    out = {}
    for name in list(view.controls):
        if name in SKIPPED or name not in view.controls:
            continue
        change = _next_value(view.controls[name])
        if change is None:
            continue
        new, old = change
        there = view.set_control(name, new)
        back = view.set_control(name, old)
        out[name] = [1e3 * there, 1e3 * back]
    return out


def run():
    from rheoline.widgets.app import build_app

    start = time.perf_counter()
    app = build_app()
    built = time.perf_counter() - start
    start = time.perf_counter()
    app.prepare(freeze=True)  # as the served page's kernel does
    prepared = time.perf_counter() - start
    opened = {}
    for index, name in enumerate(app.views):
        start = time.perf_counter()
        app.tabs.selected_index = index
        opened[name] = time.perf_counter() - start
    changes = {name: view_changes(app.views[name]) for name in app.views}
    compare = app.views["compare"]
    compare.set_control("bore_tolerance_percent", 5.0)
    changes["compare, 5 % bore band"] = view_changes(compare)
    compare.set_control("temperature_tolerance_c", 2.0)
    changes["compare, bore and temperature band"] = view_changes(compare)
    return {
        "app_built_s": built,
        "prepared_s": prepared,
        "tab_first_open_python_s": opened,
        "control_change_ms": changes,
        "target_ms": TARGET_MS,
    }


def table(report):
    lines = [
        f"app built {report['app_built_s']:.2f} s, prepared {report['prepared_s']:.2f} s",
        "tab first open (Python): "
        + ", ".join(f"{k} {v:.2f} s" for k, v in report["tab_first_open_python_s"].items()),
    ]
    for view, changes in report["control_change_ms"].items():
        every = [ms for pair in changes.values() for ms in pair if ms == ms]
        if not every:
            continue
        slow = sorted(
            ((max(pair), name) for name, pair in changes.items() if max(pair) > TARGET_MS),
            reverse=True,
        )
        lines.append(
            f"{view}: {len(changes)} controls, median {statistics.median(every):.0f} ms, "
            f"slowest {max(every):.0f} ms; over {TARGET_MS:g} ms: "
            + (", ".join(f"{name} {ms:.0f}" for ms, name in slow) or "none")
        )
    return "\n".join(lines)


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--json", action="store_true")
    args = parser.parse_args(argv)
    report = run()
    print(json.dumps(report, indent=1) if args.json else table(report))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())

"""How fast the served app is for its user, in a real browser (issue 15's targets).

```
python benchmarks/app_page.py              # three page openings, a table
python benchmarks/app_page.py --json       # one JSON object
```

The launcher serves the app as a user starts it; headless Chromium opens the printed link.

* ``page_usable_s``: from asking for the page until the line tab's first chart is drawn and
  its head field takes input (target < 4 s);
* ``tab_first_open_s[<tab>]``: from the first click on a tab until its first chart is drawn
  (the files tab: its path field is shown) (target < 1.5 s).

Each opening waits ``--settle`` seconds first, so the server can ready its next kernel (what
a user who opens the page finds).  A report, not a test; the Python time of each control
change is in ``benchmarks/run.py`` (``widget_update_ms``).
"""

from __future__ import annotations

import argparse
import json
import statistics
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

from served_page import TAB_READY, browser, open_tab, served_app  # noqa: E402

PAGE_TARGET_S = 4.0
TAB_TARGET_S = 1.5


def one_opening(url, profile):
    """(page usable [s], {tab: first open [s]}) of one fresh page."""
    with browser(profile) as context:
        page = context.new_page()
        page.set_default_timeout(180_000)
        start = time.perf_counter()
        page.goto(url, timeout=180_000)
        view = page.locator(".rl-tabs .rl-view:visible").first
        view.locator(".rl-chart .js-plotly-plot").first.wait_for(state="visible")
        view.locator(".rl-head input").wait_for(state="visible")
        usable = time.perf_counter() - start
        tabs = {}
        for name in TAB_READY:
            if name == "Line":
                continue
            start = time.perf_counter()
            open_tab(page, name)
            tabs[name] = time.perf_counter() - start
        page.get_by_role("tab", name="Line").click()
    return usable, tabs


def run(openings=3, settle_s=25.0):
    with tempfile.TemporaryDirectory() as folder:
        root = Path(folder)
        with served_app(root / "workspace", root / "voila.log") as url:
            usable, tabs = [], {}
            for k in range(openings):
                time.sleep(settle_s)
                u, t = one_opening(url, root / f"profile-{k}")
                usable.append(u)
                for name, seconds in t.items():
                    tabs.setdefault(name, []).append(seconds)
    return {
        "openings": openings,
        "page_usable_s": statistics.median(usable),
        "page_usable_each_s": usable,
        "tab_first_open_s": {name: statistics.median(v) for name, v in tabs.items()},
        "targets": {
            "page_usable_s": f"< {PAGE_TARGET_S:g}",
            "tab_first_open_s": f"< {TAB_TARGET_S:g}",
        },
    }


def table(report):
    lines = [
        f"page usable: {report['page_usable_s']:.2f} s (target < {PAGE_TARGET_S:g} s; "
        f"each: {', '.join(f'{s:.2f}' for s in report['page_usable_each_s'])})"
    ]
    for name, seconds in report["tab_first_open_s"].items():
        holds = "holds" if seconds < TAB_TARGET_S else "MISSED"
        lines.append(
            f"tab {name!r} first open: {seconds:.2f} s (target < {TAB_TARGET_S:g} s) {holds}"
        )
    return "\n".join(lines)


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--openings", type=int, default=3)
    parser.add_argument("--settle", type=float, default=25.0, help="seconds before each opening")
    parser.add_argument("--json", action="store_true")
    args = parser.parse_args(argv)
    report = run(args.openings, args.settle)
    print(json.dumps(report, indent=1) if args.json else table(report))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())

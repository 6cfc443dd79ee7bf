"""Take the app's screenshots shown in the README: each tab at 1280 px wide.

```
python docs/screenshots.py
```

Runs the layout browser test (tests/test_browser_layout.py), which also checks that nothing
on the page is clipped or cut at 1024, 1280 and 1920 px, with ``RHEOLINE_SCREENSHOTS`` set
to this folder; the files are ``docs/app-<tab>-1280.png``.  Needs Debian's
``/usr/bin/chromium`` and Playwright.
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent


def main() -> int:
    env = {**os.environ, "RHEOLINE_SCREENSHOTS": str(HERE)}
    test = HERE.parent / "tests" / "test_browser_layout.py"
    return subprocess.call(
        [sys.executable, "-m", "pytest", "-q", "-p", "no:cacheprovider", str(test)], env=env
    )


if __name__ == "__main__":
    raise SystemExit(main())

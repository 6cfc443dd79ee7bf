"""Serve the app as a local web page with Voila: ``python -m rheoline.widgets.serve``.

Binds to 127.0.0.1 unless told otherwise and never opens a browser by itself.  The
command it runs is printed by ``--print-command`` and is the same as the README's
plain Voila command.

Examples
--------
>>> " ".join(voila_command(port=8866)[1:4])
'-m voila --no-browser'
"""

from __future__ import annotations

import argparse
import os
import shlex
import subprocess
import sys
from pathlib import Path

__all__ = ["APP_NOTEBOOK", "voila_command", "serve_environment", "main"]

#: The served notebook.
APP_NOTEBOOK = Path(__file__).resolve().parents[2] / "notebooks" / "app.ipynb"


def voila_command(port: int = 8866, ip: str = "127.0.0.1", notebook=APP_NOTEBOOK) -> list[str]:
    """The Voila command line that serves ``notebook`` on ``ip:port``."""
    return [
        sys.executable,
        "-m",
        "voila",
        "--no-browser",
        f"--port={port}",
        f"--Voila.ip={ip}",
        str(notebook),
    ]


def serve_environment(environ=None) -> dict:
    """The environment for Voila: the app's kernel imports this checkout's rheoline first."""
    env = dict(os.environ if environ is None else environ)
    root = str(APP_NOTEBOOK.parents[1])
    env["PYTHONPATH"] = os.pathsep.join([root, *filter(None, [env.get("PYTHONPATH")])])
    return env


def main(argv=None) -> int:
    """Run Voila in the foreground until interrupted; returns its exit status."""
    parser = argparse.ArgumentParser(
        prog="python -m rheoline.widgets.serve",
        description="Serve the rheoline views as a local web page.",
    )
    parser.add_argument("--port", type=int, default=8866, help="port (default 8866)")
    parser.add_argument(
        "--ip", default="127.0.0.1", help="address to bind (default 127.0.0.1, this machine only)"
    )
    parser.add_argument(
        "--print-command", action="store_true", help="print the Voila command instead of running it"
    )
    args = parser.parse_args(argv)
    command = voila_command(args.port, args.ip)
    if args.print_command:
        sys.stdout.write(shlex.join(command) + "\n")
        return 0
    if not APP_NOTEBOOK.exists():
        sys.stderr.write(
            f"the app notebook {APP_NOTEBOOK} is missing; run from a clone of the "
            "repository (pip install -e '.[widgets]')\n"
        )
        return 2
    sys.stderr.write(
        f"serving the rheoline app on http://{args.ip}:{args.port}/ (Ctrl-C stops it)\n"
    )
    try:
        return subprocess.call(command, cwd=APP_NOTEBOOK.parent, env=serve_environment())
    except KeyboardInterrupt:
        return 0


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(main())

"""Serve the app as a local web page with Voila: ``python -m rheoline.widgets.serve``.

What the launcher guarantees:

* It binds 127.0.0.1 (this machine only).  Another address is refused unless the
  user also passes ``--accept-network-exposure``, which names the risk: anyone who
  can reach the address and has the link can read and write the workspace folder.
* The page needs a token: the launcher makes one (or takes ``JUPYTER_TOKEN`` from
  the environment), hands it to Voila through the environment, never on the command
  line where other users of the machine could read it, and prints the full link.
* It serves on exactly the port asked for: a port already taken is an error (Voila
  is told not to try others), so the printed link is the page's.
* It becomes Voila (``exec``): stopping the launcher stops the server, whatever the
  signal, and Voila shuts its kernels down on the way out.
* Every file the page loads or saves lives in one workspace folder, chosen with
  ``--workspace`` (default ``./rheoline-workspace``, created if missing) and shown on
  the page (see :class:`rheoline.scenario.workspace.Workspace`).
* Kernels of closed pages are shut down after ``--idle-minutes`` (default 15).
* One kernel is kept ready with the app already built (Voila's preheated kernel), so
  the page opens without waiting for Python to start and build the views.
* The page makes no request off the machine: the app's template
  (``share/voila/templates/rheoline``) replaces Voila's icon stylesheet from a public
  CDN with a small one served by Voila itself.

``--print-command`` prints the Voila command instead of running it.

Examples
--------
>>> " ".join(voila_command(port=8866)[1:4])
'-m voila --no-browser'
>>> is_loopback("127.0.0.1"), is_loopback("::1"), is_loopback("192.0.2.10")
(True, True, False)
"""

from __future__ import annotations

import argparse
import errno
import ipaddress
import os
import secrets
import shlex
import socket
import subprocess
import sys
from pathlib import Path

__all__ = [
    "APP_NOTEBOOK",
    "TEMPLATE",
    "TEMPLATE_ROOT",
    "WORKSPACE_ENV",
    "DEFAULT_WORKSPACE",
    "IDLE_MINUTES",
    "RISK_FLAG",
    "voila_command",
    "serve_environment",
    "workspace_folder",
    "is_loopback",
    "main",
]

#: The served notebook.
APP_NOTEBOOK = Path(__file__).resolve().parents[2] / "notebooks" / "app.ipynb"
#: A Jupyter data folder holding the app's Voila template (``voila/templates/rheoline``).
TEMPLATE_ROOT = Path(__file__).resolve().parent / "share"
#: The app's Voila template: Voila's "lab" template with a local icon stylesheet.
TEMPLATE = "rheoline"
#: The environment variable through which the launcher tells the page its workspace.
WORKSPACE_ENV = "RHEOLINE_WORKSPACE"
#: The workspace folder's name, beside where the app starts, when none is chosen.
DEFAULT_WORKSPACE = "rheoline-workspace"
#: Minutes after which the kernel of a closed page is shut down.
IDLE_MINUTES = 15.0
#: The flag without which a non-loopback address is refused.
RISK_FLAG = "--accept-network-exposure"
#: How often Voila looks for idle kernels [s].
_CULL_INTERVAL_S = 60


def is_loopback(ip: str) -> bool:
    """True for an address of this machine only (127.0.0.0/8, ::1, "localhost")."""
    if ip.strip().lower() == "localhost":
        return True
    try:
        return ipaddress.ip_address(ip.strip().strip("[]")).is_loopback
    except ValueError:
        return False


def workspace_folder(environ=None) -> Path:
    """The page's workspace folder: ``$RHEOLINE_WORKSPACE``, else ``./rheoline-workspace``."""
    env = os.environ if environ is None else environ
    return Path(env.get(WORKSPACE_ENV) or Path.cwd() / DEFAULT_WORKSPACE)


def voila_command(
    port: int = 8866, ip: str = "127.0.0.1", notebook=APP_NOTEBOOK, idle_minutes=IDLE_MINUTES
) -> list[str]:
    """The Voila command line that serves ``notebook`` on ``ip:port`` (token from the
    environment, see :func:`serve_environment`)."""
    idle_s = max(int(round(float(idle_minutes) * 60)), 1)
    return [
        sys.executable,
        "-m",
        "voila",
        "--no-browser",
        "--token",  # require a token; its value comes from JUPYTER_TOKEN
        f"--port={port}",
        "--Voila.port_retries=0",  # this port or none: the printed link is the page's
        f"--Voila.ip={ip}",
        f"--template={TEMPLATE}",
        f"--MappingKernelManager.cull_idle_timeout={idle_s}",
        f"--MappingKernelManager.cull_interval={min(_CULL_INTERVAL_S, idle_s)}",
        "--MappingKernelManager.cull_connected=False",
        # one kernel kept ready with the app built, so a page opens without waiting for it
        "--VoilaConfiguration.preheat_kernel=True",
        "--VoilaConfiguration.default_pool_size=1",
        str(notebook),
    ]


def serve_environment(environ=None, *, workspace=None, token=None) -> dict:
    """The environment for Voila: this checkout's rheoline first, the app's template, and
    (when given) the workspace folder and the page's token."""
    env = dict(os.environ if environ is None else environ)
    root = str(APP_NOTEBOOK.parents[1])
    env["PYTHONPATH"] = os.pathsep.join([root, *filter(None, [env.get("PYTHONPATH")])])
    env["JUPYTER_PATH"] = os.pathsep.join(
        [str(TEMPLATE_ROOT), *filter(None, [env.get("JUPYTER_PATH")])]
    )
    if workspace is not None:
        env[WORKSPACE_ENV] = str(workspace)
    if token is not None:
        env["JUPYTER_TOKEN"] = token
    return env


def _parser():
    parser = argparse.ArgumentParser(
        prog="python -m rheoline.widgets.serve",
        description="Serve the rheoline views as a web page on this machine.",
    )
    parser.add_argument("--port", type=int, default=8866, help="port (default 8866)")
    parser.add_argument(
        "--ip", default="127.0.0.1", help="address to bind (default 127.0.0.1, this machine only)"
    )
    parser.add_argument(
        RISK_FLAG,
        dest="accept_network_exposure",
        action="store_true",
        help="allow an --ip that other machines can reach: anyone who reaches it with the "
        "link can read and write the workspace folder",
    )
    parser.add_argument(
        "--workspace",
        default=None,
        help=f"the folder the page reads and writes (default ./{DEFAULT_WORKSPACE}, "
        "created if missing)",
    )
    parser.add_argument(
        "--idle-minutes",
        type=float,
        default=IDLE_MINUTES,
        help=f"shut down the kernel of a closed page after this long (default {IDLE_MINUTES:g})",
    )
    parser.add_argument(
        "--print-command", action="store_true", help="print the Voila command instead of running it"
    )
    return parser


def _refusal(args) -> str | None:
    """Why the launcher will not start with ``args``, or None."""
    if not 0 < args.port < 65536:
        return f"--port {args.port} is not a port number (1 to 65535)"
    if not args.idle_minutes > 0:
        return f"--idle-minutes {args.idle_minutes:g} must be above 0"
    if not is_loopback(args.ip) and not args.accept_network_exposure:
        return (
            f"--ip {args.ip!r} lets other machines reach the page, and through it read and "
            f"write the workspace folder; pass {RISK_FLAG} as well if that is what you want"
        )
    return None


def _port_taken(ip: str, port: int) -> str | None:
    """Why ``ip:port`` cannot be bound now, or None when it is free."""
    host = "127.0.0.1" if ip.strip().lower() == "localhost" else ip.strip().strip("[]")
    family = socket.AF_INET6 if ":" in host else socket.AF_INET
    with socket.socket(family, socket.SOCK_STREAM) as probe:
        try:
            probe.bind((host, port))
        except OSError as exc:
            if exc.errno == errno.EADDRINUSE:
                return f"port {port} is already in use; choose another with --port"
            return f"cannot listen on {ip}:{port} ({exc.strerror or exc})"
    return None


def _url(ip: str, port: int, token: str) -> str:
    host = f"[{ip.strip('[]')}]" if ":" in ip else ip
    return f"http://{host}:{port}/?token={token}"


def _say(text: str, stream=None):
    stream = stream or sys.stderr
    stream.write(text + "\n")
    stream.flush()


def main(argv=None) -> int:
    """Check the options, print the page's link, then become Voila (returns on errors only)."""
    args = _parser().parse_args(argv)
    problem = _refusal(args)
    if problem:
        _say(f"rheoline serve: error: {problem}")
        return 2
    command = voila_command(args.port, args.ip, idle_minutes=args.idle_minutes)
    if args.print_command:
        sys.stdout.write(shlex.join(command) + "\n")
        return 0
    if not APP_NOTEBOOK.exists():
        _say(
            f"rheoline serve: error: the app notebook {APP_NOTEBOOK} is missing; run from a "
            "clone of the repository (pip install -e '.[widgets]')"
        )
        return 2
    from rheoline.errors import RheolineError
    from rheoline.scenario.workspace import Workspace

    try:
        workspace = Workspace(args.workspace or workspace_folder({})).create()
    except RheolineError as exc:
        _say(f"rheoline serve: error: {exc}")
        return 2
    taken = _port_taken(args.ip, args.port)
    if taken:
        _say(f"rheoline serve: error: {taken}")
        return 2
    token = os.environ.get("JUPYTER_TOKEN") or secrets.token_urlsafe(32)
    env = serve_environment(workspace=workspace.root, token=token)
    if not is_loopback(args.ip):
        _say(
            f"rheoline serve: caution: serving on {args.ip}, reachable from other machines; "
            "anyone with the link below can read and write the workspace folder"
        )
    _say(
        f"rheoline app: open {_url(args.ip, args.port, token)}\n"
        f"  workspace folder: {workspace.root}\n"
        "  Ctrl-C (or stopping this process) stops the server",
        sys.stdout,
    )
    return _become(command, env)


def _become(command, env) -> int:
    """Replace this process with ``command`` (POSIX), so a signal to it reaches Voila."""
    os.chdir(APP_NOTEBOOK.parent)
    if os.name == "posix":
        os.execve(command[0], command, env)  # does not return
    try:  # pragma: no cover - other systems: run it and wait
        return subprocess.call(command, env=env)
    except KeyboardInterrupt:  # pragma: no cover
        return 0


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(main())

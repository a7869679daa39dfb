"""``planpack serve``: a live preview of the site on 127.0.0.1 while a plan is edited."""

from __future__ import annotations

import argparse

from planpack.commands.common import bounded

NAME = "serve"
HELP = "preview the site while you edit a plan"
DESCRIPTION = ("Build the site of the plans into a temporary folder, serve it on 127.0.0.1 only, rebuild "
               "when a plan file changes and reload the browser. A plan with errors shows its diagnostics "
               "on the page. Stop with Ctrl-C.")


def add_arguments(p) -> None:
    p.add_argument("plans", nargs="+", metavar="PLAN_OR_DIR", help="plan files or folders (every *.yaml under a folder)")
    p.add_argument("--port", type=bounded(int, 0, 65535, "a port number 0 to 65535"), default=8000, metavar="N",
                   help="port on 127.0.0.1 (default 8000; 0 picks a free one)")
    p.add_argument("--interval", type=bounded(float, 0.05, 10.0, "seconds between 0.05 and 10"), default=0.5,
                   metavar="S", help=argparse.SUPPRESS)
    p.add_argument("--no-cache", action="store_true", help="compile afresh on every rebuild")


def run(args) -> int:
    from planpack.workflow import serve

    return serve.run(args.plans, port=args.port, interval_s=args.interval, use_cache=not args.no_cache)

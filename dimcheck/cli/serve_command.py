"""``dimcheck serve``: the language server for editors, over stdin and stdout.

pygls is imported only here, when the command runs, so ``dimcheck check`` never loads it;
it comes with the ``server`` extra (``pip install 'dimcheck[server]'``).
"""

from __future__ import annotations

import sys


def register(commands) -> None:
    serve = commands.add_parser(
        "serve", help="run the language server (LSP) on stdin/stdout for editors")
    serve.add_argument("--stdio", action="store_true",
                       help="accepted for editors that pass it; stdin/stdout is the only transport")
    serve.add_argument("--config", metavar="FILE",
                       help="one pyproject.toml or TOML file for every document (default: the nearest "
                            "pyproject.toml with [tool.dimcheck] above each document)")


def run(args) -> int:
    import importlib.util
    if importlib.util.find_spec("pygls") is None:
        print("dimcheck: error: 'dimcheck serve' needs pygls: pip install 'dimcheck[server]'",
              file=sys.stderr)
        return 2
    if args.config is not None:
        from .config import load_config
        load_config(args.config)  # a bad file is a one-line error and exit 2 now, not later
    from ..server.lsp import serve
    return serve(args.config)

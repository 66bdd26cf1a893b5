"""``python -m dimcheck`` is the same as the ``dimcheck`` command."""

from .cli.main import run_and_exit

run_and_exit()

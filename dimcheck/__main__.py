"""``python -m dimcheck`` is the same as the ``dimcheck`` command."""

import sys

from .cli.main import main

sys.exit(main())

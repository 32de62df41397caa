"""``python -m interact``: the same as the ``interact`` command."""

from .cli import main

raise SystemExit(main())

"""The terminal app (Textual): edit a scenario and watch the assessment change.

Only this package imports Textual; the CLI calls :func:`run_app` lazily.
"""

from __future__ import annotations

import sys
from pathlib import Path

__all__ = ["run_app"]


def run_app(path: str | Path | None = None) -> int:
    """Open the app on ``path`` (or on the built-in invented demo); returns the exit status.

    A file that cannot be opened is reported on standard error with all its
    problems (exit status 2) and the app does not start.
    """
    from ..errors import InteractError
    from .app import InteractApp, read_scenario_file

    data = None
    if path is not None:
        try:
            data, _ = read_scenario_file(path)
        except InteractError as exc:
            sys.stderr.write(f"interact: {exc}\n")
            return 2
    app = InteractApp(path, data=data)
    result = app.run()
    return 0 if result is None else int(result)

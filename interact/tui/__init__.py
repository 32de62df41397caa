"""The terminal app (Textual): edit a scenario and watch the assessment change.

Only this package imports Textual; the CLI calls :func:`run_app` lazily.
"""

from __future__ import annotations

import sys
from pathlib import Path

__all__ = ["run_app"]


def run_app(path: str | Path | None = None) -> int:
    """Open the app on ``path`` (or on the built-in invented demo); returns the exit status.

    A scenario with problems opens with each problem under its field, so it can
    be fixed in the form; a file that cannot be read or is not TOML is reported
    on standard error (exit status 2) and the app does not start.
    """
    from ..errors import InteractError
    from .app import InteractApp, read_scenario_data

    data = None
    if path is not None:
        try:
            data = read_scenario_data(path)
        except InteractError as exc:
            sys.stderr.write(f"interact: {exc}\n")
            return 2
    app = InteractApp(path, data=data)
    result = app.run()
    return 0 if result is None else int(result)

"""The installed ``dimfit`` command (``[project.scripts]`` in pyproject.toml).

    dimfit                       the terminal app on the built-in demo circuit
    dimfit open FILE             the terminal app on a circuit file
    dimfit COMMAND ...           every other command: ``compat.cli`` (check, simulate,
                                 sweep, size, demo, catalogue)

The command line itself (parsing, one-line errors with exit 2, the other commands) is
``compat.cli``; this module only adds the app to it, so that the layers stay
tui -> compat -> loads.  The app (Textual) is imported when it is opened.
"""
from __future__ import annotations

import sys
from collections.abc import Sequence

from compat import cli


def open_app(path: str | None) -> int | None:
    """Run the terminal app on ``path`` (None: the built-in demo circuit)."""
    try:
        from tui.app import run
    except ImportError as err:
        print(f"{cli.PROG}: error: the terminal app is not available in this installation ({err})",
              file=sys.stderr)
        return 2
    return run(path)


def main(argv: Sequence[str] | None = None) -> int:
    """Run ``dimfit``; returns the exit code."""
    return cli.finish(cli.main(argv, open_app=open_app))


if __name__ == "__main__":
    sys.exit(main())

"""The installed ``dimfit`` command (``tui.cli.main``): the app commands here, every
other command delegated to ``compat.cli``.  Our own interface, no physics."""
from __future__ import annotations

from pathlib import Path

import tui.app
from tui import cli

DATA = Path(__file__).resolve().parent.parent / "data"


def _one_error_line(capsys) -> str:
    err = capsys.readouterr().err
    assert len(err.splitlines()) == 1 and err.startswith("dimfit: error: ") and "Traceback" not in err, err
    return err


def test_open_bad_file_exits_2_before_the_app(capsys, monkeypatch):
    opened = []
    monkeypatch.setattr(tui.app, "run", lambda path: opened.append(path))
    assert cli.main(["open", str(DATA / "bad" / "zero_hz.toml")]) == 2
    assert "supply.frequency_hz" in _one_error_line(capsys)
    assert opened == []


def test_open_and_no_command_start_the_app(monkeypatch):
    opened = []
    monkeypatch.setattr(tui.app, "run", lambda path: opened.append(path))
    path = str(DATA / "filament_hall.toml")
    assert cli.main(["open", path]) == 0
    assert cli.main([]) == 0
    assert opened == [path, None]


def test_other_commands_are_compat_cli(capsys):
    assert cli.main(["catalogue"]) == 0
    assert "invented" in capsys.readouterr().out.lower()
    assert cli.main(["simulate", str(DATA / "bad" / "zero_hz.toml")]) == 2
    assert "supply.frequency_hz" in _one_error_line(capsys)
    assert cli.main(["frobnicate"]) == 2
    assert "invalid choice" in _one_error_line(capsys)


def test_help_lists_the_app_and_the_other_commands(capsys):
    assert cli.main(["--help"]) == 0
    out = capsys.readouterr().out
    for command in ("open", "check", "simulate", "sweep", "size", "demo", "catalogue"):
        assert command in out

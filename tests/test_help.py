"""The command line's help: every command listed with its whole first sentence (no '...' cut-off), the
catalogue's kinds named by `catalog list --help`, and the demo summary showing each warning in full."""

import re

import click
import pytest
import typer

from specgen.cli import main
from specgen.commands.catalog import KINDS
from specgen.commands.root import app


def _help(argv, capsys) -> str:
    with pytest.raises(SystemExit) as ex:
        main([*argv, "--help"])
    assert ex.value.code == 0
    return " ".join(capsys.readouterr().out.split())


def _first_sentence(cmd: click.Command) -> str:
    text = " ".join((cmd.help or "").split("\n\n")[0].split())
    m = re.match(r"(.+?\.)(\s|$)", text)
    return m.group(1) if m else text


@pytest.mark.parametrize("group", [[], ["catalog"], ["orders"]], ids=lambda g: " ".join(g) or "specgen")
def test_every_command_is_listed_with_its_whole_first_sentence(group, capsys, monkeypatch):
    monkeypatch.setenv("COLUMNS", "80")
    out = _help(group, capsys)
    assert "..." not in out.split("Commands:", 1)[1]
    root = typer.main.get_command(app)
    cmd_group = root.commands[group[0]] if group else root
    assert isinstance(cmd_group, click.Group)
    for name, cmd in cmd_group.commands.items():
        if not cmd.hidden:
            assert f"{name} {_first_sentence(cmd)}" in out, name


def test_catalog_list_help_names_every_kind(capsys):
    out = _help(["catalog", "list"], capsys)
    for kind in KINDS:
        assert kind in out, kind


def test_demo_summary_shows_every_warning_and_whole_titles(tmp_path):
    from specgen.api import demo_specs, design_file
    from specgen.demo import run as demo_run

    lines: list[str] = []

    class _Stop(Exception):
        pass

    def echo(text: str) -> None:
        if text == "== work orders":
            raise _Stop
        lines.append(text)

    with pytest.raises(_Stop):
        demo_run.run_demo(tmp_path, echo=echo)
    text = "\n".join(lines)
    for path in demo_specs():
        d = design_file(path)
        assert d.title in text
        for w in d.warnings:
            assert f"warning: {w.message}" in text
    assert any(line.lstrip().startswith("warning:") for line in lines)

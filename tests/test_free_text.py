"""Free text typed on the command line (--by, --why, --reason, --lot) is checked by one rule in every
command, and what the register holds is never printed raw.

The rule checked against: one line of plain text, without the C0/C1 control characters, DEL and the
bidirectional controls a terminal acts on (ECMA-48 control functions; Unicode's bidirectional controls,
UAX #9), not empty when given, at most the stated length. Register rows are forged with Python's own
sqlite3 module, outside the program.
"""

from __future__ import annotations

import re
import sqlite3
from pathlib import Path

import pytest
from typer.testing import CliRunner

from specgen import api
from specgen.cli import app
from specgen.register import Register

DEMO = Path(api.__file__).resolve().parent / "demo"
runner = CliRunner()
BAD_NAMES = {"empty": "", "blank": "   ", "line break": "R. Okafor\nWO-2026-09999 complete",
             "terminal escape": "\x1b]0;owned\x07R. Okafor", "bidi override": "R.\u202eOkafor", "too long": "x" * 201}
CONTROL = re.compile("[\x00-\x08\x0b-\x1f\x7f-\x9f\u202a-\u202e\u2066-\u2069]")


def cli(*args):
    return runner.invoke(app, [str(a) for a in args])


def _one_line_refusal(r, option: str) -> None:
    assert r.exit_code == 2, (r.stdout, r.stderr)
    assert len(r.stderr.strip().splitlines()) == 1 and option in r.stderr, r.stderr
    assert not CONTROL.search(r.stderr), r.stderr


@pytest.mark.parametrize("name", sorted(BAD_NAMES))
def test_workorder_by_is_checked_before_a_number_is_taken(tmp_path, own_register, name):
    out = tmp_path / "out"
    r = cli("workorder", DEMO / "BH-1042.yaml", "--qty", "5", "--out", out, "--by", BAD_NAMES[name])
    _one_line_refusal(r, "--by")
    assert not own_register.exists() and not out.exists()


@pytest.mark.parametrize("name", ["line break", "terminal escape", "too long", "empty"])
def test_batch_and_quote_by_are_checked(tmp_path, own_register, name):
    orders = tmp_path / "orders.csv"
    orders.write_text(f"spec,qty\n{DEMO / 'BH-1042.yaml'},5\n", encoding="utf-8")
    _one_line_refusal(cli("workorder", "--batch", orders, "--out", tmp_path / "wo", "--by", BAD_NAMES[name]), "--by")
    _one_line_refusal(cli("quote", DEMO / "BH-1042.yaml", "--out", tmp_path / "q", "--by", BAD_NAMES[name]), "--by")
    assert not own_register.exists() and not (tmp_path / "wo").exists() and not (tmp_path / "q").exists()


@pytest.mark.parametrize("option, value", [("--by", BAD_NAMES["line break"]), ("--by", ""),
                                           ("--why", "cancelled\x1b[2J"), ("--why", "x" * 2001)])
def test_orders_set_checks_by_and_why_and_records_nothing(own_register, option, value):
    with Register.open(own_register) as reg:
        number = reg.allocate("BH-1042", "A", "f" * 64, 5)
        events = len(reg.history(number))
    args = ["orders", "set", number, "void", "--why", "customer cancelled", option, value]
    _one_line_refusal(cli(*args), option)
    with Register.open(own_register, read_only=True) as reg:
        assert reg.get(number).state == "issued" and len(reg.history(number)) == events


def test_register_api_refuses_a_forged_name_too(own_register):
    with Register.open(own_register) as reg:
        with pytest.raises(Exception, match="--by"):
            reg.allocate("BH-1042", "A", "f" * 64, 5, issued_by="x\ny")
        number = reg.allocate("BH-1042", "A", "f" * 64, 5)
        with pytest.raises(Exception, match="--why"):
            reg.void(number, "ok\x07")


def test_orders_list_show_and_where_used_print_nothing_raw(own_register):
    """Rows written into the register by something else (an older version, a hand edit) are shown
    with their control characters escaped: no forged line, no terminal escape reaches the screen."""
    with Register.open(own_register) as reg:
        first = reg.allocate("BH-1042", "A", "f" * 64, 5, lot="L-1")
        second = reg.allocate("BH-1042", "A", "f" * 64, 7)
        reg.void(second, "customer cancelled")
    db = sqlite3.connect(own_register)
    db.execute("UPDATE orders SET issued_by = ?, lot = ? WHERE number = ?",
               ("R. Okafor\nWO-2026-09999  complete  BH-6666", "\x1b]0;owned\x07", first))
    db.execute("UPDATE orders SET void_reason = ? WHERE number = ?", ("gone\r\x1b[2Jcleared", second))
    db.commit()
    db.close()
    for args, lines in ((["orders", "list", "--orders"], 1 + 1 + 2 + 1), (["orders", "show", first], None),
                        (["orders", "where-used", "BH-1042"], None), (["orders", "list", "--csv"], 3)):
        r = cli(*args)
        assert r.exit_code == 0, r.stderr
        assert not CONTROL.search(r.stdout), (args, r.stdout)
        assert "\\n" in r.stdout or "\\x1b" in r.stdout              # shown escaped, not dropped
        if lines is not None and args[-1] != "--csv":
            assert len(r.stdout.strip().splitlines()) == lines, r.stdout       # title, header, 2 rows, void reason

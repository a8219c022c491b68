"""Taps named by voltage: the turn that gives each voltage, where it falls in the build, its test and flux.

A winding's ``taps: [{voltage: 208 V, pin: "5"}]`` brings out a lead at the turn, counted from the winding's
start, whose share of the winding's voltage is the tap's: turn = round(N V_tap / V) (the winding's nominal
voltage; a secondary's full-load voltage asked). On a primary fed at the tap the flux is Faraday's at the
tap's turns, so the check takes B_pk = V_tap / V x N / N_tap x B_pk(V) at the top of the range.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import replace

from ..loading import Reader
from ..records import record
from .result import Check, Limit, TestPlan, WindingResult
from .test_setup import finish, ratio_setting
from .windings_result import TapResult


@record
class Tap:
    """A tap as the spec gives it."""
    voltage_v: float
    pin: str
    index: int = 0


def parse_taps(r: Reader) -> tuple[Tap, ...]:
    """The ``taps`` list of a winding (voltage and pin of each); checked against the winding by ``check_taps``."""
    if not r.has("taps"):
        r.raw("taps", None)
        return ()
    out = []
    for i, t in enumerate(r.items("taps", min_items=1)):
        pin = str(t.raw("pin")).strip()
        if not pin or isinstance(t.raw("pin"), (dict, list, bool)):
            raise t.error("expected a pin name like '5'", "pin")
        out.append(Tap(t.quantity("voltage", "voltage"), pin, i))
        t.done()
    return tuple(out)


def check_taps(r: Reader, voltage_v: float | None, role: str, taps: Sequence[Tap], pins: Sequence[str | None]) -> None:
    """Each tap inside the winding's voltage, on a pin of its own; located at the tap."""
    if taps and role == "shield":
        raise r.error("a shield has no taps", "taps")
    seen: set[str] = set()
    for t in taps:
        if voltage_v is None:
            raise r.item_error("taps", t.index, "a tap named by voltage needs the winding's voltage")
        if not 0.0 < t.voltage_v < voltage_v:
            raise r.item_error("taps", t.index, f"tap voltage {t.voltage_v:g} V is beyond the winding's "
                                                f"{voltage_v:g} V: a tap lies between its start and finish")
        if t.pin in seen or t.pin in pins:
            raise r.item_error("taps", t.index, f"pin '{t.pin}' is already used by this winding")
        seen.add(t.pin)


def _where(w: WindingResult, turn: int) -> tuple[int, int, int]:
    """(section, layer, turn in layer) of the winding's ``turn`` (1-based), counting in winding order."""
    left = turn
    for s in w.sections:
        for layer in s.layers:
            if left <= layer.turns:
                return s.index, layer.index, left
            left -= layer.turns
    last = w.sections[-1] if w.sections else None
    return (last.index, last.layers[-1].index, last.layers[-1].turns) if last and last.layers else (1, 1, 1)


def tap_results(windings_spec: Sequence[object], windings: Sequence[WindingResult],
                b_peak_max_t: float) -> tuple[TapResult, ...]:
    """Every tap of every winding, at its whole turn (see the module docstring), with the voltage it gives
    over the input range: the winding's voltage (a secondary's at full load) x turn / N, from the primary's
    nominal voltage to its voltage_max (the voltage per turn follows the input; a transformer is designed at
    its nominal voltage, with no low line)."""
    from .spec import Winding

    out = []
    built = {w.name: w for w in windings}
    prim = next((w for w in windings_spec if isinstance(w, Winding) and w.role == "primary"), None)
    v_in = (prim.voltage_v or 0.0) if prim else 0.0
    span = (1.0, (prim.voltage_max_v or v_in) / v_in) if prim and v_in else (1.0, 1.0)
    for ws in windings_spec:
        if not isinstance(ws, Winding) or not ws.taps or ws.name not in built:
            continue
        w = built[ws.name]
        v = ws.voltage_v or 0.0
        for t in ws.taps:
            turn = min(max(1, round(w.turns * t.voltage_v / v)), w.turns - 1) if v else 1
            sec, layer, k = _where(w, turn)
            b = b_peak_max_t * (t.voltage_v / v) * (w.turns / turn) if ws.role == "primary" and v else None
            at = (w.voltage_v or v) * turn / w.turns
            out.append(TapResult(ws.name, t.voltage_v, turn, t.pin, sec, layer, k, v * turn / w.turns, b,
                                 (at * span[0], at * span[1])))
    return tuple(out)


def tap_checks(taps: Sequence[TapResult], limit_t: float) -> list[Check]:
    """A primary fed at a tap must stay under the flux limit (its whole-turn rounding can raise the flux)."""
    out = []
    for t in taps:
        if t.b_peak_max_t is None:
            continue
        ok = t.b_peak_max_t <= limit_t * 1.0005
        said = (f"{t.winding} fed at its {t.voltage_v:g} V tap (turn {t.turn}, pin {t.pin}): B_pk "
                f"{t.b_peak_max_t:.3f} T at the top of the range, limit {limit_t:.3f} T")
        out.append(Check("pass" if ok else "fail", "tap-flux", said))
    return out


def with_tap_tests(tests: TestPlan, taps: Sequence[TapResult], windings: Sequence[WindingResult],
                   tolerance: float, working_hz: float) -> TestPlan:
    """The test plan with a ratio test from each tap: the winding's start to the tap against the whole."""
    by = {w.name: w for w in windings}
    extra = []
    for t in taps:
        w = by[t.winding]
        r = w.turns / t.turn
        extra.append(finish(Limit(name="tap ratio", item=f"{w.name} {w.start}-{t.pin}", nominal=r,
                                  low=r * (1 - tolerance), high=r * (1 + tolerance), unit=":1",
                                  pins=f"{w.name} pins {w.start}-{w.finish} driven, {w.start}-{t.pin} read",
                                  setting=ratio_setting(working_hz),
                                  condition=f"{w.turns} : {t.turn} turns, the {t.voltage_v:g} V tap")))
    return replace(tests, ratio=tests.ratio + tuple(extra)) if extra else tests


def section_notes(windings: Sequence[WindingResult], shares: Mapping[str, tuple[float, ...]] | None = None
                  ) -> list[Check]:
    """How a winding's turns were shared among its sections: by the spec's ``section_shares`` where given,
    else, where they do not divide evenly, each section takes N // n and sections 1 .. N mod n one turn more
    (``kernel.section_turns``), so the split is said."""
    out = []
    for w in windings:
        n = len(w.sections)
        split = " + ".join(str(s.turns) for s in w.sections)
        given = (shares or {}).get(w.name)
        if n >= 2 and given:
            out.append(Check("pass", "sections",
                             f"winding {w.name}: {w.turns} turns wound as {split} in the shares "
                             f"{':'.join(f'{x:g}' for x in given)} the spec gives (section_shares)"))
            continue
        if n < 2 or w.turns % n == 0:
            continue
        extra = w.turns % n
        first = "section 1" if extra == 1 else f"sections 1 to {extra}"
        out.append(Check("pass", "sections",
                         f"winding {w.name}: {w.turns} turns do not divide into {n} equal sections; wound as {split} "
                         f"({first} one turn more): fix the turns at a multiple of {n} for equal sections"))
    return out

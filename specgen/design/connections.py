"""Several primaries and the ways they are connected; the load each secondary names.

A transformer may carry several equal primary windings (two 120 V halves of a 120/240 V part) with the
connections the customer makes outside it::

    connections:
      - {name: 120 V, mains_voltage: 120 V, parallel: [P1, P2]}              # links 1-3 and 2-4 (derived)
      - {name: 240 V, mains_voltage: 240 V, series: [P1, P2], links: ["2-3"]}

A series chain links each half's finish to the next half's start; a parallel connection links every half's
start to the first half's start and every finish to the first finish. ``links`` may be given (each
``"a-b"``), and then must be exactly those joints: a link to a pin nobody in the connection uses, or a chain
that does not close, is refused where it is written. Halves in parallel must have the same voltage and turns.

A secondary may name its load (``load: resistive``, ``load: {type: bridge_capacitor, capacitance: 2200 uF}``,
``load: {type: centre_tapped, other_half: S2}``, ``load: converter``, ``load: forward``: a forward converter's
output winding, driven by a unipolar pulse; ``load: {type: gate_drive, gate_charge: 60 nC, gate_resistance:
5 ohm}``: a switch's gate, charge pulses at each edge, ``physics.gate_drive``); the currents each load draws are in
``physics.rectifier_loads``.
"""

from __future__ import annotations

from ..loading import Reader
from ..records import record
from .windings_result import ConnectionResult

LOAD_TYPES = ("resistive", "bridge_capacitor", "centre_tapped", "converter", "forward", "gate_drive")
VOLTAGE_MATCH = 0.01      # a connection's mains voltage and its halves' voltages agree within 1 %


@record
class Load:
    """What a secondary feeds (``physics.rectifier_loads`` turns it into the winding's rms current)."""
    type: str                           # one of LOAD_TYPES
    capacitance_f: float | None = None  # bridge_capacitor: the reservoir capacitor
    other_half: str | None = None       # centre_tapped: the winding that conducts in the other half-cycle
    gate_charge_c: float | None = None       # gate_drive: the charge the gate takes each edge
    gate_resistance_ohm: float | None = None  # gate_drive: the loop resistance the pulse flows through
    gate_voltage_v: float | None = None      # gate_drive: the gate's swing (default: the winding's voltage)


@record
class Connection:
    """One way the primaries are joined outside the part, and the mains voltage it serves."""
    name: str
    primaries: tuple[str, ...]
    mode: str                           # series | parallel
    mains_voltage_v: float
    links: tuple[tuple[str, str], ...]  # pin pairs joined by the user
    line: int | None = None
    index: int = 0                      # place in ``connections``, to locate errors


def parse_load(r: Reader, role: str) -> Load | None:
    """The ``load`` of a winding: a type name or a mapping with ``type``; None when not given."""
    if not r.has("load"):
        r.raw("load", None)
        return None
    raw = r.raw("load")
    if role not in ("secondary", "auxiliary"):
        raise r.error(f"a {role} winding draws no load: 'load' is for secondary and auxiliary windings", "load")
    if isinstance(raw, str):
        kind = raw.strip()
        if kind not in LOAD_TYPES:
            raise r.error(f"expected one of {', '.join(LOAD_TYPES)}, got '{kind}'", "load")
        if kind in ("bridge_capacitor", "centre_tapped", "gate_drive"):
            need = {"bridge_capacitor": "capacitance", "centre_tapped": "other_half",
                    "gate_drive": "gate_charge and gate_resistance"}[kind]
            raise r.error(f"load {kind} needs its {need}: write load: {{type: {kind}, {need}: ...}}", "load")
        return Load(kind)
    sub = r.mapping("load")
    kind = sub.choice("type", LOAD_TYPES)
    load = Load(kind)
    if kind == "bridge_capacitor":
        load = Load(kind, capacitance_f=sub.quantity("capacitance", "capacitance"))
    elif kind == "centre_tapped":
        load = Load(kind, other_half=sub.text("other_half", max_len=40).strip())
    elif kind == "gate_drive":
        load = Load(kind, gate_charge_c=sub.quantity("gate_charge", "charge"),
                    gate_resistance_ohm=sub.quantity("gate_resistance", "resistance"),
                    gate_voltage_v=sub.quantity("gate_voltage", "voltage", None))
    sub.done()
    return load


def _pin_pair(r: Reader, key: str, i: int, item: object) -> tuple[str, str]:
    text = str(item).strip()
    a, sep, b = text.partition("-")
    if not sep or not a.strip() or not b.strip():
        raise r.item_error(key, i, f"a link is two pins joined by '-', like \"2-3\", got {text!r}")
    return a.strip(), b.strip()


def expected_links(mode: str, ends: list[tuple[str, str]]) -> tuple[tuple[str, str], ...]:
    """The joints a connection needs: series finish(i)-start(i+1); parallel starts and finishes to the first's."""
    if mode == "series":
        return tuple((ends[i][1], ends[i + 1][0]) for i in range(len(ends) - 1))
    first = ends[0]
    return tuple(p for s, f in ends[1:] for p in ((first[0], s), (first[1], f)))


def parse_connections(r: Reader, kind: str, windings: tuple[object, ...],
                      wreaders: list[Reader]) -> tuple[Connection, ...]:
    """The ``connections`` list of a transformer, every mistake located (see the module docstring); the
    windings' loads checked against each other first (``check_loads``)."""
    from .spec import Winding

    check_loads(kind, windings, wreaders)
    if kind != "transformer":
        return ()
    ws = [w for w in windings if isinstance(w, Winding)]
    prims = {w.name: w for w in ws if w.role == "primary"}
    if not r.has("connections"):
        r.raw("connections", None)
        return ()
    out: list[Connection] = []
    for c in r.items("connections", min_items=1):
        name = c.text("name", max_len=40).strip()
        if c.has("series") == c.has("parallel"):
            raise c.error("a connection is either series: [P1, P2] or parallel: [P1, P2]", "series")
        mode = "series" if c.has("series") else "parallel"
        names = [str(x).strip() for x in c.list_of(mode)]
        if len(names) < 2 or len(set(names)) != len(names):
            raise c.error(f"a {mode} connection joins two or more different primaries", mode)
        for i, n in enumerate(names):
            if n not in prims:
                raise c.item_error(mode, i, f"'{n}' is not a primary winding (primaries: {', '.join(prims)})")
        mains = c.quantity("mains_voltage", "voltage")
        halves = [prims[n] for n in names]
        volts = [w.voltage_v or 0.0 for w in halves]
        served = sum(volts) if mode == "series" else volts[0]
        if mode == "parallel":
            for w in halves[1:]:
                if abs((w.voltage_v or 0.0) - volts[0]) > VOLTAGE_MATCH * volts[0]:
                    raise c.error(f"{w.name} ({w.voltage_v or 0.0:g} V) cannot be paralleled with {halves[0].name} "
                                  f"({volts[0]:g} V): halves in parallel have the same voltage", mode)
                if w.turns != halves[0].turns:
                    raise c.error(f"{w.name} and {halves[0].name} have different fixed turns ({w.turns} and "
                                  f"{halves[0].turns}): halves in parallel must have the same turns", mode)
        if abs(served - mains) > VOLTAGE_MATCH * mains:
            how = " + ".join(f"{v:g}" for v in volts) if mode == "series" else f"{volts[0]:g}"
            raise c.error(f"{mode} {'+'.join(names)} serves {how} V, not the {mains:g} V given", "mains_voltage")
        ends = [(w.start or "", w.finish or "") for w in halves]
        want = expected_links(mode, ends)
        links = want
        if c.has("links"):
            raw = c.list_of("links")
            got = [_pin_pair(c, "links", i, x) for i, x in enumerate(raw)]
            used = {p for e in ends for p in e}
            for i, (a, b) in enumerate(got):
                for p in (a, b):
                    if p not in used:
                        raise c.item_error("links", i, f"link {a}-{b} joins pin {p}, which no primary in this "
                                                       f"connection uses ({', '.join(sorted(used))})")
            norm = {frozenset(p) for p in got}
            missing = [p for p in want if frozenset(p) not in norm]
            extra = [p for p in got if frozenset(p) not in {frozenset(q) for q in want}]
            if missing or extra:
                need = ", ".join(f"{a}-{b}" for a, b in want)
                raise c.error(f"the {mode} connection of {'+'.join(names)} does not close with these links: it "
                              f"needs exactly {need}", "links")
            links = tuple(got)
        else:
            c.raw("links", None)
        out.append(Connection(name, tuple(names), mode, mains, links, c.line, len(out)))
        c.done()
    named = [x.name for x in out]
    if len(set(named)) != len(named):
        raise r.error("two connections share a name", "connections")
    joined = {n for x in out for n in x.primaries}
    left = [n for n in prims if n not in joined]
    if left:
        raise r.error(f"primary {', '.join(left)} is in no connection: name it in one", "connections")
    return tuple(out)


def check_loads(kind: str, windings: tuple[object, ...], wreaders: list[Reader]) -> None:
    """Loads only on a transformer; a centre-tapped half names another secondary of the same voltage and
    current, and both agree."""
    from .spec import Winding

    ws = [w for w in windings if isinstance(w, Winding)]
    by_name = {w.name: w for w in ws}
    for w, wr in zip(ws, wreaders):
        if w.load is not None and kind != "transformer":
            raise wr.error(f"'load' is read for a transformer's secondaries, not by kind {kind}", "load")
        if w.load is None or w.load.type != "centre_tapped":
            continue
        other = by_name.get(w.load.other_half or "")
        if other is None or other is w or other.role != w.role:
            raise wr.error(f"'{w.load.other_half}' names no other {w.role} winding", "load")
        if other.voltage_v != w.voltage_v or other.current_a != w.current_a:
            raise wr.error(f"the halves of a centre-tapped winding have the same voltage and load current; "
                           f"{other.name} differs", "load")
        if other.load is not None and (other.load.type != "centre_tapped" or other.load.other_half != w.name):
            raise wr.error(f"{other.name} declares a different load; a centre-tapped pair names each other", "load")
        if w.current_a is None:
            raise wr.error("a centre-tapped half needs the DC load current (current:)", "current")


def connection_results(connections: tuple[Connection, ...], half_voltage_max_ratio: float, freq_hz: float,
                       turns: int, ae_m2: float, waveform: str, duty: float) -> tuple[ConnectionResult, ...]:
    """Each connection's voltage across one half and its peak flux (Faraday), the worst one marked.

    A series chain of k equal halves puts V_mains / k across each; a parallel connection puts V_mains across
    every half. The top of the range scales with the primaries' voltage_max / voltage."""
    from ..physics import faraday

    rows = []
    for c in connections:
        half = c.mains_voltage_v / len(c.primaries) if c.mode == "series" else c.mains_voltage_v
        b = float(faraday.b_peak_t(half, freq_hz, turns, ae_m2, waveform, duty))
        b_max = float(faraday.b_peak_t(half * half_voltage_max_ratio, freq_hz, turns, ae_m2, waveform, duty))
        rows.append((c, half, b, b_max))
    top = max(r[3] for r in rows) if rows else 0.0
    worst_seen = False
    out = []
    for c, half, b, b_max in rows:
        worst = not worst_seen and b_max >= top * (1 - 1e-12)
        worst_seen = worst_seen or worst
        out.append(ConnectionResult(c.name, c.primaries, c.mode, c.mains_voltage_v, c.links, half, b, b_max, worst))
    return tuple(out)

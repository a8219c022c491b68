"""The ``current_transformer`` section of a spec (kind: current_transformer)::

    current_transformer:
      primary_current: 20 A          # rated, rms
      primary_current_max: 30 A      # top of the range (default: the rated current)
      primary_turns: 1               # 1: a single conductor passed through the core (default)
      turns_ratio: "1:100"           # N_p:N_s ... or secondary_current: 0.2 A (at the rated primary current)
      burden: 10 ohm                 # resistive ... or burden_va: 0.4 VA (at the rated secondary current)
      current_shape: sine            # sine | dc_offset | unipolar
      accuracy: {ratio_error: 0.5, phase_error: 0.5}    # percent, degrees (optional)

Windings: one secondary (wound on the core); a primary winding only when ``primary_turns`` is above 1.
"""

from __future__ import annotations

from ..loading import Reader
from .limits import MAX_TURNS
from .spec import THROUGH_CONDUCTOR, Barrier, CurrentTransformerReq, Winding

CURRENT_SHAPES = ("sine", "dc_offset", "unipolar")
SECTION_KEYS = ("primary_current", "primary_current_max", "primary_turns", "turns_ratio", "secondary_current",
                "burden", "burden_va", "current_shape", "accuracy")
# operating keys a current transformer does not read: its drive is the primary current, a sine (current_shape
# says otherwise), and it has no efficiency to size a primary with
UNUSED_OPERATING_KEYS = ("waveform", "duty", "efficiency")


def refuse_unused(r: Reader, keys: tuple[str, ...], allowed: bool = False) -> None:
    """A key kind current_transformer does not use is an error naming the key and the kind.

    ``allowed``: ``keys`` are the only keys allowed; otherwise they are the keys refused."""
    for key in list(r.data) if allowed else keys:
        if (key not in keys) if allowed else r.has(key):
            raise r.error(f"'{key}' is not used by kind current_transformer", str(key))


def _ratio(r: Reader) -> tuple[float, float] | None:
    """``turns_ratio: "a:b"`` as (a, b), or None when absent."""
    raw = r.raw("turns_ratio", None)
    if raw is None:
        return None
    a, sep, b = str(raw).partition(":")
    try:
        pa, pb = float(a), float(b)
    except ValueError:
        pa = pb = -1.0
    if not sep or not (pa > 0 and pb > 0):
        raise r.error(f"expected a turns ratio like '1:100' (primary:secondary turns), got '{raw}'", "turns_ratio")
    return pa, pb


def parse_current_transformer(r: Reader, windings: tuple[Winding, ...], wreaders: list[Reader],
                              barriers: tuple[Barrier, ...] = ()) -> CurrentTransformerReq:
    refuse_unused(r, SECTION_KEYS, allowed=True)
    ip = r.quantity("primary_current", "current")
    ip_max = r.quantity("primary_current_max", "current", ip)
    if ip_max < ip:
        raise r.error("primary_current_max is below the rated primary current", "primary_current_max")
    np_turns = r.integer("primary_turns", 1, minimum=1, maximum=1000)
    ratio = _ratio(r)
    i_s = r.quantity("secondary_current", "current", None)
    if (ratio is None) == (i_s is None):
        raise r.error("give either turns_ratio ('1:100') or secondary_current at the rated primary current",
                      "turns_ratio")
    n_float = np_turns * ratio[1] / ratio[0] if ratio is not None else np_turns * ip / float(i_s or 1.0)
    ns = round(n_float)
    if ns < 1 or abs(n_float - ns) > 1e-6 * max(n_float, 1.0) or ns > MAX_TURNS:
        key = "turns_ratio" if ratio is not None else "secondary_current"
        raise r.error(f"{np_turns} primary turn(s) give {n_float:.6g} secondary turns: a current transformer needs a "
                      f"whole number of turns (1 to {MAX_TURNS})", key)
    turns_ratio = ns / np_turns
    burden = r.quantity("burden", "resistance", None, allow_zero=True)
    burden_va = r.quantity("burden_va", "apparent_power", None)
    if (burden is None) == (burden_va is None):
        raise r.error("give either burden (ohms) or burden_va (VA at the rated secondary current)", "burden")
    if burden is None:
        i_sec = ip / turns_ratio
        burden = float(burden_va or 0.0) / (i_sec * i_sec)
    shape = r.choice("current_shape", CURRENT_SHAPES, "sine")
    ratio_err = phase_err = None
    acc = r.mapping("accuracy", None)
    if acc is not None:
        ratio_err = acc.number("ratio_error", None, minimum=1e-4, maximum=50.0)
        phase_err = acc.number("phase_error", None, minimum=1e-4, maximum=90.0)
        acc.done()
    r.done()
    _check_ct_windings(r, windings, wreaders, np_turns)
    _check_through_barrier(r, barriers, np_turns)
    return CurrentTransformerReq(primary_current_a=ip, primary_current_max_a=ip_max, primary_turns=np_turns,
                                 turns_ratio=turns_ratio, burden_ohm=burden, current_shape=shape,
                                 ratio_error_pct=ratio_err, phase_error_deg=phase_err)


_UNUSED_WINDING_KEYS = ("voltage", "voltage_min", "voltage_max", "current", "va", "turns", "same_turns_as")


def _check_ct_windings(r: Reader, windings: tuple[Winding, ...], wreaders: list[Reader], np_turns: int) -> None:
    """One secondary; a primary winding only for a wound primary; turns and currents come from the section."""
    secs = [w for w in windings if w.role == "secondary"]
    prims = [w for w in windings if w.role == "primary"]
    if len(secs) != 1:
        raise r.error(f"a current transformer needs exactly one secondary winding, found {len(secs)}", "windings")
    if np_turns == 1 and prims:
        raise wreaders[windings.index(prims[0])].error(
            "primary_turns is 1 (a conductor passed through the core): leave the primary out of windings, or give "
            "primary_turns", "role")
    if np_turns > 1 and len(prims) != 1:
        raise r.error(f"primary_turns {np_turns} needs one primary winding in windings", "primary_turns")
    for w, wr in zip(windings, wreaders):
        if w.role not in ("primary", "secondary"):
            raise wr.error(f"role '{w.role}' is not used by kind current_transformer (primary or secondary)", "role")
        if w.sections != 1:
            raise wr.error("a current-transformer winding is wound in one section here", "sections")
        refuse_unused(wr, _UNUSED_WINDING_KEYS)


def _check_through_barrier(r: Reader, barriers: tuple[Barrier, ...], np_turns: int) -> None:
    """A pass-through primary's insulation to the secondary is stated as a barrier naming 'conductor'; a wound
    primary has none (its own barrier names it)."""
    through = [b for b in barriers if THROUGH_CONDUCTOR in (b.a.strip(), b.b.strip())]
    if np_turns > 1 and through:
        raise r.error(f"a barrier names '{THROUGH_CONDUCTOR}' (a primary passed through the core) but "
                      f"primary_turns is {np_turns}: name the primary winding instead", "primary_turns")

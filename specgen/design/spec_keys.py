"""Keys a kind does not use: each is a located error that names the key and the kind, never silently dropped.

The current-transformer and flyback kinds refuse theirs in ``ct_spec`` and ``flyback_spec``; this module holds the
transformer's and the inductor's: what each winding role, the core and the operating section may carry.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from ..loading import Reader

if TYPE_CHECKING:
    from .spec import Winding

# winding keys each role of these kinds does not use, with the reason a shop engineer acts on
_TRANSFORMER_WINDING: dict[str, dict[str, str]] = {
    "primary": {
        "current": "the primary current follows from the loads (the secondaries' currents and the losses)",
        "va": "the primary's power follows from the loads (the secondaries' currents or va)",
        "same_turns_as": "several primaries get equal turns from their declared connections",
        "voltage_min": "the outputs are met at the primary's nominal voltage (within their voltage_tolerance) and "
                       "the flux at its voltage_max; nothing is designed at a low line, so if the outputs must hold "
                       "there, give that low line as the primary's voltage",
    },
    "secondary": {
        "voltage_min": "an output is held at its nominal voltage within its voltage_tolerance",
        "voltage_max": "an output is held at its nominal voltage within its voltage_tolerance",
    },
    "shield": {
        "voltage": "a shield carries no load", "voltage_min": "a shield carries no load",
        "voltage_max": "a shield carries no load", "current": "a shield carries no load", "va": "a shield carries no load",
        "same_turns_as": "a shield's turns fill one layer or are given with turns",
    },
}
_TRANSFORMER_WINDING["auxiliary"] = _TRANSFORMER_WINDING["secondary"]

_INDUCTOR_WINDING = {
    key: "an inductor's currents and inductance are in its 'inductor' section"
    for key in ("voltage", "voltage_min", "voltage_max", "current", "va")
} | {"same_turns_as": "an inductor has one winding"}

_INDUCTOR_OPERATING = {
    "waveform": "an inductor's current is given in its 'inductor' section (DC with a triangular ripple, or an AC "
                "reactor's sine)",
    "duty": "give a choke's ripple duty as 'duty' in the 'inductor' section",
    "efficiency": "an inductor's losses are computed, not estimated from an efficiency",
}


def winding_key_used(kind: str, role: str, key: str) -> bool:
    """Whether a winding of this role in this kind uses the key (a draft spec writes only those)."""
    return unused_winding_key_reason(kind, role, key) is None


def unused_winding_key_reason(kind: str, role: str, key: str) -> str | None:
    """Why a winding of this role in this kind does not use the key (None: it does); the search's requirement
    refuses such keys with the same sentence."""
    table = _TRANSFORMER_WINDING.get(role, {}) if kind == "transformer" else _INDUCTOR_WINDING if kind == "inductor" else {}
    return table.get(key)


def refuse_unused_keys(kind: str, core: Reader, op: Reader, windings: tuple[Winding, ...],
                       wreaders: list[Reader]) -> None:
    """Raise a located error for the first key this kind does not use (transformer and inductor)."""
    if kind == "transformer":
        for key in ("gap", "gap_arrangement"):
            if core.has(key):
                raise core.error(f"'{key}' is not used by kind transformer: a transformer's core is not gapped here; "
                                 f"a gapped transformer that stores energy is a flyback: use kind: flyback "
                                 f"(its gap is found from the primary inductance)", key)
        for w, wr in zip(windings, wreaders):
            _refuse(wr, kind, _TRANSFORMER_WINDING.get(w.role, {}), f"on a {w.role} winding")
    elif kind == "inductor":
        for wr in wreaders:
            _refuse(wr, kind, _INDUCTOR_WINDING, "on its winding")
        _refuse(op, kind, _INDUCTOR_OPERATING, "in 'operating'")


def _refuse(r: Reader, kind: str, reasons: dict[str, str], where: str) -> None:
    for key, why in reasons.items():
        if r.has(key):
            raise r.error(f"'{key}' is not used by kind {kind} {where}: {why}", key)

"""The shop's cooling figures (``shop.yaml cooling``): forced air's default speed, potting's stated factor."""

from __future__ import annotations

from ..design.limits import AIR_SPEED_MAX_M_S
from ..loading import Reader
from .models import CoolingFigures


def read_cooling(r: Reader) -> CoolingFigures:
    """The shop's forced-air speed and potting factor (``design.kernel.cooling_model`` reads them)."""
    d, c = CoolingFigures(), r.mapping("cooling", None)
    if c is None:
        return d
    out = CoolingFigures(
        air_speed_m_s=c.quantity("air_speed", "speed", d.air_speed_m_s, minimum=0.05, maximum=AIR_SPEED_MAX_M_S),
        potted_rise_factor=c.number("potted_rise_factor", d.potted_rise_factor, minimum=0.2, maximum=1.5),
        potted_source=c.text("potted_source", d.potted_source, max_len=500))
    c.done()
    return out

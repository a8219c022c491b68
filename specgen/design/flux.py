"""The flux-density limit of one design, with its basis in words (the kernel's ``flux_limit_t``)."""

from __future__ import annotations

from ..catalog.models import Catalog, Material
from . import kernel as K
from .result import Check
from .spec import Spec
from .state import DesignState, FluxLimit


def b_sat_hot_t(material: Material, temp_c: float) -> float:
    """The material's B_sat at a temperature (``kernel.b_sat_t`` on its catalogue points)."""
    return float(K.b_sat_t(material.b_sat_25c_t, material.b_sat_100c_t, temp_c))


def flux_limit(spec: Spec, cat: Catalog, material: Material, hot_c: float) -> FluxLimit:
    """The spec's limit, else the material's design value, else the shop's fraction of B_sat at the hot spot; a
    powder's no higher than where it counts as saturated on its DC-bias curve (``kernel.powder_saturation_t``)."""
    m = material
    frac = cat.shop.flux_limit_fraction
    args = (m.b_sat_25c_t, m.b_sat_100c_t, hot_c, frac, m.b_design_t, spec.flux_limit_t)
    value = float(K.flux_limit_t(*args))
    source = K.flux_limit_source(*args)
    if source == K.FLUX_LIMIT_SPEC:
        return FluxLimit(value, "spec")
    if m.is_powder:
        bsat = b_sat_hot_t(m, hot_c)
        pfrac = cat.shop.powder_saturation_fraction
        sat = float(K.powder_saturation_t(bsat, pfrac, K.powder_ceiling_t(m.mu_initial, *m.bias_fit())))
        if sat < value:
            return FluxLimit(sat, f"{pfrac:.0%} of the {sat / pfrac:.2f} T its DC-bias curve tends to (below B_sat "
                                  f"{bsat:.2f} T at {hot_c:.0f} °C; shop rule powder_saturation_fraction)")
    if source == K.FLUX_LIMIT_DESIGN:
        return FluxLimit(value, f"material design value ({m.id})")
    return FluxLimit(value, f"{frac:.0%} of B_sat {b_sat_hot_t(m, hot_c):.2f} T at {hot_c:.0f} °C (shop rule)")


def saturation_checks(state: DesignState, said: str, b_t: float, remedy: str, *, slack: float = 1.0,
                      limit_in_pass: bool = True) -> list[Check]:
    """The saturation check a kind heads its list with: fail where ``b_t`` passes B_sat at the hot spot
    (``remedy`` says what to change), warn above the working limit (times ``slack``), else pass.
    ``said`` is the kind's own account of the flux (``B_pk ... at ...``)."""
    temp, limit = state.temp, state.summary.flux_limit
    bsat = b_sat_hot_t(state.parts.material, temp.hot_c)
    if b_t > bsat:
        return [Check("fail", "saturation", f"{said} exceeds B_sat {bsat:.2f} T at {temp.hot_c:.0f} °C: {remedy}")]
    if b_t > limit.value_t * slack:
        return [Check("warn", "saturation", f"{said} is above the {limit.value_t:.3f} T working limit "
                                            f"({limit.basis}) though below B_sat {bsat:.2f} T")]
    shown = f", limit {limit.value_t:.3f} T" if limit_in_pass else ""
    return [Check("pass", "saturation", f"{said}{shown}; B_sat at {temp.hot_c:.0f} °C is {bsat:.2f} T")]

"""Temperature: the alpha-stat reading at 37 degC and the pH-stat view at the patient's temperature."""

from __future__ import annotations

from ...formulas import temperature
from .thresholds import PCO2_HIGH, PCO2_LOW, PH_HIGH, PH_LOW
from .work import _Work

# -- temperature ---------------------------------------------------------------------------------------------


def _temperature(w: _Work) -> None:
    s, r = w.s, w.r
    if not w.fires("temperature_ph_stat_view"):
        return
    t = s.temperature
    ph_t = temperature.ph_at_temperature_rosenthal(ph=s.ph, temperature_c=t)
    pco2_t = temperature.pco2_at_temperature(pco2_mmhg=s.pco2, temperature_c=t)
    r.computed(
        "ph_at_temperature",
        ph_t,
        f"pH at {t:.1f} °C (Rosenthal)",
        "pH_T = pH37 + (T - 37) x (-0.0147 + 0.0065 x (7.40 - pH37))",
        "rosenthal1948",
        decimals=2,
    )
    r.computed(
        "pco2_at_temperature",
        pco2_t,
        f"PCO2 at {t:.1f} °C",
        "PCO2_T = PCO2_37 x 10^(0.019 x (T - 37))",
        "bradley1956",
        pressure=True,
    )
    po2_t = None
    if s.po2 is not None:
        po2_t = temperature.po2_at_temperature_severinghaus(po2_mmhg=s.po2, temperature_c=t)
        r.computed(
            "po2_at_temperature",
            po2_t,
            f"PO2 at {t:.1f} °C (Severinghaus 1979 eq 3, single step)",
            "PO2_T = PO2_37 x exp((T - 37) x (0.058 / (0.243 x (PO2/100)^3.88 + 1) + 0.013))",
            "severinghaus1979",
            pressure=True,
        )
    ph_ok = PH_LOW <= ph_t <= PH_HIGH
    pco2_ok = PCO2_LOW <= pco2_t <= PCO2_HIGH
    near = ph_ok and pco2_ok
    text = (
        f"The analyser measured at 37 °C; the patient is at {t:.1f} °C. Alpha-stat (used for this "
        "interpretation) reads the 37 °C values. The pH-stat view reads the corrected values: pH "
        f"{ph_t:.2f}, PCO2 {w.p(pco2_t)}"
        + (f", PO2 {w.p(po2_t)}" if po2_t is not None else "")
        + (
            ", which are near normal."
            if near
            else ", which are "
            + ("outside" if not (ph_ok or pco2_ok) else "partly outside")
            + " the reference ranges."
        )
    )
    r.finding("temperature_ph_stat_view", "info", text)
    w.temp = {"t": t, "ph": ph_t, "pco2": pco2_t, "near_normal": near}

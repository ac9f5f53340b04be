"""The state one blood_gas report carries through its steps."""

from __future__ import annotations

from ... import units
from ...report import PRESSURE_DECIMALS, Report, compared
from .decision import Decision, _code, disorders
from .reading import _Sample
from .thresholds import MET_ACID, MET_ALK, PCO2_HIGH, SPO2_BASIS


class _Work:
    """The report being written for one sample, with the decisions it rests on (``d``)."""

    def __init__(self, s: _Sample, report: Report, d: Decision):
        self.s = s
        self.r = report
        self.d = d
        self.primary: str | None = _code(d.primary)
        self.tentative = bool(d.tentative)
        self.hco3: float = d.hco3  # the HCO3 the rules use
        self.hco3_out: float = d.hco3_out  # the reported HCO3, else computed
        self.consistent: bool | None = (not d.doubtful) if d.hco3_given else None
        self.sbe: float = d.sbe
        self.disorders: list[dict] = disorders(d)
        self.resp: bool = bool(d.respiratory_primary)
        self.met_expected = d.met_expected if self.primary in (MET_ACID, MET_ALK) else None
        self.compensation_text = ""
        self.ag_used: float | None = None
        self.acidosis_type: str | None = _code(d.acidosis_type)
        self.oxygen: dict = {}
        self.temp: dict = {}
        self.pco2_target: float | None = None
        self.target_basis: str | None = None
        self.spo2_target: tuple[int, int] | None = None
        self.niv: str | None = None

    # -- helpers ---------------------------------------------------------------------------------------------
    def p(self, mmhg: float, against: float | None = None) -> str:
        """A pressure in the user's unit, as text; with ``against`` (a limit the sentence compares it with,
        mmHg) never shown equal to it (report.compared)."""
        return self.r.pressure_text(mmhg, against=against)

    def p_and_limit(self, mmhg: float, limit: float) -> tuple[str, str]:
        """A pressure and the limit (both mmHg) a sentence compares it with, as text in the user's unit,
        never reading the same (report.compared)."""
        unit = self.r.pressure_unit
        texts = compared(
            units.convert(mmhg, "mmHg", unit), units.convert(limit, "mmHg", unit), PRESSURE_DECIMALS[unit]
        )
        return f"{texts[0]} {unit}", f"{texts[1]} {unit}"

    def ph(self, against: float) -> str:
        """The sample's pH as text beside a pH limit a sentence compares it with (report.compared)."""
        return compared(self.s.ph, against, 2)[0]

    def basis_text(self, basis: str) -> str:
        """Why the SpO2 target is what it is, thresholds in the user's unit."""
        return SPO2_BASIS[basis].format(limit=self.p(PCO2_HIGH))

    def pf(self, mmhg: float) -> str:
        """A P/F ratio in the user's pressure unit, as text (kPa to one decimal, mmHg whole)."""
        if self.r.pressure_unit == "kPa":
            return f"{units.convert(mmhg, 'mmHg', 'kPa'):.1f} kPa"
        return f"{mmhg:.0f} mmHg"

    def codes(self) -> list[str]:
        return [d["code"] for d in self.disorders]

    def has(self, code: str) -> bool:
        return bool(self.d.has[code])

    def fires(self, code: str) -> bool:
        return bool(self.d.finding[code])

    @property
    def doubtful(self) -> bool:
        return self.consistent is False

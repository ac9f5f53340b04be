"""An invented, messy export of blood gases, written the way hospital systems and spreadsheets write them.

    python3 tests/core/messy_export.py OUT.csv [--episodes 307] [--seed 19] [--comma]

About 2,000 gases from about 300 anonymous episodes (``EP-0001`` ...), with everything an audit lead meets in
a real export: a byte-order mark, Windows line endings, semicolons with decimal commas (``--comma``: commas
with decimal points), the trade's header spellings (``pCO2 (kPa)``, ``HCO3- (mmol/L)``, ``Na+``, ``Sample
type``), site codes (ABG, art, VBG, CBG, cap, arterialised capillary, and now and then none), censored
results (``<0,5`` lactate, ``>33,3`` glucose), unreadable optional cells (``haemolysed``), a few rows whose pH
or PCO2 cannot be read, accented ward names and a quoted comment holding the delimiter.

All data are invented: no real patients, people, places or brands. :func:`make_export` returns the text and
a ledger of what was planted in it (by row), so a test can check that the batch finds each thing where it
was put.
"""

from __future__ import annotations

import argparse
import math
import random
from collections import Counter
from dataclasses import dataclass, field

WARDS = ("Pavillon Été", "Unité Côte-Nord", "Ward 7B", "Station Øst", "Respiratory Unit", "Salle Mères")
SITES = {
    "arterial": ("ABG", "Arterial", "art", "A", "arterial blood gas"),
    "venous": ("VBG", "venous", "Ven", "V"),
    "capillary": ("CBG", "cap", "Arterialised capillary", "earlobe"),
}
HEADER = (
    "Episode",
    "Taken at",
    "Ward",
    "Sample type",
    "pH",
    "pCO2 (kPa)",
    "pO2 (kPa)",
    "HCO3- (mmol/L)",
    "BE (mmol/L)",
    "FiO2 (%)",
    "SpO2 (%)",
    "Na+",
    "K+",
    "Cl-",
    "Lactate (mmol/L)",
    "Glucose (mmol/L)",
    "Age",
    "Events",
    "Comment",
)
#: kinds of planted NIV episodes: the pH over the gases after NIV starts (and the PCO2 that goes with it)
NIV_KINDS = ("improving", "failing", "overshoot")


@dataclass
class Ledger:
    """What was planted, per data row (0-based, in file order)."""

    rows: int = 0
    episodes: int = 0
    site: list = field(default_factory=list)  #: per row: arterial, venous, capillary or None (not given)
    bad_required: dict = field(default_factory=dict)  #: row -> "pH" or "PCO2" (cannot be read)
    unreadable: dict = field(default_factory=dict)  #: row -> the optional input left unreadable ("potassium")
    censored: dict = field(default_factory=dict)  #: row -> list of the inputs given as censored results
    #: per row: its episode key, its time cell, minutes since 2026-03-01 00:00, the pH and PCO2 [kPa] as
    #: written (None when planted unreadable), FiO2 [%], SpO2 [%] or None, its events cell
    episode: list = field(default_factory=list)
    time: list = field(default_factory=list)
    minutes: list = field(default_factory=list)
    ph: list = field(default_factory=list)
    pco2: list = field(default_factory=list)
    fio2: list = field(default_factory=list)
    spo2: list = field(default_factory=list)
    events: list = field(default_factory=list)
    niv: dict = field(default_factory=dict)  #: episode key -> kind (NIV_KINDS) of a planted NIV episode
    venous_only: set = field(default_factory=set)  #: episode keys planted with venous hypercapnia only
    #: episode key -> "one_read" (only its first pH readable) or "same_time" (two gases at one moment)
    broken: dict = field(default_factory=dict)

    def sites(self) -> Counter:
        return Counter(s or "not given" for s in self.site)


def _scenario(rng: random.Random) -> tuple[float, float, float]:
    """(pH, PCO2 kPa, HCO3 mmol/L) of one invented gas: CO2 retention, metabolic disorders or normal."""
    kind = rng.random()
    if kind < 0.35:  # CO2 retention, chronic or acute-on-chronic
        pco2, hco3 = rng.uniform(6.5, 11.5), rng.uniform(26, 38)
    elif kind < 0.55:  # metabolic acidosis
        hco3 = rng.uniform(8, 21)
        pco2 = (1.5 * hco3 + 8 + rng.uniform(-4, 4)) / 7.50062
    elif kind < 0.65:  # metabolic alkalosis
        hco3 = rng.uniform(28, 40)
        pco2 = (40 + 0.7 * (hco3 - 24) + rng.uniform(-5, 5)) / 7.50062
    else:  # normal or nearly so
        pco2, hco3 = rng.uniform(4.5, 6.2), rng.uniform(21, 28)
    ph = 6.1 + math.log10(hco3 / (0.0307 * pco2 * 7.50062))
    return min(max(ph, 6.9), 7.65), pco2, hco3


def _stamp(minutes: int) -> str:
    """A time cell as the export writes it: minutes since 2026-03-01 00:00 -> ``2026-03-DD HH:MM``."""
    day, minute = divmod(minutes, 1440)
    return f"2026-03-{day + 1:02d} {minute // 60:02d}:{minute % 60:02d}"


def _niv_ph(kind: str, ph0: float, j: int, plan) -> float:
    """The pH of gas ``j`` (0: the gas after which NIV started) of a planted NIV episode of ``kind``."""
    if j == 0:
        return ph0
    if kind == "improving":
        return round(min(ph0 + 0.04 * j + plan.choice((0.0, 0.01)), 7.40), 2)
    if kind == "failing":
        return round(ph0 + plan.choice((-0.04, -0.02, 0.0, 0.01, 0.02)), 2)
    return round(min(ph0 + 0.08 * j, 7.50), 2)  # overshoot: into alkalaemia, the PCO2 far below


def make_export(episodes: int = 307, seed: int = 19, *, european: bool = True) -> tuple[str, Ledger]:
    """The export's text and its ledger. ``european``: semicolons and decimal commas (else commas and
    decimal points)."""
    rng = random.Random(seed)
    plan = random.Random(seed * 1009 + 1)  # what is planted per episode: the main stream stays as it was
    sep = ";" if european else ","
    ledger = Ledger(episodes=episodes)

    def num(x: float, decimals: int) -> str:
        text = f"{x:.{decimals}f}"
        return text.replace(".", ",") if european else text

    def quoted(text: str) -> str:
        return '"' + text.replace('"', '""') + '"' if sep in text or '"' in text else text

    lines = [sep.join(HEADER)]
    for e in range(1, episodes + 1):
        age = rng.randint(34, 92)
        ward = rng.choice(WARDS)
        day, minute = rng.randint(1, 28), rng.randint(0, 23 * 60)
        key = f"EP-{e:04d}"
        kind = plan.choices(
            ("niv", "venous_only", "one_read", "same_time", None), (0.16, 0.07, 0.02, 0.02, 0.73)
        )[0]
        niv_kind = plan.choice(NIV_KINDS) if kind == "niv" else None
        if niv_kind:
            ledger.niv[key] = niv_kind
        elif kind == "venous_only":
            ledger.venous_only.add(key)
        elif kind:
            ledger.broken[key] = kind
        ph0, hco3_0 = round(plan.uniform(7.18, 7.29), 2), plan.uniform(31, 36)
        start = (day - 1) * 1440 + minute
        offset = 0
        for j in range(rng.randint(2, 11)):
            row = ledger.rows
            ph, pco2, hco3 = _scenario(rng)
            site = rng.choices(("arterial", "venous", "capillary", None), (0.62, 0.2, 0.12, 0.06))[0]
            ledger.site.append(site)
            site_cell = rng.choice(SITES[site]) if site else rng.choice(("", "", " "))
            fio2 = rng.choice((21, 21, 24, 28, 28, 35, 40, 60))
            po2 = "" if site == "venous" and rng.random() < 0.6 else num(rng.uniform(5.8, 13.5), 1)
            cells = {
                "Episode": f"EP-{e:04d}",
                "Taken at": f"2026-03-{day:02d} {minute // 60:02d}:{minute % 60:02d}",
                "Ward": ward,
                "Sample type": site_cell,
                "pH": num(ph, 2),
                "pCO2 (kPa)": num(pco2, 1),
                "pO2 (kPa)": po2,
                "HCO3- (mmol/L)": num(hco3 * rng.uniform(0.985, 1.015), 1),
                "BE (mmol/L)": "" if rng.random() < 0.3 else num(hco3 - 24.4 + 14.8 * (ph - 7.4), 1),
                "FiO2 (%)": str(fio2),
                "SpO2 (%)": "" if rng.random() < 0.45 else str(rng.randint(82, 99)),
                "Na+": str(rng.randint(129, 147)),
                "K+": num(rng.uniform(3.2, 5.8), 1),
                "Cl-": str(rng.randint(92, 110)),
                "Lactate (mmol/L)": "" if rng.random() < 0.4 else num(rng.uniform(0.6, 6.5), 1),
                "Glucose (mmol/L)": "" if rng.random() < 0.5 else num(rng.uniform(4.2, 19.0), 1),
                "Age": str(age),
                "Comment": "",
            }
            r = rng.random()
            if r < 0.012:  # a pH that cannot be read: the row is refused
                cells["pH"] = rng.choice(("see comment", "7,3,1" if european else "7.3.1", "?"))
                ledger.bad_required[row] = "pH"
            elif r < 0.02:
                cells["pCO2 (kPa)"] = rng.choice(("clotted", "n.m.", "repeat"))
                ledger.bad_required[row] = "PCO2"
            r = rng.random()
            if r < 0.03:  # an optional cell that cannot be read: the row is read without it
                cells["K+"] = rng.choice(("haemolysed", "hemolysed", "h"))
                ledger.unreadable[row] = "potassium"
            elif r < 0.045:
                cells["Lactate (mmol/L)"] = "<" + num(0.5, 1)
                ledger.censored.setdefault(row, []).append("lactate")
            elif r < 0.055:
                cells["Glucose (mmol/L)"] = ">" + num(33.3, 1)
                ledger.censored.setdefault(row, []).append("glucose")
            if rng.random() < 0.02:
                cells["Comment"] = quoted(f"repeat{sep} sample re-run")
            cells["Events"] = ""
            at = (day - 1) * 1440 + minute
            if niv_kind:  # planted: NIV after the first gas, then gases at planned times, pH as its kind says
                at = start + offset
                offset += plan.randint(30, 180) if j == 0 else plan.randint(50, 150)
                ph = _niv_ph(niv_kind, ph0, j, plan)
                hco3 = hco3_0 if not (niv_kind == "overshoot" and j and ph > 7.45) else hco3_0 + 2
                site = "capillary" if plan.random() < 0.2 else "arterial"
                ledger.site[row] = site
                cells["Sample type"] = plan.choice(SITES[site])
                cells["Events"] = "NIV started" if j == 0 else ""
                cells["FiO2 (%)"] = str(plan.choice((24, 28, 35)))
                cells["SpO2 (%)"] = str(plan.choice((87, 90, 92, 93, 95, 97)))
            elif kind == "venous_only":  # planted: every gas venous, the PCO2 raised
                ph, pco2 = round(plan.uniform(7.28, 7.36), 2), plan.uniform(6.4, 8.5)
                hco3 = pco2 * 7.50062 * 0.0307 * 10 ** (ph - 6.1)
                ledger.site[row] = "venous"
                cells["Sample type"] = plan.choice(SITES["venous"])
            elif kind == "one_read" and j:  # planted: no pH but the first can be read
                cells["pH"] = "?"
                ledger.bad_required[row] = "pH"
            elif kind == "same_time" and j == 1:  # planted: the second gas at the first one's moment
                cells["Taken at"] = ledger.time[-1]
                at = ledger.minutes[-1]
            if kind in ("niv", "venous_only"):
                if niv_kind:
                    pco2 = hco3 / (0.0307 * 7.50062 * 10 ** (ph - 6.1))
                cells["pH"], cells["pCO2 (kPa)"] = num(ph, 2), num(pco2, 1)
                cells["HCO3- (mmol/L)"] = num(hco3, 1)
                cells["BE (mmol/L)"] = ""
                cells["Taken at"] = _stamp(at)
                ledger.bad_required.pop(row, None)
            ledger.episode.append(key)
            ledger.time.append(cells["Taken at"])
            ledger.minutes.append(at)
            ledger.ph.append(
                None if ledger.bad_required.get(row) == "pH" else float(cells["pH"].replace(",", "."))
            )
            ledger.pco2.append(
                None
                if ledger.bad_required.get(row) == "PCO2"
                else float(cells["pCO2 (kPa)"].replace(",", "."))
            )
            ledger.fio2.append(int(cells["FiO2 (%)"]))
            ledger.spo2.append(int(cells["SpO2 (%)"]) if cells["SpO2 (%)"] else None)
            ledger.events.append(cells["Events"])
            minute += rng.randint(25, 300)
            day += minute // (24 * 60)
            minute %= 24 * 60
            lines.append(sep.join(cells[name] for name in HEADER))
            ledger.rows += 1
            if rng.random() < 0.004:
                lines.append("")  # a blank line left by a spreadsheet
    return "\ufeff" + "\r\n".join(lines) + "\r\n", ledger


def main() -> int:
    parser = argparse.ArgumentParser(
        description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter
    )
    parser.add_argument("output")
    parser.add_argument("--episodes", type=int, default=307)
    parser.add_argument("--seed", type=int, default=19)
    parser.add_argument("--comma", action="store_true", help="commas and decimal points")
    args = parser.parse_args()
    text, ledger = make_export(args.episodes, args.seed, european=not args.comma)
    with open(args.output, "w", encoding="utf-8", newline="") as f:
        f.write(text)
    print(f"{ledger.rows} gases from {ledger.episodes} episodes written to {args.output}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())

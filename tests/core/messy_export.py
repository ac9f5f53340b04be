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
    "Comment",
)


@dataclass
class Ledger:
    """What was planted, per data row (0-based, in file order)."""

    rows: int = 0
    episodes: int = 0
    site: list = field(default_factory=list)  #: per row: arterial, venous, capillary or None (not given)
    bad_required: dict = field(default_factory=dict)  #: row -> "pH" or "PCO2" (cannot be read)
    unreadable: dict = field(default_factory=dict)  #: row -> the optional input left unreadable ("potassium")
    censored: dict = field(default_factory=dict)  #: row -> list of the inputs given as censored results

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


def make_export(episodes: int = 307, seed: int = 19, *, european: bool = True) -> tuple[str, Ledger]:
    """The export's text and its ledger. ``european``: semicolons and decimal commas (else commas and
    decimal points)."""
    rng = random.Random(seed)
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
        for _ in range(rng.randint(2, 11)):
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
            minute += rng.randint(25, 300)
            day += minute // (24 * 60)
            minute %= 24 * 60
            day = min(day, 28)
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

"""``tidewell batch IN.csv --episodes EP.csv``: each episode of an audit file read as a course, one row each.

==================  ==========================================================================================
``Collector``       the gases of every episode, set aside chunk by chunk in a temporary SQLite file (standard
                    library), then handed back one episode at a time, its gases in file order
``read_episode``    one episode's gases -> its row: counts, the course's answers to the audit's questions
``EpisodeTally``    the audit summary: each question counted over the episodes (or gases) it applies to
``COLUMNS``         the columns of the episode file, in order (docs/cli.md says what each holds)
==================  ==========================================================================================

Each episode is read by the ``course`` calculation through the bridge (``tidewell.bridge.handle_obj``), its
rows turned into samples by ``cells.course_sample`` (from the batch's own row reader): nothing
about a gas or a course is decided here a second time. What this module adds is the audit's questions, asked
of the course's answer:

- the first arterial or capillary gas whose own reading meets the NIV threshold (``niv_criteria_met``: pH
  below 7.35 with PaCO2 above 6.5 kPa, BTS/ICS 2016);
- NIV started (the first gas carrying ``niv_started``), the minutes from that gas to the next one, and the
  course's own NIV verdict (``niv_response``) as it stood at the latest gas taken on NIV 1-2 hours and 4-6
  hours after the start (the course re-read with the gases up to that one; BTS/ICS 2016 monitoring);
- the PaCO2 brought below the aim: the course's ``pco2_falling_fast``, or an arterial or capillary gas below
  the aim (``pco2_target``) of an earlier arterial or capillary gas;
- venous hypercapnia (a venous PCO2 above 6.0 kPa, the BTS 2017 screen) and whether an arterial or capillary
  gas of the episode confirmed it (PCO2 above 6.0 kPa);
- gases on oxygen (FiO2 above 0.21) with an SpO2 above the top of the gas's own SpO2 target (BTS 2017).

Memory: the gases wait in the SQLite file, not in memory; the episodes come back sorted by key and one is held
at a time (at most :data:`.course.MAX_SAMPLES` + 1 of its gases; a longer episode is counted only).
"""

from __future__ import annotations

import csv
import gc
import json
import os
import sqlite3
import statistics
import tempfile
import textwrap
from collections import Counter
from itertools import groupby
from operator import itemgetter

from ..bridge import handle_obj
from ..calculations.blood_gas import HYPERCAPNIA_MMHG
from ..calculations.course import MAX_SAMPLES, MIN_SAMPLES
from ..fields import Inputs
from .cells import course_sample, role_column

#: the columns of the episode file
COLUMNS = (
    "episode",
    "gases",
    "gases_not_read",
    "arterial",
    "capillary",
    "venous",
    "site_not_given",
    "course",
    "why_not_read",
    "niv_threshold_first_gas",
    "niv_threshold_line",
    "niv_started_at",
    "minutes_to_next_gas",
    "response_1_2h",
    "response_4_6h",
    "pco2_below_aim",
    "venous_hypercapnia",
    "gases_on_oxygen_with_spo2",
    "spo2_above_target_on_oxygen",
)
#: the windows after the NIV start in which the course's NIV verdict is read [minutes] (BTS/ICS 2016: a gas
#: 1-2 hours after starting NIV and again at 4-6 hours)
WINDOWS = {"response_1_2h": (60.0, 120.0), "response_4_6h": (240.0, 360.0)}
ARTERIAL_SITES = ("arterial", "capillary")


class MissingColumns(ValueError):
    """The file has no episode or no time column (said before anything is written)."""


class Collector:
    """The gases of every episode, set aside as the chunks of a batch go by.

    A gas (a row the batch read) is kept as its course sample, in JSON, in a temporary SQLite file with its
    episode key and file line; a row with an error is kept as "not read". :meth:`episodes` then hands back
    one episode at a time, sorted by key, its gases in file order.
    """

    def __init__(self, header: list[str], site_default: str, read_row):
        roles = [role_column(h) for h in header]
        missing = [role for role in ("episode", "time") if role not in roles]
        if missing:
            raise MissingColumns(
                f"--episodes needs an episode column and a time column; no {' or '.join(missing)} column "
                f"(episode: episode, episode id, encounter ...; time: time, taken at, sampled at ...; "
                f"columns found: {', '.join(header)})"
            )
        self.episode, self.time = roles.index("episode"), roles.index("time")
        self.events = roles.index("events") if "events" in roles else None
        self.site_default = site_default
        self.read_row = read_row  #: the batch's row reader: (table, i, site_default) -> inputs
        self.no_key = 0  #: rows without an episode key
        self._seq = 0
        self._dir = tempfile.TemporaryDirectory(prefix="tidewell-episodes-")
        self._db = sqlite3.connect(os.path.join(self._dir.name, "gases.sqlite"))
        self._db.execute("PRAGMA journal_mode=OFF")
        self._db.execute("PRAGMA synchronous=OFF")
        self._db.execute("CREATE TABLE gas (episode TEXT, seq INTEGER, line INTEGER, data TEXT)")

    def add(self, table, errors: list) -> None:
        """Set aside the rows of one chunk (``errors``: each row's errors; such a row is not read)."""
        keys, times = table.by_column[self.episode], table.by_column[self.time]
        events = table.by_column[self.events] if self.events is not None else [""] * len(keys)
        rows = []
        for i, (key, when, what) in enumerate(zip(keys, times, events, strict=True)):
            key = key.strip()
            if not key:
                self.no_key += 1
                continue
            data = None
            if not errors[i]:
                row = self.read_row(table, i, site_default="")
                sample, given = course_sample(row, when, what, self.site_default)
                data = json.dumps([given, sample], separators=(",", ":"), ensure_ascii=False)
            rows.append((key, self._seq, table.line[i], data))
            self._seq += 1
        self._db.executemany("INSERT INTO gas VALUES (?, ?, ?, ?)", rows)
        self._db.commit()  # to the file, not kept in SQLite's page cache

    def episodes(self):
        """(key, gases read as (line, site given, sample) up to MAX_SAMPLES + 1, gases read, rows not read)
        of each episode, sorted by key."""
        self._db.execute("CREATE INDEX by_episode ON gas (episode, seq)")
        rows = self._db.execute("SELECT episode, line, data FROM gas ORDER BY episode, seq")
        for key, group in groupby(rows, key=itemgetter(0)):
            gases, read, not_read = [], 0, 0
            for _, line, data in group:
                if data is None:
                    not_read += 1
                    continue
                read += 1
                if read <= MAX_SAMPLES + 1:
                    given, sample = json.loads(data)
                    gases.append((line, given, sample))
            yield key, gases, read, not_read

    def close(self) -> None:
        self._db.close()
        self._dir.cleanup()


def _course(samples: list[dict]) -> dict:
    return handle_obj(
        {"calc": "course", "inputs": {"samples": samples}, "options": {"pressure_unit": "mmHg"}}
    )


def _codes(findings: list[dict]) -> set[str]:
    return {f["code"] for f in findings}


def _on_oxygen_spo2(inputs: dict) -> tuple[bool, float | None]:
    """(on oxygen: FiO2 above 0.21, the SpO2 or None) of a gas the course has read (so both are valid)."""
    i = Inputs(inputs)
    fio2 = i.fraction("fio2")
    spo2 = i.percent("spo2")
    return fio2 is not None and fio2 > 0.21, spo2


def read_episode(key: str, gases: list, read: int, not_read: int) -> dict:
    """The episode file's row of one episode (``gases``: (file line, site given, course sample) in file
    order)."""
    row = dict.fromkeys(COLUMNS, "")
    row["episode"] = key
    row["gases"], row["gases_not_read"] = read + not_read, not_read
    sites = Counter(sample["inputs"]["sample"] if given else "site_not_given" for _, given, sample in gases)
    for site in ("arterial", "capillary", "venous", "site_not_given"):
        row[site] = sites.get(site, 0)
    if read < MIN_SAMPLES:
        row["course"] = "not read"
        row["why_not_read"] = f"fewer than {MIN_SAMPLES} gases read ({read})"
        return row
    if read > MAX_SAMPLES:
        for site in ("arterial", "capillary", "venous", "site_not_given"):
            row[site] = ""  # only the first gases were kept
        row["course"] = "not read"
        row["why_not_read"] = f"{read} gases read: a course reads at most {MAX_SAMPLES}"
        return row
    samples = [sample for _, _, sample in gases]
    response = _course(samples)
    if not response.get("ok"):
        row["course"] = "not read"
        row["why_not_read"] = " | ".join(_where(e, gases) for e in response.get("errors", []))
        return row
    row["course"] = "read"
    out = response["outputs"]
    readings = out["readings"]  # in time order; "index" is the sample's place in the request
    given = [gases[r["index"]][1] for r in readings]
    lines = [gases[r["index"]][0] for r in readings]
    arterial = [r["site"] in ARTERIAL_SITES and g for r, g in zip(readings, given, strict=True)]
    # the first arterial or capillary gas whose own reading meets the NIV threshold
    for k, r in enumerate(readings):
        if arterial[k] and "niv_criteria_met" in _codes(r["findings"]):
            row["niv_threshold_first_gas"], row["niv_threshold_line"] = str(r["time"]), lines[k]
            break
    # NIV: the first gas carrying niv_started, the next gas, the verdict in each window
    start = next((k for k, r in enumerate(readings) if "niv_started" in r["events"]), None)
    if start is None:
        for name in WINDOWS:
            row[name] = "no_niv_start"
    else:
        row["niv_started_at"] = str(readings[start]["time"])
        t0 = readings[start]["minutes"]
        if start + 1 < len(readings):
            row["minutes_to_next_gas"] = round(readings[start + 1]["minutes"] - t0)
        for name, (low, high) in WINDOWS.items():
            inside = [
                k
                for k in range(start + 1, len(readings))
                if readings[k]["on_niv"] and low <= readings[k]["minutes"] - t0 <= high
            ]
            row[name] = _verdict_at(samples, readings, inside[-1]) if inside else "no_gas"
    # the PaCO2 brought below the aim of an earlier arterial or capillary gas, or falling fast
    aim, below, compared = None, False, False
    for k, r in enumerate(readings):
        if not arterial[k]:
            continue
        if aim is not None:
            compared = True
            below = below or r["pco2"]["value"] < aim
        if "pco2_target" in r:
            aim = r["pco2_target"]["value"]
    if "pco2_falling_fast" in _codes(response["findings"]) or below:
        row["pco2_below_aim"] = "yes"
    else:
        row["pco2_below_aim"] = "no" if compared else "no_aim"
    # venous hypercapnia, and an arterial or capillary gas that confirms it
    venous_high = any(
        r["site"] == "venous" and g and r["pco2"]["value"] > HYPERCAPNIA_MMHG
        for r, g in zip(readings, given, strict=True)
    )
    high = [r["pco2"]["value"] > HYPERCAPNIA_MMHG for k, r in enumerate(readings) if arterial[k]]
    if not venous_high:
        row["venous_hypercapnia"] = "none"
    elif any(high):
        row["venous_hypercapnia"] = "confirmed"
    else:
        row["venous_hypercapnia"] = "not_confirmed" if high else "no_arterial_gas"
    # gases on oxygen with an SpO2, and those above the top of their own SpO2 target
    with_spo2 = above = 0
    for r in readings:
        on_oxygen, spo2 = _on_oxygen_spo2(samples[r["index"]]["inputs"])
        target = r.get("spo2_target")
        if on_oxygen and spo2 is not None and target:
            with_spo2 += 1
            above += spo2 > target["high"]
    row["gases_on_oxygen_with_spo2"], row["spo2_above_target_on_oxygen"] = with_spo2, above
    return row


def _where(error: dict, gases: list) -> str:
    """A course error with the file line of its gas in front."""
    field = error.get("field", "")
    prefix = "inputs.samples["
    where = ""
    if field.startswith(prefix):
        k = field[len(prefix) :].split("]", 1)[0]
        if k.isdigit() and int(k) < len(gases):
            where = f"line {gases[int(k)][0]}: "
    return f"{where}{error['message']}"


def _verdict_at(samples: list[dict], readings: list[dict], k: int) -> str:
    """The course's NIV verdict as it stood at reading ``k``: the course re-read with the gases up to it."""
    earlier = [samples[r["index"]] for r in readings[: k + 1]]
    response = _course(earlier)
    niv = response.get("outputs", {}).get("niv_response") if response.get("ok") else None
    if niv is None or niv["later"] != k:
        return "not_judged"
    return niv["verdict"]


class EpisodeTally:
    """The audit summary: each question counted over the episodes (or gases) it applies to."""

    def __init__(self):
        self.episodes = 0
        self.read = 0
        self.why = Counter()
        self.niv_threshold = 0
        self.niv_started = 0
        self.next_minutes: list[int] = []
        self.windows = {name: Counter() for name in WINDOWS}
        self.below_aim = Counter()
        self.venous = Counter()
        self.with_spo2 = self.above = self.episodes_with_spo2 = self.episodes_above = 0

    def add(self, row: dict) -> None:
        self.episodes += 1
        if row["course"] != "read":
            reason = row["why_not_read"]
            kind = (
                "fewer than 2 gases read"
                if reason.startswith("fewer than")
                else "more than 50 gases"
                if "at most" in reason
                else "course refused (see why_not_read)"
            )
            self.why[kind] += 1
            return
        self.read += 1
        self.niv_threshold += row["niv_threshold_first_gas"] != ""
        if row["niv_started_at"] != "":
            self.niv_started += 1
            if row["minutes_to_next_gas"] != "":
                self.next_minutes.append(row["minutes_to_next_gas"])
            for name in WINDOWS:
                self.windows[name][row[name]] += 1
        self.below_aim[row["pco2_below_aim"]] += 1
        self.venous[row["venous_hypercapnia"]] += 1
        self.with_spo2 += row["gases_on_oxygen_with_spo2"]
        self.above += row["spo2_above_target_on_oxygen"]
        self.episodes_with_spo2 += row["gases_on_oxygen_with_spo2"] > 0
        self.episodes_above += row["spo2_above_target_on_oxygen"] > 0

    def counts(self) -> dict:
        """The summary as numbers, each with its denominator."""
        return {
            "episodes": self.episodes,
            "read": self.read,
            "not_read": dict(self.why),
            "niv_threshold": {"yes": self.niv_threshold, "of": self.read},
            "niv_started": {"yes": self.niv_started, "of": self.read},
            "minutes_to_next_gas": {
                "median": statistics.median(self.next_minutes) if self.next_minutes else None,
                "within_120": sum(m <= 120 for m in self.next_minutes),
                "of": len(self.next_minutes),
            },
            **{name: {**counter, "of": self.niv_started} for name, counter in self.windows.items()},
            "pco2_below_aim": {**self.below_aim, "of": self.read - self.below_aim.get("no_aim", 0)},
            "venous_hypercapnia": {**self.venous, "of": self.read - self.venous.get("none", 0)},
            "spo2_above_target_on_oxygen": {"gases": self.above, "of": self.with_spo2},
            "episodes_spo2_above_target_on_oxygen": {
                "yes": self.episodes_above,
                "of": self.episodes_with_spo2,
            },
        }


def _share(n: int, of: int) -> str:
    return f"{n:,} of {of:,}" + (f" ({100.0 * n / of:.1f} %)" if of else "")


VERDICT_WORDS = {
    "improving": "improving",
    "not_improving": "not improving",
    "worsening": "worsening",
    "no_gas": "no gas on NIV in the window",
    "not_judged": "a gas, but no NIV verdict (no comparable gas)",
}


def summary_text(c: dict, no_key: int = 0) -> str:
    """The audit summary in words; each share says what it is of."""
    lines = [f"Episodes: {c['episodes']:,}; read as a course: {c['read']:,}"]
    for kind, n in c["not_read"].items():
        lines.append(f"  not read, {kind}: {n:,}")
    if no_key:
        lines.append(f"  rows without an episode key (left out): {no_key:,}")
    if not c["read"]:
        return _wrapped(lines)
    lines.append(f"Of the {c['read']:,} episodes read:")
    lines.append(
        "  an arterial or capillary gas meeting the NIV threshold (pH < 7.35, PaCO2 > 6.5 kPa): "
        + _share(c["niv_threshold"]["yes"], c["read"])
    )
    lines.append(
        "  NIV started (a gas followed by niv_started): " + _share(c["niv_started"]["yes"], c["read"])
    )
    nxt = c["minutes_to_next_gas"]
    if nxt["of"]:
        lines.append(
            f"Of the {nxt['of']:,} episodes with a gas after the NIV start: the next gas came a median of "
            f"{nxt['median']:g} minutes after it; within 2 hours in " + _share(nxt["within_120"], nxt["of"])
        )
    for name, title in (("response_1_2h", "1-2 hours"), ("response_4_6h", "4-6 hours")):
        counts = c[name]
        if not counts["of"]:
            continue
        lines.append(
            f"NIV verdict at {title} after the start, of the {counts['of']:,} episodes with NIV started:"
        )
        for word, label in VERDICT_WORDS.items():
            if counts.get(word):
                lines.append(f"  {label}: " + _share(counts[word], counts["of"]))
    aim = c["pco2_below_aim"]
    if aim["of"]:
        lines.append(
            f"PaCO2 brought below the aim of an earlier arterial or capillary gas (or falling fast), of the "
            f"{aim['of']:,} episodes with an aim and a later arterial or capillary gas: "
            + _share(aim.get("yes", 0), aim["of"])
        )
    venous = c["venous_hypercapnia"]
    if venous["of"]:
        lines.append(f"Venous PCO2 above 6.0 kPa, of the {venous['of']:,} episodes with one:")
        for word, label in (
            ("confirmed", "confirmed by an arterial or capillary gas (PCO2 above 6.0 kPa)"),
            ("not_confirmed", "not confirmed: the arterial or capillary gases were not hypercapnic"),
            ("no_arterial_gas", "never checked: no arterial or capillary gas"),
        ):
            lines.append(f"  {label}: " + _share(venous.get(word, 0), venous["of"]))
    spo2 = c["spo2_above_target_on_oxygen"]
    if spo2["of"]:
        eps = c["episodes_spo2_above_target_on_oxygen"]
        lines.append(
            "Gases on oxygen (FiO2 above 0.21) with an SpO2 above the top of the gas's own target, of the "
            f"{spo2['of']:,} gases on oxygen with an SpO2: "
            + _share(spo2["gases"], spo2["of"])
            + f"; episodes with one, of the {eps['of']:,} with such a gas: "
            + _share(eps["yes"], eps["of"])
        )
    return _wrapped(lines)


def _wrapped(lines: list[str], width: int = 100) -> str:
    """Lines wrapped to ``width``, each continuation indented under its line's own indent + 4."""
    out = []
    for line in lines:
        indent = " " * (len(line) - len(line.lstrip()) + 4)
        out.extend(textwrap.wrap(line, width=width, subsequent_indent=indent) or [""])
    return "\n".join(out)


def write(collector: Collector, path: str, *, delimiter: str = ",", bom: bool = False) -> dict:
    """Read every episode and write the episode file to ``path``; returns the summary counts."""
    tally = EpisodeTally()
    # the batch pauses the cyclic collector; a course leaves a few cycles (about 3 objects each), so it
    # runs again while the episodes are read, else they would pile up over a large file
    paused = not gc.isenabled()
    gc.enable()
    try:
        _write(collector, path, tally, delimiter, bom)
    finally:
        if paused:
            gc.disable()
    counts = tally.counts()
    counts["rows_without_key"] = collector.no_key
    return counts


def _write(collector: Collector, path: str, tally: EpisodeTally, delimiter: str, bom: bool) -> None:
    with open(path, "w", encoding="utf-8", newline="") as f:
        if bom:
            f.write("\ufeff")
        writer = csv.writer(f, delimiter=delimiter, lineterminator="\n")
        writer.writerow(COLUMNS)
        for key, gases, read, not_read in collector.episodes():
            row = read_episode(key, gases, read, not_read)
            tally.add(row)
            writer.writerow([row[name] for name in COLUMNS])

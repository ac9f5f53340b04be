"""``tidewell batch --episodes``: each episode of an audit file read as a course, one row per episode.

The invented messy export (messy_export.py) plants NIV starts, gases on oxygen, venous-only hypercapnia and
broken episodes; every expected value here is computed from the generator's ledger with the published rules,
written out in this file (not taken from the code under test):

- NIV threshold: pH below 7.35 with PaCO2 above 6.5 kPa, arterial or capillary gas (BTS/ICS 2016,
  ``bts_ics2016``);
- gases 1-2 hours and 4-6 hours after NIV starts (``bts_ics2016_niv_monitoring``), judged with the course's
  verdict rule (docs/course.md; reference change 0.03 pH, ``reference_change_value``);
- SpO2 target 88-92 % when the PCO2 is above 6.0 kPa or after NIV for hypercapnic failure, else 94-98 %
  (BTS 2017, ``bts2017_o2``); hypercapnia on a venous gas: PCO2 above 6.0 kPa (``bts2017_o2``).
"""

from __future__ import annotations

import csv
import io
from pathlib import Path

import pytest
from messy_export import make_export

from tidewell.frontends import batch, cells, episodes

NIV_PH, NIV_PCO2_KPA, HYPERCAPNIA_KPA = 7.35, 6.5, 6.0  # bts_ics2016; bts2017_o2
PH_CHANGE = 0.03  # reference_change_value: 1.96 x sqrt(2) x 0.01 analyser SD, used as 0.03


def run_episodes(tmp_path: Path, text: str, name: str = "in.csv") -> tuple[dict, dict, str, list[str]]:
    """(counts, episode rows by key, summary text, episode file header) of batch.run --episodes."""
    source, target, ep = tmp_path / name, tmp_path / "out.csv", tmp_path / "ep.csv"
    source.write_text(text, encoding="utf-8", newline="")
    out = io.StringIO()
    counts = batch.run(
        str(source), str(target), progress=False, stdout=out, stderr=io.StringIO(), episodes=str(ep)
    )
    written = ep.read_text(encoding="utf-8")
    delimiter = ";" if text.lstrip("\ufeff").split("\n", 1)[0].count(";") else ","
    rows = list(csv.DictReader(io.StringIO(written.lstrip("\ufeff")), delimiter=delimiter))
    header = next(csv.reader(io.StringIO(written.lstrip("\ufeff")), delimiter=delimiter))
    return counts, {r["episode"]: r for r in rows}, out.getvalue(), header


def distance(ph: float) -> float:
    """How far a pH lies outside 7.35-7.45 (docs/course.md)."""
    return round(max(0.0, 7.35 - ph, ph - 7.45), 6)


def course_verdict(ph_start: float, ph_end: float, ph_previous: float) -> str:
    """The verdict of docs/course.md written out: worsening first, then improving, else not improving."""
    grew = round(distance(ph_end) - distance(ph_previous), 6)
    if round(ph_end - ph_start, 6) <= -PH_CHANGE or grew >= PH_CHANGE:
        return "worsening"
    if round(ph_end - ph_start, 6) >= PH_CHANGE or ph_end >= NIV_PH:
        return "improving"
    return "not_improving"


def expected(ledger) -> dict:
    """Per episode key, what the episode file must say, from the ledger and the published rules."""
    by_key: dict[str, list[int]] = {}
    for i, key in enumerate(ledger.episode):
        by_key.setdefault(key, []).append(i)
    out = {}
    for key, rows in by_key.items():
        read = [i for i in rows if i not in ledger.bad_required]
        e = {"gases": len(rows), "gases_not_read": len(rows) - len(read)}
        sites = [ledger.site[i] or "site_not_given" for i in read]
        for site in ("arterial", "capillary", "venous", "site_not_given"):
            e[site] = sites.count(site)
        moments = [ledger.minutes[i] for i in read]
        if len(read) < 2:
            e["course"], e["why"] = "not read", "fewer than 2 gases read"
            out[key] = e
            continue
        if len(set(moments)) < len(moments):
            e["course"], e["why"] = "not read", "same time"
            out[key] = e
            continue
        e["course"] = "read"
        read.sort(key=lambda i: ledger.minutes[i])
        ac = [i for i in read if ledger.site[i] in ("arterial", "capillary")]
        first = next((i for i in ac if ledger.ph[i] < NIV_PH and ledger.pco2[i] > NIV_PCO2_KPA), None)
        e["niv_threshold_first_gas"] = ledger.time[first] if first is not None else ""
        start = next((k for k, i in enumerate(read) if ledger.events[i] == "NIV started"), None)
        if start is None:
            e["niv_started_at"] = e["minutes_to_next_gas"] = ""
            e["response_1_2h"] = e["response_4_6h"] = "no_niv_start"
        else:
            s = read[start]
            e["niv_started_at"] = ledger.time[s]
            after = read[start + 1 :]
            e["minutes_to_next_gas"] = str(ledger.minutes[after[0]] - ledger.minutes[s]) if after else ""
            for name, (low, high) in (("response_1_2h", (60, 120)), ("response_4_6h", (240, 360))):
                inside = [
                    k
                    for k, i in enumerate(read)
                    if k > start and low <= ledger.minutes[i] - ledger.minutes[s] <= high
                ]
                if not inside:
                    e[name] = "no_gas"
                else:
                    k = inside[-1]  # the planted NIV episodes hold arterial and capillary gases only
                    e[name] = course_verdict(ledger.ph[s], ledger.ph[read[k]], ledger.ph[read[k - 1]])
        venous_high = any(ledger.site[i] == "venous" and ledger.pco2[i] > HYPERCAPNIA_KPA for i in read)
        high = [ledger.pco2[i] > HYPERCAPNIA_KPA for i in ac]
        e["venous_hypercapnia"] = (
            "none"
            if not venous_high
            else "confirmed"
            if any(high)
            else "not_confirmed"
            if high
            else "no_arterial_gas"
        )
        with_spo2 = above = 0
        for k, i in enumerate(read):
            if ledger.fio2[i] > 21 and ledger.spo2[i] is not None:
                after_niv = start is not None and k >= start
                top = 92 if ledger.pco2[i] > HYPERCAPNIA_KPA or after_niv else 98
                with_spo2 += 1
                above += ledger.spo2[i] > top
        e["gases_on_oxygen_with_spo2"], e["spo2_above_target_on_oxygen"] = with_spo2, above
        out[key] = e
    return out


@pytest.fixture(scope="module")
def messy(tmp_path_factory):
    text, ledger = make_export()
    counts, rows, said, header = run_episodes(tmp_path_factory.mktemp("ep"), text)
    return ledger, counts, rows, said, header


def test_every_episode_has_one_row_with_its_counts(messy):
    ledger, _, rows, _, header = messy
    assert tuple(header) == episodes.COLUMNS
    want = expected(ledger)
    assert sorted(rows) == sorted(want) and len(rows) == ledger.episodes == 307
    for key, e in want.items():
        for name in ("gases", "gases_not_read"):
            assert int(rows[key][name]) == e[name], (key, name)
        assert rows[key]["course"] == e["course"], key
        if e["course"] == "read":
            for site in ("arterial", "capillary", "venous", "site_not_given"):
                assert int(rows[key][site]) == e[site], (key, site)


def test_episodes_not_read_say_why(messy):
    ledger, counts, rows, _, _ = messy
    want = expected(ledger)
    short = [k for k, e in want.items() if e.get("why") == "fewer than 2 gases read"]
    same = [k for k, e in want.items() if e.get("why") == "same time"]
    assert short and same  # planted: one_read and same_time episodes
    for key in short:
        assert rows[key]["why_not_read"].startswith("fewer than 2 gases read"), key
    for key in same:
        assert "same time" in rows[key]["why_not_read"] and "line " in rows[key]["why_not_read"], key
    for key, e in want.items():
        assert (rows[key]["why_not_read"] == "") == (e["course"] == "read"), key
    assert counts["episodes"]["not_read"] == {
        "fewer than 2 gases read": len(short),
        "course refused (see why_not_read)": len(same),
    }


@pytest.mark.parametrize(
    "name",
    [
        "niv_threshold_first_gas",
        "niv_started_at",
        "minutes_to_next_gas",
        "response_1_2h",
        "response_4_6h",
        "venous_hypercapnia",
        "gases_on_oxygen_with_spo2",
        "spo2_above_target_on_oxygen",
    ],
)
def test_each_question_as_the_published_rules_answer_it(messy, name):
    ledger, _, rows, _, _ = messy
    seen = set()
    for key, e in expected(ledger).items():
        if e["course"] != "read":
            continue
        assert rows[key][name] == str(e[name]), (key, name, rows[key][name], e[name])
        seen.add(str(e[name]) not in ("", "0", "none", "no_niv_start"))
    assert seen == {True, False}, name  # both sides of each question occur


def test_both_sides_of_the_thresholds_occur(messy):
    ledger = messy[0]
    want = expected(ledger)
    read = [e for e in want.values() if e["course"] == "read"]
    assert {e["response_1_2h"] for e in read} >= {
        "improving",
        "not_improving",
        "worsening",
        "no_gas",
        "no_niv_start",
    }
    assert {e["venous_hypercapnia"] for e in read} == {
        "none",
        "confirmed",
        "not_confirmed",
        "no_arterial_gas",
    }
    # minutes to the next gas both within 2 hours and beyond (BTS/ICS 2016: a gas 1-2 hours after the start)
    nexts = [int(e["minutes_to_next_gas"]) for e in read if e["minutes_to_next_gas"] != ""]
    assert min(nexts) <= 120 < max(nexts)
    # a gas just inside the NIV threshold and one just outside each side (pH 7.35; PaCO2 6.5 kPa)
    ac = [
        i
        for i in range(ledger.rows)
        if ledger.site[i] in ("arterial", "capillary") and ledger.ph[i] and ledger.pco2[i]
    ]
    assert any(ledger.ph[i] == 7.34 and ledger.pco2[i] > 6.5 for i in ac)
    assert any(ledger.ph[i] == 7.35 and ledger.pco2[i] > 6.5 for i in ac)


def test_pco2_brought_below_the_aim(messy):
    ledger, _, rows, _, _ = messy
    want = expected(ledger)
    overshoot = [k for k, kind in ledger.niv.items() if kind == "overshoot" and want[k]["course"] == "read"]
    failing = [k for k, kind in ledger.niv.items() if kind == "failing" and want[k]["course"] == "read"]
    # planted: NIV taking the pH into alkalaemia (above 7.45) with the PCO2 far below the arrival gas
    shot = [k for k in overshoot if any(ledger.ph[i] > 7.45 for i, e in enumerate(ledger.episode) if e == k)]
    assert shot and failing
    for key in shot:
        assert rows[key]["pco2_below_aim"] == "yes", key
    # planted: NIV failing, every gas still acidaemic with its PCO2 near the arrival gas's
    for key in failing:
        assert rows[key]["pco2_below_aim"] == "no", key
    # planted: venous gases only, so no arterial or capillary aim
    for key in ledger.venous_only:
        if want[key]["course"] == "read":
            assert rows[key]["pco2_below_aim"] == "no_aim", key
            assert rows[key]["venous_hypercapnia"] in ("none", "no_arterial_gas"), key


def test_the_audit_summary_counts_each_question_over_its_own_episodes(messy):
    ledger, counts, _, said, _ = messy
    want = expected(ledger)
    read = [e for e in want.values() if e["course"] == "read"]
    c = counts["episodes"]
    assert c["episodes"] == 307 and c["read"] == len(read)
    niv = sum(e["niv_threshold_first_gas"] != "" for e in read)
    started = [e for e in read if e["niv_started_at"] != ""]
    assert c["niv_threshold"] == {"yes": niv, "of": len(read)}
    assert c["niv_started"] == {"yes": len(started), "of": len(read)}
    for name in ("response_1_2h", "response_4_6h"):
        assert c[name]["of"] == len(started)
        for word in ("improving", "not_improving", "worsening", "no_gas"):
            assert c[name].get(word, 0) == sum(e[name] == word for e in started), (name, word)
    venous = [e["venous_hypercapnia"] for e in read if e["venous_hypercapnia"] != "none"]
    assert c["venous_hypercapnia"]["of"] == len(venous)
    assert c["venous_hypercapnia"]["no_arterial_gas"] == venous.count("no_arterial_gas")
    on_o2 = sum(e["gases_on_oxygen_with_spo2"] for e in read)
    above = sum(e["spo2_above_target_on_oxygen"] for e in read)
    assert c["spo2_above_target_on_oxygen"] == {"gases": above, "of": on_o2}
    # in words, each share of what it is of (lines wrapped at 100 columns)
    assert max(map(len, said[said.index("\nEpisodes: ") :].splitlines())) <= 100
    said = " ".join(said.split())
    assert f"Episodes: 307; read as a course: {len(read)}" in said
    assert f"{niv} of {len(read)} ({100 * niv / len(read):.1f} %)" in said
    assert f"of the {on_o2:,} gases on oxygen with an SpO2: {above} of {on_o2:,}" in said
    assert "never checked: no arterial or capillary gas" in said


def test_episodes_spread_through_the_file_and_read_in_chunks(tmp_path, monkeypatch):
    """Rows of one episode far apart in the file, and chunks of 7 rows: the same episode file."""
    text, _ = make_export(episodes=40, seed=5, european=False)
    head, *lines = text.lstrip("\ufeff").rstrip("\r\n").split("\r\n")
    lines = [line for line in lines if line]
    shuffled = "\r\n".join([head, *lines[::2], *lines[1::2]]) + "\r\n"
    _, plain, _, _ = run_episodes(tmp_path, "\r\n".join([head, *lines]) + "\r\n", "a.csv")
    monkeypatch.setattr(batch, "CHUNK", 7)
    _, spread, _, _ = run_episodes(tmp_path, shuffled, "b.csv")
    skip = {"niv_threshold_line", "why_not_read"}  # file lines differ
    assert {k: {n: v for n, v in r.items() if n not in skip} for k, r in plain.items()} == {
        k: {n: v for n, v in r.items() if n not in skip} for k, r in spread.items()
    }


def test_a_file_without_episode_or_time_column_is_refused(tmp_path):
    with pytest.raises(batch.TableError, match="no episode column"):
        run_episodes(tmp_path, "time,ph,pco2[kPa],sample\n0,7.3,8,arterial\n")
    with pytest.raises(batch.TableError, match="no time column"):
        run_episodes(tmp_path, "episode,ph,pco2[kPa],sample\nE1,7.3,8,arterial\n")


def test_an_episode_of_more_than_50_gases_says_why(tmp_path):
    rows = [f"E1,{m * 30},7.38,6.0,arterial" for m in range(51)] + [
        "E2,0,7.30,8.0,arterial",
        "E2,60,7.33,7.6,arterial",
    ]
    _, got, _, _ = run_episodes(tmp_path, "Episode ID,Time,ph,pco2[kPa],sample\n" + "\n".join(rows) + "\n")
    assert got["E1"]["course"] == "not read" and "at most 50" in got["E1"]["why_not_read"]
    assert got["E2"]["course"] == "read" and got["E2"]["arterial"] == "2"


def test_role_column_names():
    assert cells.role_column("Episode ID") == "episode" and cells.role_column("sampled_at") == "time"
    assert cells.role_column("Taken-at") == "time" and cells.role_column("Events") == "events"
    assert cells.role_column("ward") is None and cells.role_column("pco2") is None


def test_each_threshold_on_both_sides(tmp_path):
    """Hand-made episodes on each side of each threshold; expected values from the published rules."""
    text = """episode,time,ph,pco2[kPa],sample,fio2,spo2,events
A,0,7.34,6.6,arterial,0.28,93,
A,60,7.36,6.0,arterial,0.28,93,
B,0,7.35,6.6,arterial,0.21,99,
B,30,7.34,6.5,capillary,,,
C,0,7.30,8.0,venous,,,
C,30,7.34,6.6,capillary,,,
D,0,7.32,6.1,venous,,,
D,40,7.40,5.9,arterial,,,
E,0,7.36,6.0,venous,,,
E,40,7.36,6.0,venous,,,
F,0,7.25,9.0,arterial,,,NIV started
F,59,7.28,8.6,arterial,,,
F,121,7.30,8.3,arterial,,,
F,240,7.24,9.3,arterial,,,
G,0,7.25,9.0,arterial,,,niv_started
G,60,7.28,8.6,arterial,,,
G,360,7.26,8.9,arterial,,,
"""
    _, got, _, _ = run_episodes(tmp_path, text)
    # NIV threshold (bts_ics2016): pH 7.34 with 6.6 kPa meets it; pH 7.35, or PaCO2 6.5 kPa, does not; a
    # venous gas never does, a capillary gas may
    assert (got["A"]["niv_threshold_first_gas"], got["A"]["niv_threshold_line"]) == ("0", "2")
    assert got["B"]["niv_threshold_first_gas"] == ""
    assert got["C"]["niv_threshold_first_gas"] == "30"
    # SpO2 target (bts2017_o2): PCO2 6.6 kPa -> 88-92 %, 93 is above; PCO2 6.0 kPa (not above 6.0) -> 94-98 %,
    # 93 is not above; on air (FiO2 0.21) or FiO2 not given: not a gas on oxygen
    assert (got["A"]["gases_on_oxygen_with_spo2"], got["A"]["spo2_above_target_on_oxygen"]) == ("2", "1")
    assert (got["B"]["gases_on_oxygen_with_spo2"], got["B"]["spo2_above_target_on_oxygen"]) == ("0", "0")
    # venous PCO2 above 6.0 kPa (bts2017_o2): 8.0 then a capillary 6.6 confirms; 6.1 then an arterial 5.9
    # does not; 6.0 is not above
    assert got["C"]["venous_hypercapnia"] == "confirmed"
    assert got["D"]["venous_hypercapnia"] == "not_confirmed"
    assert got["E"]["venous_hypercapnia"] == "none"
    # NIV windows (bts_ics2016_niv_monitoring): 59 and 121 minutes are outside 60-120, 240 and 360 inside
    # 240-360; the verdict (docs/course.md, reference_change_value 0.03)
    assert got["F"]["niv_started_at"] == "0" and got["F"]["minutes_to_next_gas"] == "59"
    assert got["F"]["response_1_2h"] == "no_gas"
    assert got["F"]["response_4_6h"] == course_verdict(7.25, 7.24, 7.30) == "worsening"
    assert got["G"]["response_1_2h"] == course_verdict(7.25, 7.28, 7.25) == "improving"
    assert got["G"]["response_4_6h"] == course_verdict(7.25, 7.26, 7.28) == "not_improving"
    assert got["A"]["response_1_2h"] == "no_niv_start"

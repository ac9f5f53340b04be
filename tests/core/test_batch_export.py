"""The batch audit on exports as hospital systems and spreadsheets write them, read chunk by chunk.

The reading rules themselves are the scalar bridge's (test_batch.py checks batch == scalar row by row); here:
what an export holds (decimal commas, the trade's header spellings and site codes, sites not given, censored
and unreadable cells, a column in the other unit), what is written back (names, units, delimiter, byte-order
mark), the summary's denominators, and that reading in chunks changes nothing. No test pins the clinical
words of a reading except through the scalar bridge.
"""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path

import pytest
from messy_export import make_export

from tidewell import bridge, units
from tidewell.frontends import batch, cells


def q(value, unit):
    return {"value": value, "unit": unit}


def run_file(tmp_path: Path, text: str, **kw) -> tuple[dict, str, str]:
    """(counts, output text, summary text) of batch.run from a file to a file."""
    source, target = tmp_path / "in.csv", tmp_path / "out.csv"
    source.write_text(text, encoding="utf-8", newline="")
    out, err = io.StringIO(), io.StringIO()
    counts = batch.run(str(source), str(target), progress=False, stdout=out, stderr=err, **kw)
    with open(target, encoding="utf-8", newline="") as f:
        return counts, f.read(), out.getvalue()


def scalar(inputs: dict, pressure_unit: str = "mmHg") -> dict:
    return bridge.handle_obj(
        {"calc": "blood_gas", "inputs": inputs, "options": {"pressure_unit": pressure_unit}}
    )


# -- the invented messy export, end to end -------------------------------------------------------------------


@pytest.mark.parametrize("european", [True, False])
def test_messy_export_is_read_end_to_end(tmp_path: Path, european: bool):
    text, ledger = make_export(european=european)
    assert 1900 <= ledger.rows <= 2200 and ledger.episodes == 307
    counts, written, said = run_file(tmp_path, text)
    # every row read, the planted unreadable pH and PCO2 refused, nothing else
    assert counts["rows"] == ledger.rows
    assert counts["with_errors"] == len(ledger.bad_required) > 0
    assert counts["interpreted"] == ledger.rows - len(ledger.bad_required)
    wanted_errors = {"pH: not a number": 0, "PCO2: not a number": 0}
    for name in ledger.bad_required.values():
        wanted_errors[f"{name}: not a number"] += 1
    assert counts["errors_by_kind"] == {k: v for k, v in wanted_errors.items() if v} or sorted(
        counts["errors_by_kind"].items()
    ) == sorted((k, v) for k, v in wanted_errors.items() if v)
    # sites: the trade's codes all read; a site not given is said, per site and in the notes
    read = [i for i in range(ledger.rows) if i not in ledger.bad_required]
    for site, n in ledger.sites().items():
        assert counts["sites"][site]["rows"] == n, site
    not_given = sum(1 for i in read if ledger.site[i] is None)
    assert counts["notes_by_kind"]["site not given"] == not_given > 0
    # unreadable optional cells and censored results: the row is read, the cell named
    unreadable = sum(1 for i in read if i in ledger.unreadable)
    assert counts["notes_by_kind"]["potassium: not read"] == unreadable > 0
    for name in ("lactate", "glucose"):
        planted = sum(1 for i in read if name in ledger.censored.get(i, ()))
        used = counts["notes_by_kind"].get(f"{name}: censored, bound used", 0)
        unused = counts["notes_by_kind"].get(f"{name}: censored, not used", 0)
        assert used + unused == planted > 0, name
    with_notes = {i for i in read if ledger.site[i] is None or i in ledger.unreadable or i in ledger.censored}
    assert counts["with_notes"] == len(with_notes)
    # the output: one line per row, the input's delimiter and byte-order mark, names unique
    assert written.startswith("\ufeff")
    delimiter = ";" if european else ","
    rows = list(csv.reader(io.StringIO(written[1:]), delimiter=delimiter))
    header = rows[0]
    assert len(rows) == ledger.rows + 1 and len(header) == len(set(header))
    assert header[-2:] == ["error", "notes"] and "hco3_read[mmol/L]" in header
    assert "a_a_gradient[kPa]" in header and "pf_ratio[kPa]" in header  # the input's unit
    for i, row in enumerate(rows[1:]):
        values = dict(zip(header, row, strict=True))
        assert bool(values["error"]) == (i in ledger.bad_required), i
        assert ("site not given" in values["notes"]) == (
            ledger.site[i] is None and i not in ledger.bad_required
        )
        if values["a_a_gradient[kPa]"]:
            assert ("," in values["a_a_gradient[kPa]"]) == european  # decimal commas written back
    # the summary is in words, each block of its own rows
    assert "By sample site" in said and "not given (read as venous)" in said
    assert f"(of {counts['rows']:,} rows; a row may have several)" in said
    assert f"(of {counts['denominators']['spo2_on_target']:,} rows with an SpO2)" in said


def test_messy_export_generator_is_seeded_and_invented():
    a, ledger_a = make_export(episodes=20, seed=3)
    b, _ = make_export(episodes=20, seed=3)
    assert a == b and a.startswith("\ufeffEpisode;") and "\r\n" in a
    assert ledger_a.rows == a.count("\r\n") - 1 - a.count("\r\n\r\n")


# -- decimal commas ------------------------------------------------------------------------------------------


@pytest.mark.parametrize("delimiter", [";", "\t"])
def test_decimal_commas_in_a_file_not_separated_by_commas(tmp_path: Path, delimiter: str):
    rows = [
        ["ph", "pco2[kPa]", "hco3", "po2[kPa]", "fio2", "sample"],
        ["7,24", "9,3", "29,7", "7,1", "0,28", "ABG"],
    ]
    text = "\n".join(delimiter.join(r) for r in rows) + "\n"
    counts, written, said = run_file(tmp_path, text)
    assert counts["interpreted"] == 1 and "decimal comma" in said
    table = batch.read_table(text)
    assert batch.row_inputs(table, 0) == {
        "ph": 7.24,
        "pco2": q(9.3, "kPa"),
        "hco3": q(29.7, "mmol/L"),
        "po2": q(7.1, "kPa"),
        "fio2": 0.28,
        "sample": "arterial",
    }
    out = list(csv.reader(io.StringIO(written), delimiter=delimiter))
    values = dict(zip(out[0], out[1], strict=True))
    assert values["hco3_computed[mmol/L]"].count(",") == 1 and "." not in values["hco3_computed[mmol/L]"]
    want = scalar(batch.row_inputs(table, 0), "kPa")["outputs"]["a_a_gradient"]["value"]
    assert float(values["a_a_gradient[kPa]"].replace(",", ".")) == pytest.approx(want, abs=0.005)


def test_decimal_commas_in_a_comma_separated_file_are_said_once_and_no_row_read_is_an_error(tmp_path: Path):
    text = 'ph,pco2[kPa],sample\n"7,24","9,3",arterial\n"7,40","5,3",venous\n'
    with pytest.raises(batch.NoRowRead, match=r"no row could be read \(2 rows, all with errors\)"):
        run_file(tmp_path, text)
    written = (tmp_path / "out.csv").read_text(encoding="utf-8")
    assert written.count("\n") == 3  # every row written, with its error


def test_a_file_whose_numbers_all_have_points_keeps_points_when_separated_by_semicolons(tmp_path: Path):
    text = "ph;pco2[kPa];hco3;sample\n7.24;9.3;29.7;arterial\n"
    _, written, _ = run_file(tmp_path, text)
    values = dict(zip(*list(csv.reader(io.StringIO(written), delimiter=";")), strict=True))
    assert "." in values["hco3_computed[mmol/L]"]


# -- names ---------------------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("header", "key", "unit"),
    [
        ("pCO2 (kPa)", "pco2", "kPa"),
        ("PaCO2[kPa]", "pco2", "kPa"),
        ("PaCO2 mmHg", "pco2", "mmHg"),
        ("pO2 (mm Hg)", "po2", "mmHg"),
        ("HCO3-", "hco3", None),
        ("Bicarbonate (mmol/L)", "hco3", "mmol/L"),
        ("BE (mmol/L)", "base_excess", "mmol/L"),
        ("Base excess", "base_excess", None),
        ("FiO2 (%)", "fio2", "%"),
        ("Na+", "na", None),
        ("K+ (mmol/L)", "k", "mmol/L"),
        ("Cl-", "cl", None),
        ("Sample type", "sample", None),
        ("Specimen", "sample", None),
        ("Lactate (mmol/L)", "lactate", "mmol/L"),
        ("Hb (g/dL)", "hb", "g/dL"),
        ("iCa", "ca_ionised", None),
        ("Temp (°C)", "temperature", "degC"),
        ("measured_osmolality", "measured_osmolality", None),
        # not inputs: copied through (total calcium and a base deficit are not what the inputs mean)
        ("Ca", None, None),
        ("Base deficit", None, None),
        ("Ward (note)", None, None),
    ],
)
def test_header_spellings(header: str, key, unit):
    got_key, got_unit, _ = cells.column_key(header)
    assert (got_key, got_unit) == (key, unit)


@pytest.mark.parametrize(
    ("word", "site"),
    [
        ("ABG", "arterial"),
        ("art", "arterial"),
        ("Arterial blood gas", "arterial"),
        ("VBG", "venous"),
        ("ven.", "venous"),
        ("Central venous", "venous"),
        ("CBG", "capillary"),
        ("cap", "capillary"),
        ("arterialised capillary", "capillary"),
        ("Arterialized capillary", "capillary"),
        ("ear lobe", "capillary"),
    ],
)
def test_site_words(word: str, site: str):
    assert cells.site_word(word) == site
    table = batch.read_table(f"ph,pco2[kPa],sample\n7.3,8,{word}\n")
    assert batch.row_inputs(table, 0)["sample"] == site and table.columns["sample"].unread.tolist() == [False]


def test_an_input_named_twice_by_two_spellings_is_refused():
    with pytest.raises(batch.TableError, match=r"'pCO2 \(kPa\)'\) and 3 \('PaCO2 \[mmHg\]'\) both name"):
        batch.read_table("pH,pCO2 (kPa),PaCO2 [mmHg]\n7.3,8,60\n")


# -- sample site not given ----------------------------------------------------------------------------------


def test_a_site_not_given_is_read_as_venous_and_said(tmp_path: Path):
    text = "ph,pco2[kPa],po2[kPa],fio2,sample\n7.28,9.1,7.2,0.28,\n7.28,9.1,7.2,0.28,arterial\n"
    table = batch.read_table(text)
    audit = batch.interpret_table(table)
    assert audit.notes[0] == [batch.SITE_NOTE] and audit.notes[1] == []
    assert audit.sites.tolist() == ["not given", "arterial"]
    # row 0 is what the bridge says of the same gas as a venous sample: no oxygenation outputs
    venous = scalar({**batch.row_inputs(table, 1), "sample": "venous"})
    assert batch.row_inputs(table, 0) == {**batch.row_inputs(table, 1), "sample": "venous"}
    assert audit.findings(0) == [f["code"] for f in venous["findings"]]
    assert audit.value("a_a_gradient", 0) is None and audit.value("pf_ratio", 0) is None
    assert audit.value("niv_criteria", 0) == venous["outputs"]["niv_criteria"]
    # the arterial row has them
    assert audit.value("a_a_gradient", 1) is not None
    counts, _, _ = run_file(tmp_path, text)
    assert counts["notes_by_kind"] == {"site not given": 1} and counts["sites"]["not given"]["rows"] == 1


def test_a_file_without_a_site_column_says_so_once(tmp_path: Path):
    counts, _, said = run_file(tmp_path, "ph,pco2[kPa]\n7.3,8\n7.4,5.3\n")
    assert said.count("the file has no sample site column") == 1
    assert counts["sites"] == {"not given": {"rows": 2, "interpreted": 2}}


# -- unreadable and censored optional cells ------------------------------------------------------------------


def _one(text: str):
    table = batch.read_table(text)
    return table, batch.interpret_table(table)


def _outputs(audit, i):
    return {name: audit.value(name, i) for name in batch.OUTPUT_NAMES}


def test_an_unreadable_optional_cell_keeps_the_reading_and_is_named():
    head = "ph,pco2[kPa],hco3,sample,na,k,cl,lactate[mmol/L]\n"
    table, audit = _one(
        head + "7.31,8.1,30,arterial,138,haemolysed,98,1.1\n" + "7.31,8.1,30,arterial,138,,98,1.1\n"
    )
    assert audit.errors == [[], []]
    assert audit.notes[0] == ["potassium 'haemolysed' not read: read without it"]
    assert audit.note_kinds[0] == ["potassium: not read"]
    assert _outputs(audit, 0) == _outputs(audit, 1)  # the same as the row without it
    assert batch.row_inputs(table, 0) == batch.row_inputs(table, 1)


def test_a_censored_result_is_used_where_the_reading_is_the_same_at_both_ends():
    head = "ph,pco2[kPa],hco3,sample,na,cl,lactate[mmol/L]\n"
    # lactate below 0.5 mmol/L: no rule reads it differently anywhere from 0 to 0.5 (the raised-lactate
    # threshold of the reading is far above): read at its bound, and the row equals the row with 0.5
    _, audit = _one(head + "7.31,8.1,30,arterial,138,98,<0.5\n" + "7.31,8.1,30,arterial,138,98,0.5\n")
    assert audit.notes[0] == ["lactate '<0.5' read as 0.5 mmol/L (the same reading anywhere < 0.5)"]
    assert audit.note_kinds[0] == ["lactate: censored, bound used"]
    assert _outputs(audit, 0) == _outputs(audit, 1)


def test_a_censored_result_that_could_change_the_reading_is_left_out():
    head = "ph,pco2[kPa],hco3,sample,na,cl,glucose[mmol/L]\n"
    # glucose above 33.3 mmol/L: the reader's range reaches 150 mmol/L, where a glucose is named as unusual
    # (interpret.unusual_flags), so the reading is not the same at both ends: left out, and said
    table, audit = _one(head + "7.31,8.1,30,arterial,138,98,>33.3\n" + "7.31,8.1,30,arterial,138,98,\n")
    assert audit.notes[0] == ["glucose '>33.3' is a censored result: read without it"]
    assert audit.note_kinds[0] == ["glucose: censored, not used"]
    assert _outputs(audit, 0) == _outputs(audit, 1)
    far = scalar({**batch.row_inputs(table, 1), "glucose": q(150.0, "mmol/L")})
    bound = scalar({**batch.row_inputs(table, 1), "glucose": q(33.3, "mmol/L")})
    assert [f["code"] for f in far["findings"]] != [f["code"] for f in bound["findings"]]


def test_a_bad_ph_or_pco2_is_still_the_rows_error():
    _, audit = _one("ph,pco2[kPa],sample\n<7.0,8,arterial\n7.3,haemolysed,arterial\n")
    assert audit.errors[0] and audit.errors[1] and audit.notes[0] == audit.notes[1] == []
    assert audit.error_kinds == [["pH: not a number"], ["PCO2: not a number"]]


# -- a column in the other unit ------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("header", "values", "refused"),
    [
        ("pco2[mmHg]", [8.1, 6.2, 5.3, 9.4, 5.9], "looks like kPa, not mmHg"),
        ("pco2[kPa]", [62, 48, 40, 71, 45], "looks like mmHg, not kPa"),
        ("po2[mmHg]", [9.1, 7.2, 11.3, 12.0, 6.5], "looks like kPa, not mmHg"),
        ("po2[kPa]", [75, 60, 88, 95, 54], "looks like mmHg, not kPa"),
        # at the edges of the median limits, on the other side: read
        ("pco2[mmHg]", [15.1, 15.1, 15.1, 40, 60], None),
        ("pco2[kPa]", [24.9, 24.9, 24.9, 5, 6], None),
        ("pco2[mmHg]", [8.1, 6.2, 5.3, 9.4], None),  # four values: too few to judge a column
    ],
)
def test_a_pressure_column_in_the_other_unit_is_said_once_for_the_file(header, values, refused):
    text = f"ph,{header},pco2_note\n" if header.startswith("pco2") else f"ph,pco2[kPa],{header}\n"
    for v in values:
        text += f"7.35,{v},x\n" if header.startswith("pco2") else f"7.35,5.3,{v}\n"
    if refused:
        with pytest.raises(batch.TableError, match=refused):
            batch.read_table(text)
    else:
        batch.read_table(text)


# -- what is written -----------------------------------------------------------------------------------------


def test_output_names_are_unique_and_pressures_follow_the_input(tmp_path: Path):
    text = "ph,pco2[kPa],hco3[mmol/L],po2[kPa],fio2,sample,error\n7.24,9.3,29.7,7.1,0.28,arterial,none\n"
    counts, written, _ = run_file(tmp_path, text)
    header, row = list(csv.reader(io.StringIO(written)))
    assert len(header) == len(set(header)) and counts["pressure_unit"] == "kPa"
    assert "hco3_read[mmol/L]" in header and "error_read" in header and header[-1] == "notes"
    values = dict(zip(header, row, strict=True))
    assert values["error"] == "none" and values["hco3[mmol/L]"] == "29.7"  # the input's, as it was
    inputs = batch.row_inputs(batch.read_table(text), 0)
    want = scalar(inputs, "kPa")["outputs"]
    assert values["a_a_gradient[kPa]"] == f"{want['a_a_gradient']['value']:.2f}"
    pf_kpa = units.convert(want["pf_ratio"]["value"], "mmHg", "kPa")
    assert values["pf_ratio[kPa]"] == f"{pf_kpa:.1f}"
    # --mmhg (pressure_unit) chooses
    _, written, _ = run_file(tmp_path, text, pressure_unit="mmHg")
    header, row = list(csv.reader(io.StringIO(written)))
    values = dict(zip(header, row, strict=True))
    assert values["pf_ratio[mmHg]"] == f"{want['pf_ratio']['value']:.0f}"
    # a file in mmHg gives mmHg
    counts, written, _ = run_file(tmp_path, "ph,pco2,sample\n7.24,70 mmHg,venous\n")
    assert counts["pressure_unit"] == "mmHg" and "pco2_consciousness_threshold[mmHg]" in written


def test_the_delimiter_and_byte_order_mark_are_kept(tmp_path: Path):
    text = "\ufeffid\tward\tph\tpco2[kPa]\tsample\nA1\tPavillon Été\t7.24\t9.3\tVBG\n"
    _, written, _ = run_file(tmp_path, text)
    assert written.startswith("\ufeffid\tward\tph\tpco2[kPa]\tsample\tph_status")
    assert written.splitlines()[1].startswith("A1\tPavillon Été\t7.24\t9.3\tVBG\t")
    _, written, _ = run_file(tmp_path, text.lstrip("\ufeff"))
    assert not written.startswith("\ufeff")


def test_cells_holding_the_delimiter_are_quoted_in_the_output(tmp_path: Path):
    text = 'id;ph;pco2[kPa];sample\n"a;1";7.24;9.3;art\n'
    _, written, _ = run_file(tmp_path, text)
    rows = list(csv.reader(io.StringIO(written), delimiter=";"))
    assert rows[1][0] == "a;1" and written.splitlines()[1].startswith('"a;1";7.24;9.3;art;')


# -- the summary ---------------------------------------------------------------------------------------------


def test_summary_percentages_use_the_rows_each_heading_names(tmp_path: Path):
    # 4 rows interpreted, 1 refused; 2 with an SpO2 (one below, one within its target); 2 respiratory
    text = (
        "ph,pco2[kPa],hco3,sample,spo2\n"
        "7.24,9.3,29.7,arterial,80\n"
        "7.40,5.3,24,arterial,96\n"
        "7.40,5.3,24,arterial,\n"
        "7.30,8.0,29,venous,\n"
        "x,5.3,24,arterial,\n"
    )
    counts, _, said = run_file(tmp_path, text)
    assert counts["interpreted"] == 4 and counts["with_errors"] == 1
    assert counts["denominators"]["spo2_on_target"] == 2 == sum(counts["spo2_on_target"].values())
    assert counts["denominators"]["chronicity"] == sum(counts["chronicity"].values())
    lines = said.splitlines()
    at = lines.index("SpO2 against its target range (of 2 rows with an SpO2):")
    shares = [line.split()[-2] for line in lines[at + 1 : at + 3]]
    assert shares == ["50.0", "50.0"]
    at = lines.index("Primary disorder (of 4 rows interpreted):")
    assert sum(float(line.split()[-2]) for line in lines[at + 1 : lines.index("", at)]) == pytest.approx(
        100.0
    )
    assert "pH: not a number" in said and "[spo2_below_target]" in said
    assert "spo2_below_target" not in said.replace("[spo2_below_target]", "")  # words first, the code aside


# -- chunks --------------------------------------------------------------------------------------------------


def test_reading_in_chunks_changes_nothing(tmp_path: Path, monkeypatch):
    text, _ = make_export(episodes=40, seed=5)
    # a quoted cell with a line break, and one with the delimiter, to be cut at any place
    lines = text.split("\r\n")
    lines[7] = lines[7].rsplit(";", 1)[0] + ';"two\nlines; here"'
    lines[30] = lines[30].rsplit(";", 1)[0] + ';"a ""quoted"" word"'
    text = "\r\n".join(lines)
    _, whole, said_whole = run_file(tmp_path, text)
    for chunk, block in ((7, 50), (1, 13), (100, 1000)):
        monkeypatch.setattr(batch, "CHUNK", chunk)
        monkeypatch.setattr(batch, "BLOCK", block)
        _, chunked, said = run_file(tmp_path, text)
        assert chunked == whole and said == said_whole, (chunk, block)
    assert "two\nlines; here" in whole


def test_summary_json_and_counts_are_the_same_dict(tmp_path: Path):
    counts, _, _ = run_file(tmp_path, "ph,pco2[kPa],sample\n7.3,8,art\n")
    assert json.loads(json.dumps(counts)) == counts

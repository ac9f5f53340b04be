"""The command line (tidewell.frontends.cli): text and JSON answers, exit codes, messages for bad input.

Run both in-process (``cli.main([...])``) and as a real process (``python -m tidewell``). The numbers are the
bridge's (checked against their sources in the other test files); here what is checked is that the command
line sends the right request and shows the answer, and fails with the right status and message.
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest

from tidewell.bridge import handle_obj
from tidewell.frontends import cli

# worked case AB-05 (tests/cases/reference_cases.json): COPD exacerbation, acute-on-chronic respiratory
# acidosis meeting the BTS/ICS 2016 NIV thresholds
AB05 = ["--ph", "7.24", "--pco2", "70mmHg", "--hco3", "29.7"]
ROOT = Path(__file__).resolve().parents[2]


def run(*args: str, stdin: str | None = None) -> subprocess.CompletedProcess:
    return subprocess.run(
        [sys.executable, "-m", "tidewell", *args],
        capture_output=True,
        text=True,
        input=stdin,
        timeout=120,
        cwd=ROOT,
    )


def main(capsys, *args: str) -> tuple[int, str, str]:
    status = cli.main(list(args))
    out = capsys.readouterr()
    return status, out.out, out.err


# -- one sample ----------------------------------------------------------------------------------------------


def test_text_report_has_every_part(capsys):
    status, out, err = main(capsys, *AB05, "--po2", "53mmHg", "--fio2", "28%", "--age", "71")
    assert status == 0, err
    for heading in ("Summary", "How sure", "Findings (most urgent first)", "Key numbers", "Cautions"):
        assert f"\n{heading}\n" in out, heading
    assert "Acute-on-chronic respiratory acidosis" in out
    assert "URGENT" in out and "[niv_criteria_met]" in out
    assert "Decision support only" in out
    assert out.index("URGENT") < out.index("NOTABLE") < out.index("INFO")


def test_json_is_the_bridge_response(capsys):
    status, out, _ = main(capsys, *AB05, "--json")
    assert status == 0
    response = json.loads(out)
    request = {"ph": 7.24, "pco2": {"value": 70.0, "unit": "mmHg"}, "hco3": {"value": 29.7, "unit": "mmol/L"}}
    assert response == handle_obj({"calc": "blood_gas", "inputs": request})


def test_pressures_follow_the_unit_typed_unless_asked(capsys):
    kpa = json.loads(main(capsys, "--ph", "7.24", "--pco2", "9.3kPa", "--json")[1])
    assert kpa["options"]["pressure_unit"] == "kPa"
    mmhg = json.loads(main(capsys, "--ph", "7.24", "--pco2", "9.3kPa", "--mmhg", "--json")[1])
    assert mmhg["options"]["pressure_unit"] == "mmHg" and mmhg["outputs"]["pco2_target"]["unit"] == "mmHg"


def test_flags_read_units_percentages_words_and_flags():
    args = cli._sample_parser("t", "", "").parse_args(
        [
            "--ph",
            "7.31",
            "--pco2",
            "9.1 KPA",
            "--fio2",
            "28%",
            "--sample",
            "Capillary",
            "--hypercapnia-risk",
            "--glucose",
            "180mg/dL",
            "--na",
            "138",
            "--temperature",
            "93degF",
            "--age",
            "70",
        ]
    )
    assert cli.sample_inputs(args) == {
        "ph": 7.31,
        "pco2": {"value": 9.1, "unit": "kPa"},
        "fio2": {"value": 28.0, "unit": "%"},
        "sample": "capillary",
        "hypercapnia_risk": True,
        "glucose": {"value": 180.0, "unit": "mg/dL"},
        "na": {"value": 138.0, "unit": "mmol/L"},  # Na: mmol/L and mEq/L are the same number
        "temperature": {"value": 93.0, "unit": "degF"},
        "age": 70.0,
    }


def test_every_blood_gas_input_has_a_flag():
    from tidewell.calculations.blood_gas import INPUT_KEYS

    assert set(cli.FLAG_OF) == set(INPUT_KEYS)


@pytest.mark.parametrize(
    ("args", "field", "words"),
    [
        (["--ph", "7.3", "--pco2", "5.3mmHg"], "--pco2", "Did you mean 5.3 kPa?"),
        (["--ph", "7.3", "--pco2", "70"], "--pco2", "needs a unit"),
        (["--ph", "73", "--pco2", "9kPa"], "--ph", "Did you mean 7.3?"),
        (["--ph", "7.3"], "--pco2", "PCO2 is required"),
        (["--ph", "7.3", "--pco2", "9kPa", "--glucose", "7"], "--glucose", "needs a unit"),
        (["--ph", "7.3", "--pco2", "9kPa", "--sample", "arteral"], "--sample", "Did you mean 'arterial'?"),
        (["--ph", "7.3", "--pco2", "9kPa", "--fio2", "40"], "--fio2", "Did you mean 40 %"),
    ],
)
def test_bad_input_exits_2_naming_the_flag_and_the_hint(capsys, args, field, words):
    status, out, err = main(capsys, *args)
    assert status == 2 and out == ""
    line = next(line for line in err.splitlines() if line.startswith(f"tidewell: {field}:"))
    assert words in line, err


def test_no_flags_shows_the_help_and_exits_2(capsys):
    status, out, _ = main(capsys)
    assert status == 2 and "--pco2" in out


def test_unknown_flag_is_a_usage_error(capsys):
    status, _, err = main(capsys, "--ph", "7.3", "--pc02", "9kPa")
    assert status == 2 and "unrecognized arguments: --pc02" in err


def test_help_reads_for_a_clinician(capsys):
    status, out, _ = main(capsys, "--help")
    assert status == 0
    for words in (
        "Decision support only",
        "a pressure without a unit is refused, never guessed",
        "--pco2 VALUE",
        "9.3kPa or 70mmHg",
        "Chemistry",
        "Patient and oxygen",
        "--hypercapnia-risk",
        "exit status: 0 answered, 2 bad input",
        "tidewell batch gases.csv -o gases-read.csv",
    ):
        assert words in " ".join(out.split()), words


@pytest.mark.parametrize("command", [[], ["calc"], ["how-sure"], ["batch"]])
def test_help_lines_fit_80_columns_on_a_wide_terminal(capsys, monkeypatch, command):
    monkeypatch.setenv("COLUMNS", "200")
    status, out, _ = main(capsys, *command, "--help")
    assert status == 0
    wide = [line for line in out.splitlines() if len(line) > 80]
    assert not wide, wide
    assert max(map(len, out.splitlines())) > 60  # the text is filled, not cut to a narrow column


def test_a_value_and_its_unit_written_apart(capsys):
    together = main(capsys, "--ph", "7.30", "--pco2", "60mmHg", "--po2", "55mmHg", "--fio2", "28%", "--json")
    apart = main(
        capsys, "--ph", "7.30", "--pco2", "60", "mmHg", "--po2=55", "mmHg", "--fio2", "28", "%", "--json"
    )
    assert together[0] == apart[0] == 0
    assert json.loads(apart[1])["outputs"] == json.loads(together[1])["outputs"]
    # a number alone is still refused for a pressure: the next flag is not taken for a unit
    status, _, err = main(capsys, "--ph", "7.30", "--pco2", "60", "--po2", "55mmHg")
    assert status == 2 and "--pco2" in err and "bad_unit" in err


def test_json_on_an_input_error_is_json_on_stdout(capsys):
    status, out, err = main(capsys, "--ph", "7.30", "--pco2", "60", "--json")
    assert status == 2 and "--pco2" in err
    response = json.loads(out)
    assert response["ok"] is False and response["errors"][0]["field"] == "inputs.pco2"
    assert response["errors"][0]["code"] == "bad_unit"


def test_internal_fault_exits_1(capsys, monkeypatch):
    def broken(request):
        return {
            "ok": False,
            "calc": request["calc"],
            "errors": [{"field": "request", "code": "internal_error"}],
        }

    monkeypatch.setattr(cli, "handle_obj", broken)
    status, _, err = main(capsys, *AB05, "--no-how-sure")
    assert status == 1 and "internal_error" in err

    def crash(request):
        raise RuntimeError("boom")

    monkeypatch.setattr(cli, "handle_obj", crash)
    status, _, err = main(capsys, *AB05)
    assert status == 1 and "internal error" in err and "Traceback" not in err


def test_single_sample_without_how_sure_loads_no_numpy():
    code = (
        "import sys\n"
        "from tidewell.frontends import cli\n"
        "status = cli.main(['--ph', '7.24', '--pco2', '9.3kPa', '--no-how-sure'])\n"
        "assert status == 0 and 'numpy' not in sys.modules\n"
    )
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=60)
    assert done.returncode == 0, done.stderr


# -- calc ----------------------------------------------------------------------------------------------------


def test_calc_by_name_with_key_values(capsys):
    status, out, err = main(capsys, "calc", "altitude", "altitude=8000ft", "fio2=0.21", "--json")
    assert status == 0, err
    response = json.loads(out)
    assert response == handle_obj(
        {"calc": "altitude", "inputs": {"altitude": {"value": 8000.0, "unit": "ft"}, "fio2": 0.21}}
    )
    status, out, _ = main(capsys, "calc", "convert", "quantity=180mg/dL", "to=mmol/L", "substance=glucose")
    # 180 mg/dL glucose = 9.99 mmol/L (molar mass 180.156 g/mol, IUPAC; worked case of tidewell.units)
    assert status == 0 and "9.991 mmol/L" in out


def test_calc_nested_keys_and_json_values(capsys):
    status, out, err = main(
        capsys, "calc", "uncertainty", "sample.ph=7.24", "sample.pco2=9.3kPa", "draws=500", "seed=4", "--json"
    )
    assert status == 0, err
    assert json.loads(out)["outputs"]["draws"] == 500
    status, out, _ = main(
        capsys, "calc", "uncertainty", 'sample={"ph": 7.24, "pco2": {"value": 9.3, "unit": "kPa"}}'
    )
    assert status == 0 and "How sure:" in out


@pytest.mark.parametrize(
    ("args", "words"),
    [
        (["calc", "nosuch", "a=1"], "is not a calculation"),
        (["calc", "altitude", "altitude=8000", "fio2=0.21"], "needs a unit"),
        (["calc", "altitude", "8000ft"], "is not key=value"),
        (["calc", "uncertainty", "sample={bad json"], "not valid JSON"),
        (["calc", "altitude", "altitude=8000ft", "fio2=0.21", "fio=0.3"], "Did you mean 'fio2'?"),
    ],
)
def test_calc_bad_input_exits_2(capsys, args, words):
    status, _, err = main(capsys, *args)
    assert status == 2 and words in err, err


def test_calc_lists_calculations(capsys):
    status, out, _ = main(capsys, "calc")
    assert status == 0 and "blood_gas" in out and "uncertainty" in out


def test_parse_assignment_values():
    assert cli.parse_assignment("hypercapnia_risk=true") == (["hypercapnia_risk"], True)
    assert cli.parse_assignment("ie_ratio=1:2") == (["ie_ratio"], "1:2")
    assert cli.parse_assignment("cylinders=2") == (["cylinders"], 2.0)
    assert cli.parse_assignment("po2=null") == (["po2"], None)


# -- how-sure ------------------------------------------------------------------------------------------------


def test_how_sure_is_seeded_and_takes_errors(capsys):
    args = (
        "how-sure",
        *AB05,
        "--seed",
        "5",
        "--draws",
        "2000",
        "--error",
        "ph=0.02",
        "--error",
        "pco2=cv:5%",
    )
    status, first, err = main(capsys, *args)
    assert status == 0, err
    assert main(capsys, *args)[1] == first
    status, out, _ = main(capsys, *args, "--json")
    used = json.loads(out)["outputs"]["errors_used"]
    assert used["ph"]["sd"] == 0.02 and used["pco2"]["cv"] == 0.05 and used["ph"]["origin"] == "given"


def test_how_sure_bad_error_exits_2(capsys):
    status, _, err = main(capsys, "how-sure", *AB05, "--error", "ph=lots")
    assert status == 2 and "is not a number" in err
    status, _, err = main(capsys, "how-sure", *AB05, "--error", "age=2")
    assert status == 2 and "takes no error" in err
    status, _, err = main(capsys, "how-sure", "--ph", "7.3", "--pco2", "5.3mmHg")
    assert status == 2 and "--pco2:" in err and "Did you mean 5.3 kPa?" in err


# -- batch ---------------------------------------------------------------------------------------------------


def test_batch_writes_the_file_and_prints_the_summary(tmp_path: Path):
    source = tmp_path / "gases.csv"
    source.write_text(
        "id,ph,pco2[kPa],hco3[mmol/L],po2[kPa],fio2\n"
        "a,7.24,9.3,29.7,7.1,0.28\n"
        "b,7.40,5.3,24,12,0.21\n"
        "c,7.24,5.3mmHg,29.7,7.1,0.28\n",
        encoding="utf-8",
    )
    target = tmp_path / "read.csv"
    done = run("batch", str(source), "-o", str(target), "--kpa", "--summary-json", str(tmp_path / "s.json"))
    assert done.returncode == 0, done.stderr
    assert "Rows: 3; interpreted: 2; with errors (not read): 1" in done.stdout
    assert "respiratory acidosis" in done.stdout and "Findings (of 2 rows interpreted):" in done.stdout
    assert "the file has no sample site column" in done.stdout
    assert "rows/s" not in done.stderr  # no progress bar when stderr is not a terminal
    lines = target.read_text(encoding="utf-8").splitlines()
    assert lines[0].startswith("id,ph,pco2[kPa],hco3[mmol/L],po2[kPa],fio2,ph_status")
    assert lines[0].endswith(",error,notes") and "hco3_read[mmol/L]" in lines[0]
    assert "Did you mean 5.3 kPa?" in lines[3]
    assert json.loads((tmp_path / "s.json").read_text())["with_errors"] == 1
    shown = run("batch", str(source), "-o", str(tmp_path / "again.csv"), "--progress")
    assert "rows/s" in shown.stderr


def test_batch_to_stdout_puts_the_summary_on_stderr(tmp_path: Path):
    source = tmp_path / "gases.csv"
    source.write_text("ph,pco2[kPa]\n7.24,9.3\n", encoding="utf-8")
    done = run("batch", str(source))
    assert done.returncode == 0
    assert done.stdout.startswith("ph,pco2[kPa],ph_status") and "Rows: 1" in done.stderr
    piped = run("batch", "-", stdin="ph,pco2[kPa]\n7.40,5.3\n")
    assert piped.returncode == 0 and "normal" in piped.stdout


@pytest.mark.parametrize(
    ("text", "words"),
    [
        ("pco2[kPa]\n9.3\n", "no 'ph' column"),
        ("ph,pco2\n7.3,60\n", "has no unit"),
        ("", "empty"),
    ],
)
def test_batch_unreadable_file_exits_2(tmp_path: Path, text, words):
    source = tmp_path / "bad.csv"
    source.write_text(text, encoding="utf-8")
    done = run("batch", str(source), "-o", str(tmp_path / "out.csv"))
    assert done.returncode == 2 and words in done.stderr, done.stderr


def test_batch_where_no_row_could_be_read_exits_2_and_says_why(tmp_path: Path):
    source = tmp_path / "gases.csv"
    source.write_text('ph,pco2[kPa]\n"7,24",9.3\n"7,40",5.3\n', encoding="utf-8")
    done = run(
        "batch", str(source), "-o", str(tmp_path / "out.csv"), "--summary-json", str(tmp_path / "s.json")
    )
    assert done.returncode == 2, done.stderr
    assert "no row could be read (2 rows, all with errors)" in done.stderr
    assert json.loads((tmp_path / "s.json").read_text())["errors_by_kind"] == {"pH: not a number": 2}
    assert "pH: not a number" in done.stderr and "line 2:" in done.stderr
    assert "2 cells hold a decimal comma" in done.stdout  # said once, for the file
    assert (tmp_path / "out.csv").read_text(encoding="utf-8").count("\n") == 3  # the rows' errors are written


def test_batch_missing_file_exits_2(tmp_path: Path):
    done = run("batch", str(tmp_path / "nowhere.csv"))
    assert done.returncode == 2 and "cannot read" in done.stderr


# -- as a process --------------------------------------------------------------------------------------------


def test_python_m_tidewell_exit_codes():
    ok = run(*AB05, "--no-how-sure")
    assert ok.returncode == 0 and "Acute-on-chronic respiratory acidosis" in ok.stdout
    bad = run("--ph", "7.3", "--pco2", "5.3mmHg")
    assert bad.returncode == 2 and bad.stdout == ""
    assert "tidewell: --pco2: PCO2 5.3 mmHg is not survivable" in bad.stderr
    assert "Did you mean 5.3 kPa?" in bad.stderr and "[implausible]" in bad.stderr
    usage = run("--nonsense")
    assert usage.returncode == 2
    version = run("--version")
    assert version.returncode == 0 and version.stdout.startswith("tidewell ")

"""``tidewell course FILE.csv`` (frontends.coursefile): the CSV read as a course request, text and JSON
answers, exit codes, and problems shown with their line in the file.

The clinical rules are checked in test_course.py; here what is checked is that the command sends the request
the file describes and shows the answer. The three example files in docs/examples/ are invented courses.
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest

from tidewell.bridge import handle_obj
from tidewell.frontends import cli
from tidewell.frontends.cells import event_words
from tidewell.frontends.coursefile import read_course

ROOT = Path(__file__).resolve().parents[2]
EXAMPLES = ROOT / "docs" / "examples"


def main(capsys, *args: str) -> tuple[int, str, str]:
    status = cli.main(["course", *args])
    out = capsys.readouterr()
    return status, out.out, out.err


def write(tmp_path: Path, text: str) -> str:
    path = tmp_path / "gases.csv"
    path.write_text(text, encoding="utf-8")
    return str(path)


def test_the_file_becomes_the_course_request():
    text = "time;ph;pco2;hco3;events\n0;7.25;10.4 kPa;33;NIV started | oxygen-decreased\n90;7.3;9.4kPa;;\n"
    inputs, lines, warnings = read_course(text)
    assert inputs == {
        "samples": [
            {
                "time": 0,
                "inputs": {
                    "ph": 7.25,
                    "pco2": {"value": 10.4, "unit": "kPa"},
                    "hco3": {"value": 33.0, "unit": "mmol/L"},
                    "sample": "arterial",
                },
                "events": ["niv_started", "oxygen_decreased"],
            },
            {"time": 90, "inputs": {"ph": 7.3, "pco2": {"value": 9.4, "unit": "kPa"}, "sample": "arterial"}},
        ]
    }
    # no site column: each gas read as arterial (the blood_gas default), and the warning says so
    assert lines == [2, 3] and warnings == [
        "no sample site on lines 2, 3: read as arterial (add a 'sample' column: arterial, capillary or "
        "venous)"
    ]


def test_event_cells():
    assert event_words(" niv_changed ;  Intubated ") == ["niv_changed", "intubated"]
    assert event_words("oxygen increased|") == ["oxygen_increased"]


@pytest.mark.parametrize(
    ("name", "present", "absent"),
    [
        ("course-oxygen.csv", ["URGENT", "[pco2_rising_after_oxygen]", "2026-12-04T03:00 (50 min)"], []),
        ("course-niv-working.csv", ["On NIV (#1 to #3, 5 h): improving"], ["[niv_not_improving]"]),
        ("course-niv-failing.csv", ["URGENT", "[niv_not_improving]", "not improving"], []),
    ],
)
def test_example_courses_as_text(capsys, name, present, absent):
    status, out, err = main(capsys, str(EXAMPLES / name), "--hypercapnia-risk")
    assert status == 0, err
    # pressures in the unit the PCO2 column was written in
    headings = ("Summary", "Gases (3; pressures in kPa)", "Changes between comparable gases", "Verdicts")
    for heading in (*headings, "Cautions"):
        assert f"\n{heading}\n" in out, heading
    for text in present:
        assert text in out, text
    for text in absent:
        assert text not in out, text


def test_json_is_the_bridge_response(capsys):
    path = EXAMPLES / "course-niv-failing.csv"
    status, out, _ = main(capsys, str(path), "--json", "--mmhg", "--age", "70", "--baseline-pco2", "7.5kPa")
    assert status == 0
    inputs, _, _ = read_course(path.read_text(encoding="utf-8"))
    inputs.update({"age": 70.0, "baseline_pco2": {"value": 7.5, "unit": "kPa"}})
    expected = handle_obj({"calc": "course", "inputs": inputs, "options": {"pressure_unit": "mmHg"}})
    assert json.loads(out) == expected
    assert expected["outputs"]["readings"][0]["pco2"]["unit"] == "mmHg"


def test_problems_name_their_line(capsys, tmp_path):
    path = write(tmp_path, "time,ph,pco2[kPa],events\n0,7.3,9,\n03:10,7.32,8.6,oxygen up\n")
    status, out, err = main(capsys, path)
    assert status == 2 and out == ""
    assert "line 3: Time is neither minutes" in err and "[bad_request]" in err
    assert "line 3: inputs.samples[1].events[0]:" in err


def test_a_file_without_a_time_column_is_refused(capsys, tmp_path):
    status, _, err = main(capsys, write(tmp_path, "ph,pco2[kPa]\n7.3,9\n7.32,8.6\n"))
    assert status == 2 and "no 'time' column" in err


def test_as_a_process():
    done = subprocess.run(
        [sys.executable, "-m", "tidewell", "course", str(EXAMPLES / "course-oxygen.csv")],
        capture_output=True,
        text=True,
        timeout=120,
        cwd=ROOT,
    )
    assert done.returncode == 0, done.stderr
    assert "[pco2_rising_after_oxygen]" in done.stdout

"""The corridor tools through the command line: report, new --from-profile, diff.

Common practice, no source: every command either does its job (exit 0) or prints one
clear line and exits 2, never a traceback (DESIGN.md, exit codes). Invented test data.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from screening.cli import main

DATA = Path(__file__).parent / "data" / "profiles"


@pytest.fixture(scope="module")
def corridor_file(tmp_path_factory) -> Path:
    path = tmp_path_factory.mktemp("cli") / "walls.toml"
    assert (
        main(
            [
                "new",
                str(path),
                "--from-profile",
                str(DATA / "two_walls_levels.csv"),
                "--name",
                "CLI",
            ]
        )
        == 0
    )
    return path


def test_new_from_profile_writes_a_corridor_that_checks(corridor_file, capsys):
    text = corridor_file.read_text()
    assert 'name = "CLI"' in text and 'id = "NRL-01"' in text
    assert main(["check", str(corridor_file), "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert [s["id"] for s in out["segments"]][:2] == ["NRL-01", "NRL-02"]


def test_new_from_a_bad_profile_is_one_line_and_exit_2(tmp_path, capsys):
    code = main(["new", str(tmp_path / "x.toml"), "--from-profile", str(DATA / "bad_number.csv")])
    err = capsys.readouterr().err
    assert code == 2
    assert err.strip().endswith(
        "bad_number.csv:4:2: height_m: 'abc' is not a number; write metres, e.g. 4.25"
    )
    assert "Traceback" not in err and not (tmp_path / "x.toml").exists()


@pytest.mark.parametrize("suffix", [".html", ".md", ".csv"])
def test_report_command_writes_each_format(corridor_file, tmp_path, suffix, capsys):
    out = tmp_path / f"r{suffix}"
    assert main(["report", str(corridor_file), "-o", str(out)]) == 0
    text = out.read_text(encoding="utf-8")
    assert "Screening only, not a design" in text
    assert "NRL-01" in text and "W2-02" in text


def test_report_command_refuses_an_unknown_format(corridor_file, tmp_path, capsys):
    assert main(["report", str(corridor_file), "-o", str(tmp_path / "r.docx")]) == 2
    assert "use .html, .md or .csv" in capsys.readouterr().err


def test_diff_command(corridor_file, tmp_path, capsys):
    changed = tmp_path / "changed.toml"
    changed.write_text(
        corridor_file.read_text().replace('traffic = "none"', 'traffic = "parallel"')
    )
    assert main(["diff", str(corridor_file), str(changed)]) == 0
    text = capsys.readouterr().out
    assert "NRL-01  traffic none -> parallel" in text
    assert main(["diff", str(corridor_file), str(changed), "--json"]) == 0
    payload = json.loads(capsys.readouterr().out)
    assert {s["id"] for s in payload["segments"]} >= {"NRL-01", "W2-02"}
    assert all(
        s["inputs"] == [{"field": "traffic", "old": "none", "new": "parallel"}]
        for s in payload["segments"]
    )

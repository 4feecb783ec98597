"""A corridor file's own unit rates, a rates file on the command line, and the tidying of
a profile's cuts (rounded to 0.1 m, no piece under the least length)."""

from __future__ import annotations

import csv
import io
from pathlib import Path

import pytest

from screening import engine, store
from screening.cli import main
from screening.corridor.quantities import corridor_quantities, corridor_rates, load_rates
from screening.model.errors import InputError
from screening.profile.split import ProfileLine, split_profile
from screening.profile.tidy import tidy_pieces

BASE = """schema = "wallscreen/1"
[corridor]
name = "Rates test"
{rates}
[[segment]]
id = "A-01"
wall = "A"
chainage_start_m = 0.0
chainage_end_m = 20.0
height_start_m = 4.0
height_end_m = 4.0
"""


def test_rates_in_the_corridor_file_override_the_shipped_ones(tmp_path: Path):
    path = tmp_path / "c.toml"
    path.write_text(BASE.format(rates='[rates]\ncurrency = "EUR"\nface_m2 = 400.0\n'))
    corridor = store.load(path)
    rates = corridor_rates(corridor)
    shipped = load_rates()
    assert rates.face_m2 == 400.0 and rates.currency == "EUR"
    assert rates.select_fill_m3 == shipped.select_fill_m3  # what it leaves out stays
    assert rates.placeholder  # some rates are still the shipped placeholders
    q = corridor_quantities(corridor, engine.screen(corridor))
    assert q.segments[0].cost["facing"] == pytest.approx(q.segments[0].facing_area_m2 * 400.0)
    saved = tmp_path / "again.toml"
    store.save(saved, corridor)
    assert store.load(saved).rates == corridor.rates  # written back as given


def test_a_bad_rate_names_file_line_and_key(tmp_path: Path):
    path = tmp_path / "c.toml"
    path.write_text(BASE.format(rates="[rates]\nfcae_m2 = 400.0\n"))
    with pytest.raises(InputError, match=r"c.toml:5:1: \[rates\] fcae_m2: .*did you mean"):
        store.load(path)


def test_report_with_a_rates_file_uses_it_and_says_so(tmp_path: Path, capsys):
    path = tmp_path / "c.toml"
    path.write_text(BASE.format(rates=""))
    rates = tmp_path / "mine.toml"
    rates.write_text(
        '[rates]\ncurrency = "NZD"\nface_m2 = 1.0\nlevelling_pad_m = 1.0\n'
        "select_fill_m3 = 1.0\nsteel_kg = 1.0\ngeosynthetic_m2 = 1.0\n"
    )
    out = tmp_path / "r.csv"
    assert (
        main(["report", str(path), "-o", str(out), "--rates", str(rates), "--revision", "P02"]) == 0
    )
    rows = list(csv.DictReader(io.StringIO(out.read_text())))
    assert rows[0]["placeholder_rates"] == "no" and "rough_cost_NZD" in rows[0]
    about = (tmp_path / "r-about.txt").read_text()
    assert "P02" in about and str(rates) in about
    import hashlib

    assert hashlib.sha256(path.read_bytes()).hexdigest() in about


def test_cuts_round_to_a_tenth_and_slivers_join():
    """Common practice, no source: chainages of wall joints to 0.1 m, no segment shorter
    than a few metres; a join never hides a point higher than the joined ends."""
    ch = (0.0, 50.0, 100.0)
    h = (1.0, 3.0, 3.2)
    line = ProfileLine("W", "", ch, h)
    pieces = split_profile(ch, h, max_step_m=1 / 3, max_length_m=30.0)
    assert any(round(c1, 1) != c1 for _, c1, _, _ in pieces)  # 7.5, 15, ... 16.667
    tidy, left = tidy_pieces(pieces, line, 0.1, 5.0)
    assert left == []
    for c0, c1, _, _ in tidy:
        assert round(c0, 1) == pytest.approx(c0) and round(c1, 1) == pytest.approx(c1)
        assert c1 - c0 >= 5.0 - 1e-9
    assert tidy[0][0] == 0.0 and tidy[-1][1] == 100.0
    assert all(a[1] == b[0] for a, b in zip(tidy, tidy[1:], strict=False))  # contiguous

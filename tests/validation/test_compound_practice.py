"""Compound and global stability as practice does it, checked against outside sources.

- Bishop (1955) with reinforcement moments as FHWA-NHI-00-043 ch. 9 (from memory) gives them
  (F = (M_soil + sum T_i D_i) / M_drive; D = R for continuous extensible sheets, D = the
  vertical distance to the centre for discrete inextensible layers), on prescribed circles,
  against an independent numerical integration of the same sliding mass (scipy);
- the search domain: compound circles through the reinforced zone and the retained fill or
  foundation, global circles wholly behind and under it, none deeper than the firm layer or
  2H (common practice, no source; GEC 11 ch. 4 from memory for the families);
- why c' = 0 gives near-planar critical surfaces (scale-free strength; the infinite-slope
  limit tan(phi)/tan(beta) of standard texts, e.g. Taylor 1948, from memory);
- a brute-force search over a dense grid of circles against the screening search: within 1 %;
- ordinary walls clear under LRFD and ASD (common practice, no source: a 0.7H MSE wall on a
  competent foundation is a standard design with compound FS about 1.3-1.6).
"""

from __future__ import annotations

import dataclasses
import itertools

import numpy as np
import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st

from screening.engine import screen
from screening.engine.samples import ASD, GEOGRID, LRFD, STRIP, make_corridor, make_segment
from screening.engine.slip.check import compound_check
from screening.engine.slip.density import STANDARD
from screening.engine.slip.family import COMPOUND, GLOBAL, INTERNAL, classify
from screening.engine.slip.geometry import SlipLayers, SlipSection, SlipSoils, make_circles
from screening.engine.slip.search import evaluate
from screening.engine.slip.wall import Factors, wall_grid, wall_layers, wall_section, wall_soils
from screening.model import Fill, Foundation
from tests.unit.test_compound import LRFD as LRFD_PHI
from tests.unit.test_compound import wall


def _block(n_layers: int, tangent: bool, rupture_kn_m: float) -> tuple:
    """A 6 m undrained clay bank with a vertical face (phi = 0, so Bishop's F is exact for a
    circle: m_alpha = cos(alpha)); the 'reinforced zone' is the same clay."""
    h = 6.0
    section = SlipSection(
        ground_x_m=np.array([[-200.0, 0.0, 0.0, 200.0]]),
        ground_y_m=np.array([[0.0, 0.0, h, h]]),
        height_m=np.array([h]),
        length_m=np.array([4.0]),
        water_level_m=np.array([-np.inf]),
        surcharge_kpa=np.array([0.0]),
    )
    soils = SlipSoils(
        unit_weight_kn_m3=np.full((1, 3), 18.0),
        cohesion_kpa=np.full((1, 3), 40.0),
        tan_phi=np.zeros((1, 3)),
    )
    level = np.array([[1.5, 3.0, 4.5][:n_layers]]) if n_layers else np.zeros((1, 1))
    mask = np.ones(level.shape, dtype=bool) if n_layers else np.zeros((1, 1), dtype=bool)
    layers = SlipLayers(
        level_m=level,
        mask=mask,
        rupture_kn_m=np.full(level.shape, rupture_kn_m),
        pullout_kn_m2=np.full(level.shape, 1e6),  # anchorage never governs here
        front_kn_m=np.full(level.shape, 1e6),
        tangent=np.full(level.shape, tangent),
    )
    return section, soils, layers


def _hand_factor(xc: float, yc: float, r: float, levels, rupture: float, tangent: bool) -> float:
    """F of one circle by integration: c R^2 theta resisting, gamma * integral of (x - xc) dA
    over the sliding mass driving (scipy.integrate.quad over x of the column heights), plus
    T D per layer cut (FHWA-NHI-00-043 ch. 9, from memory)."""
    from scipy.integrate import quad

    h, gamma, c = 6.0, 18.0, 40.0

    def ground(x: float) -> float:
        return 0.0 if x < 0 else h

    def arc(x: float) -> float:
        return yc - np.sqrt(max(r**2 - (x - xc) ** 2, 0.0))

    # Ends of the arc on the ground line: in front (y = 0) and behind (y = h).
    x_exit = xc - np.sqrt(r**2 - yc**2)
    x_entry = xc + np.sqrt(r**2 - (yc - h) ** 2)

    def column(x: float) -> float:
        return max(ground(x) - arc(x), 0.0)

    drive = sum(
        quad(lambda x: gamma * column(x) * (x - xc), a, b, limit=200)[0]
        for a, b in ((x_exit, 0.0), (0.0, x_entry))
    )
    # Arc length between the two ends times c, moment arm R.
    angle = np.arctan2(x_entry - xc, yc - h) - np.arctan2(x_exit - xc, yc)
    resist = c * r * abs(angle) * r
    for y in levels:
        if y < yc and r**2 > (y - yc) ** 2:
            x_cut = xc + np.sqrt(r**2 - (y - yc) ** 2)
            if 0.0 < x_cut < 4.0:
                resist += rupture * (r if tangent else (yc - y))
    return resist / drive


@pytest.mark.parametrize("tangent", [False, True])
@pytest.mark.parametrize("n_layers", [0, 3])
def test_reinforced_bishop_on_a_circle_matches_integration(n_layers: int, tangent: bool) -> None:
    """Bishop (1955) with phi = 0 plus T*D per layer (D = R along the circle for geosynthetic
    sheets, y_c - y for horizontal steel: FHWA-NHI-00-043 ch. 9, from memory) against scipy
    quadrature of the same mass: within 0.5 % (the engine's slices are the only difference)."""
    section, soils, layers = _block(n_layers, tangent, rupture_kn_m=30.0)
    xc, yc, r = 1.0, 8.0, 8.5
    x_exit = xc - np.sqrt(r**2 - yc**2)
    x_entry = xc + np.sqrt(r**2 - (yc - 6.0) ** 2)
    # The angle the chord subtends at (xc, yc): between the radii to its two ends.
    to_exit = np.array([x_exit - xc, 0.0 - yc])
    to_entry = np.array([x_entry - xc, 6.0 - yc])
    angle = np.arccos(to_exit @ to_entry / r**2)
    circles = make_circles(
        section, np.array([[x_exit]]), np.array([[x_entry]]), np.array([[angle]])
    )
    assert circles.centre_x_m[0, 0] == pytest.approx(xc, abs=1e-6)
    assert circles.centre_y_m[0, 0] == pytest.approx(yc, abs=1e-6)
    f, ok = evaluate(section, soils, layers, circles, (40, 60, 40), np.zeros(1))
    levels = [1.5, 3.0, 4.5][:n_layers]
    want = _hand_factor(xc, yc, r, levels, 30.0, tangent)
    assert ok[0, 0]
    assert f[0, 0] == pytest.approx(want, rel=5e-3)


def test_geosynthetic_sheets_pull_along_the_circle_steel_horizontally() -> None:
    """The lever arm per family (FHWA-NHI-00-043 ch. 9, from memory): the same layers give a
    larger compound factor when they act along the circle (lever R >= y_c - y)."""
    base = wall(rupture=20.0)
    flat = compound_check(dataclasses.replace(base, tangent=np.array([False])), "lrfd", LRFD_PHI)
    along = compound_check(dataclasses.replace(base, tangent=np.array([True])), "lrfd", LRFD_PHI)
    assert along.compound.factor[0] > flat.compound.factor[0] * 1.02


def _families(inp, density=STANDARD):
    grid, _ = wall_grid(inp, density)
    section = wall_section(inp, Factors("unfactored"))
    circles = make_circles(section, grid[..., 0], grid[..., 1], grid[..., 2])
    return section, circles, classify(section, circles)


def test_families_follow_practice() -> None:
    """Compound circles pass through the reinforced zone and the retained fill or foundation;
    global circles pass wholly behind and under it; circles inside the zone are internal
    (GEC 11 ch. 4, from memory). Checked circle by circle on the grid of a 6 m wall."""
    inp = wall()
    section, circles, fam = _families(inp)
    length = float(inp.length_m[0])
    xc, yc, r = circles.centre_x_m[0], circles.centre_y_m[0], circles.radius_m[0]
    entry = circles.x_entry_m[0]
    # Lowest point of the arc over the reinforced zone.
    low_x = np.clip(xc, 0.0, np.minimum(length, entry))
    low_y = yc - np.sqrt(np.maximum(r**2 - (low_x - xc) ** 2, 0.0))
    base_at = lambda x: yc - np.sqrt(np.maximum(r**2 - (x - xc) ** 2, 0.0))  # noqa: E731
    valid = circles.valid[0]
    glob = fam[0] == GLOBAL
    comp = fam[0] == COMPOUND
    internal = fam[0] == INTERNAL
    assert glob.any() and comp.any() and internal.any()
    assert np.all(base_at(0.0)[glob] <= 1e-6) and np.all(base_at(length)[glob] <= 1e-6)
    assert np.all(entry[glob] >= length - 1e-9)
    assert np.all((entry[comp] >= length - 1e-9) | (low_y[comp] < 0.0))
    assert np.all((entry[internal] < length) & (low_y[internal] >= -1e-6))
    assert np.all(fam[0][~valid] < COMPOUND)


def test_no_circle_below_the_firm_layer_or_two_heights() -> None:
    """Depth bound (common practice, no source): the firm layer, and never more than 2H."""
    for firm, limit in ((1.0, 1.0), (np.inf, 12.0)):
        inp = dataclasses.replace(wall(), firm_depth_m=np.array([firm]))
        section, circles, fam = _families(inp)
        xc, yc, r = (getattr(circles, k)[0] for k in ("centre_x_m", "centre_y_m", "radius_m"))
        low_x = np.clip(xc, circles.x_exit_m[0], circles.x_entry_m[0])
        low_y = yc - np.sqrt(np.maximum(r**2 - (low_x - xc) ** 2, 0.0))
        assert np.all(low_y[circles.valid[0]] >= -limit - 1e-6)
        found = compound_check(inp, "lrfd", LRFD_PHI)
        g = found.global_
        if g.found[0]:
            assert g.centre_y_m[0] - g.radius_m[0] >= -limit - 1e-3


def test_cohesionless_soil_favours_flat_surfaces_and_the_domain_bounds_them() -> None:
    """With c' = 0 every force scales with size squared and every moment with size cubed, so
    F depends on the shape of a circle only; through the same two ground points F falls as
    the arc flattens towards a plane (standard texts: the infinite-slope/planar-wedge limit,
    from memory). The critical compound circle of such a wall is therefore nearly straight,
    with a far-away centre, while where it runs stays inside the domain: exit at or in front
    of the toe within 1.6(H + run), entry within L + 3.5H, above 2H below the base."""
    inp = wall()
    bare = dataclasses.replace(inp, layer_mask=np.zeros_like(inp.layer_mask))
    exit_ = np.zeros((1, 5))  # at the toe: a flat arc from further out would cut the face
    entry = np.full((1, 5), float(inp.length_m[0]) + 1.0)
    angles = np.radians([[80.0, 60.0, 40.0, 20.0, 8.0]])
    assert np.all(np.diff(_plain_factor(bare, exit_, entry, angles)) < 0)  # flatter, lower F
    # Scale-free: the same shapes in a wall twice as tall give the same F without layers.
    big = dataclasses.replace(
        bare,
        height_m=2 * bare.height_m,
        embedment_m=2 * bare.embedment_m,
        length_m=2 * bare.length_m,
        toe_slope_height_m=2 * bare.toe_slope_height_m,
        found_water_depth_m=2 * bare.found_water_depth_m,
    )
    small_f = _plain_factor(bare, exit_, entry, angles)
    big_f = _plain_factor(big, 2 * exit_, 2 * entry, angles)
    np.testing.assert_allclose(small_f, big_f, rtol=2e-3)
    found = compound_check(inp, "lrfd", LRFD_PHI).compound
    h, length = float(inp.height_m[0]), float(inp.length_m[0])
    x_exit, x_entry = found.params[0, 0], found.params[0, 1]
    assert -1.6 * h - 1e-6 <= x_exit <= 0.0
    assert length - 1e-9 <= x_entry <= length + 3.5 * h + 1e-6


def _plain_factor(inp, exit_, entry, angles):
    section = wall_section(inp, Factors("unfactored"))
    soils = wall_soils(inp, Factors("unfactored"), undrained=False)
    f, _ = evaluate(
        section,
        soils,
        wall_layers(inp),
        make_circles(section, exit_, entry, angles),
        STANDARD.slices,
        np.zeros(1),
    )
    return f[0]


def _plain_factor_with_layers(inp, exit_, entry, angles):
    section = wall_section(inp, Factors("unfactored"))
    soils = wall_soils(inp, Factors("unfactored"), undrained=False)
    circles = make_circles(section, exit_, entry, angles)
    f, _ = evaluate(section, soils, wall_layers(inp), circles, STANDARD.slices, np.zeros(1))
    return f[0]


def _brute_force(inp, family: int) -> float:
    """The least factor of one family over a dense grid of circles (no pattern search)."""
    h, length = float(inp.height_m[0]), float(inp.length_m[0])
    exits = -np.linspace(0.0, 1.6 * h, 33)
    entries = np.concatenate(
        [np.linspace(0.05 * length, length, 12), length + np.linspace(0.0, 3.5 * h, 40)]
    )
    angles = np.radians(np.linspace(5.0, 150.0, 59))
    e, x, a = (v.reshape(1, -1) for v in np.meshgrid(exits, entries, angles, indexing="ij"))
    section = wall_section(inp, Factors("unfactored"))
    soils = wall_soils(inp, Factors("unfactored"), undrained=False)
    layers = wall_layers(inp)
    best = np.inf
    for s in range(0, e.shape[1], 6000):
        c = make_circles(section, e[:, s : s + 6000], x[:, s : s + 6000], a[:, s : s + 6000])
        f, _ = evaluate(section, soils, layers, c, STANDARD.slices, np.zeros(1))
        fam = classify(section, c)
        best = min(best, float(np.min(np.where(fam == family, f, np.inf))))
    return best


@pytest.mark.parametrize(
    "changes",
    [
        {},
        {"tangent": np.array([True])},
        {"height_m": np.array([4.0]), "length_m": np.array([2.8])},
        {"found_friction_deg": np.array([27.0]), "tangent": np.array([True])},
        {"height_m": np.array([9.0]), "length_m": np.array([6.3]), "tangent": np.array([True])},
        {"found_undrained_kpa": np.array([50.0])},
        {"toe_slope_deg": np.array([18.4])},
        {"backslope_deg": np.array([18.4]), "tangent": np.array([True])},
    ],
    ids=[
        "steel-6m",
        "geogrid-6m",
        "steel-4m",
        "geogrid-weak-foundation",
        "geogrid-9m",
        "steel-on-clay",
        "steel-toe-slope",
        "geogrid-backslope",
    ],
)
def test_screening_search_agrees_with_a_brute_force_search(changes) -> None:
    """The screening search (STANDARD: grid plus pattern search) against the least factor over
    about 30,000 circles per family: within 1 % for compound and for global (the issue's
    acceptance rule; the dense grid is the reference)."""
    inp = dataclasses.replace(wall(), **changes)
    got = compound_check(inp, "asd", {"compound": 1.0}, density=STANDARD)
    for family, check in ((COMPOUND, got.compound), (GLOBAL, got.global_)):
        ref = _brute_force(inp, family)
        assert check.factor[0] == pytest.approx(ref, rel=0.01)


@settings(max_examples=12, deadline=None)
@example(height=7.3511, ratio=0.9446, strength=75.5406, more=2.3784, tangent=True)
@given(
    height=st.floats(3.0, 9.0),
    ratio=st.floats(0.7, 1.1),
    strength=st.floats(10.0, 80.0),
    more=st.floats(1.0, 3.0),
    tangent=st.booleans(),
)
def test_a_stronger_grade_never_lowers_the_compound_cdr(height, ratio, strength, more, tangent):
    """Property (common practice, no source): stronger layers never make a wall less stable.

    Exactly on any one circle (the strong layers' critical circle is at least as safe with
    them as with the weak ones), and for the searched minimum within the search's accuracy:
    each searched minimum may sit up to ~1-2 % above the true least factor (measured against
    the fine search: bench/README, "Accuracy"), and the two searches take different paths,
    so the weak wall's minimum can be overestimated more than the strong one's. Measured on
    300 random draws of this test's ranges: 14 below -0.5 %, the worst -1.11 % (the example
    above, geosynthetic layers); hence 2 %."""
    base = dataclasses.replace(
        wall(height=height, length=ratio * height, rupture=strength), tangent=np.array([tangent])
    )
    stronger = dataclasses.replace(base, layer_rupture_kn_m=base.layer_rupture_kn_m * more)
    weak = compound_check(base, "lrfd", LRFD_PHI)
    strong = compound_check(stronger, "lrfd", LRFD_PHI)
    assert strong.compound.cdr[0] >= weak.compound.cdr[0] * (1 - 0.02)
    if strong.compound.found[0]:
        e, x, a = (np.array([[v]]) for v in strong.compound.params[0])
        on_circle = [_plain_factor_with_layers(inp, e, x, a)[0] for inp in (base, stronger)]
        assert on_circle[1] >= on_circle[0] * (1 - 1e-9)


def _ordinary(
    reinforcement,
    heights=(3.0, 4.5, 6.0, 7.5, 9.0),
    fills=(32.0, 35.0, 38.0),
    foundations=(26.0, 30.0, 34.0),
):
    segs = []
    for i, (h, pf, pfd) in enumerate(itertools.product(heights, fills, foundations)):
        segs.append(
            make_segment(
                i,
                height_start_m=h,
                height_end_m=h,
                reinforcement=reinforcement,
                fill=Fill(
                    unit_weight_kn_m3=20.0, friction_deg=pf, uniformity_coefficient=10.0, id="f"
                ),
                foundation=Foundation(unit_weight_kn_m3=19.0, friction_deg=pfd, water_depth_m=20.0),
            )
        )
    return segs


@pytest.mark.parametrize("factor_set", [LRFD, ASD], ids=["lrfd", "asd"])
@pytest.mark.parametrize("reinforcement", [GEOGRID, STRIP], ids=["geogrid", "steel-strip"])
def test_an_ordinary_wall_is_clear(factor_set, reinforcement) -> None:
    """A 6 m wall of select fill (phi 34) on a competent foundation (phi 32), level ground, no
    water, no traffic: a standard design, clear under LRFD and ASD (common practice, no source:
    0.7H MSE walls on competent ground have compound FS about 1.3-1.6 and need no special
    design)."""
    seg = make_segment(
        0,
        reinforcement=reinforcement,
        foundation=Foundation(unit_weight_kn_m3=19.0, friction_deg=32.0, water_depth_m=20.0),
    )
    r = screen(make_corridor([seg], factor_set=factor_set))
    assert r.verdict == ["clear"], r.reasons[0]
    assert r.length_ratio[0] <= 0.9


@pytest.mark.parametrize("factor_set", [LRFD, ASD], ids=["lrfd", "asd"])
def test_ordinary_walls_are_never_referred(factor_set) -> None:
    """H 3-9 m, granular fill phi 32-38, competent foundation phi 26-34, c' = 0, no water,
    geogrid: none referred, most clear, L within 0.9H (common practice, no source). Marginal
    ones are flagged for the foundation (bearing or global close to its limit) only."""
    r = screen(make_corridor(_ordinary(GEOGRID), factor_set=factor_set))
    counts = r.counts()
    assert counts["refer"] == 0
    assert counts["clear"] > counts["marginal"]
    assert np.all(r.length_ratio <= 0.9 + 1e-9)
    for i, v in enumerate(r.verdict):
        if v == "marginal":
            assert r.margin_check[i] in ("bearing", "global"), r.reasons[i]

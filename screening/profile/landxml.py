"""Read wall profiles from the profile elements of a LandXML file (the open exchange format).

What is read (LandXML 1.x; any namespace or none): every ``Alignment`` that holds a
``Profile`` gives one wall named after the alignment. Its exposed height is the level of
the *top* profile minus the level of the *toe* profile at the same station:

- by default the top is the alignment's first ``ProfAlign`` (the design vertical
  alignment, for a wall holding up the road) and the toe its first ``ProfSurf`` (the
  ground profile); name others with ``top_profile`` / ``toe_profile`` (the ``name``
  attribute of a ``ProfAlign`` or ``ProfSurf``), e.g. the other way round for a wall
  in cut;
- ``ProfAlign`` is tangents between ``PVI`` points with vertical curves at the PVIs:
  ``ParaCurve`` (symmetric parabola of length ``length``), ``UnsymParaCurve``
  (``lengthIn``/``lengthOut``), and ``CircCurve``, taken as the parabola of the same
  length (a road vertical curve's radius is so large the two differ by millimetres);
- ``ProfSurf`` is a ``PntList2D`` of "station level" pairs, straight between points;
- where the top is below the toe there is no wall (height 0, a gap);
- ``Units`` in feet (``foot``, ``USSurveyFoot``) are converted to metres.

Station equations (``StaEquation``) are refused: chainage must run without jumps.
Problems raise :class:`~screening.model.errors.InputError` with the line of the element.
"""

from __future__ import annotations

import math
import xml.etree.ElementTree as ET
from pathlib import Path
from xml.parsers import expat

import numpy as np

from screening.model.errors import InputError
from screening.profile.split import ProfileLine, read_profile_text

LINEAR_UNITS_M = {
    "meter": 1.0,
    "metre": 1.0,
    "millimeter": 0.001,
    "centimeter": 0.01,
    "kilometer": 1000.0,
    "foot": 0.3048,
    "intnlfoot": 0.3048,
    "ussurveyfoot": 1200.0 / 3937.0,
}
"""Metres per unit; the US survey foot is exactly 1200/3937 m (NIST)."""

CURVE_SAMPLE_M = 1.0
"""Largest spacing of the points taken along a vertical curve, m (chord error < 1 mm
for any road curve with a grade change below 0.2 over 25 m or more)."""


def _local(tag: str) -> str:
    return tag.rsplit("}", 1)[-1]


def _parse(text: str, source: str) -> tuple[ET.Element, dict[int, int]]:
    """Parse with expat so each element keeps the line it starts on."""
    parser = expat.ParserCreate(namespace_separator="}")
    parser.buffer_text = True
    builder = ET.TreeBuilder()
    lines: dict[int, int] = {}

    def start(tag: str, attrs: dict[str, str]) -> None:
        elem = builder.start(("{" + tag) if "}" in tag else tag, attrs)
        lines[id(elem)] = parser.CurrentLineNumber

    parser.StartElementHandler = start
    parser.EndElementHandler = lambda tag: builder.end(("{" + tag) if "}" in tag else tag)
    parser.CharacterDataHandler = builder.data
    try:
        parser.Parse(text, True)
    except expat.ExpatError as err:
        raise InputError(
            f"not well-formed XML: {expat.ErrorString(err.code)}",
            file=source,
            line=err.lineno,
            column=err.offset + 1,
        ) from None
    return builder.close(), lines


class _Reader:
    def __init__(self, source: str, lines: dict[int, int], unit_m: float) -> None:
        self.source = source
        self.lines = lines
        self.unit_m = unit_m

    def error(self, elem: ET.Element, message: str) -> InputError:
        return InputError(message, file=self.source, line=self.lines.get(id(elem)))

    def numbers(self, elem: ET.Element, count: int | None = None) -> list[float]:
        words = (elem.text or "").split()
        try:
            values = [float(w) for w in words]
        except ValueError:
            bad = next(w for w in words if not _is_float(w))
            raise self.error(elem, f"<{_local(elem.tag)}>: {bad!r} is not a number") from None
        if not all(math.isfinite(v) for v in values):
            raise self.error(elem, f"<{_local(elem.tag)}>: numbers must be finite")
        if count is not None and len(values) != count:
            raise self.error(
                elem,
                f"<{_local(elem.tag)}> needs {count} numbers (station level), got {len(values)}",
            )
        return [v * self.unit_m for v in values]

    def attr(self, elem: ET.Element, name: str) -> float:
        raw = elem.get(name)
        if raw is None:
            raise self.error(elem, f"<{_local(elem.tag)}> needs a {name!r} attribute")
        if not _is_float(raw) or float(raw) < 0.0:
            raise self.error(elem, f"<{_local(elem.tag)}> {name}={raw!r}: give a length >= 0")
        return float(raw) * self.unit_m

    def surface(self, elem: ET.Element) -> tuple[np.ndarray, np.ndarray]:
        """Stations and levels of a ProfSurf (straight between points)."""
        pts = [p for p in elem if _local(p.tag) == "PntList2D"]
        if not pts:
            raise self.error(elem, "<ProfSurf> has no <PntList2D>")
        values: list[float] = []
        for p in pts:
            v = self.numbers(p)
            if len(v) % 2:
                raise self.error(
                    p, "<PntList2D> needs pairs of numbers: station level station level …"
                )
            values.extend(v)
        sta, lev = np.array(values[0::2]), np.array(values[1::2])
        if len(sta) < 2:
            raise self.error(elem, "<ProfSurf> needs at least two points")
        if np.any(np.diff(sta) < 0.0):
            raise self.error(pts[0], "<PntList2D> stations must not decrease")
        return sta, lev

    def design(self, elem: ET.Element) -> tuple[np.ndarray, np.ndarray]:
        """Stations and levels of a ProfAlign: tangents and vertical curves, sampled."""
        pvi: list[tuple[float, float, float, float]] = []  # station, level, length in, out
        for child in elem:
            kind = _local(child.tag)
            if kind not in ("PVI", "ParaCurve", "UnsymParaCurve", "CircCurve"):
                continue
            sta, lev = self.numbers(child, 2)
            if kind == "PVI":
                lin = lout = 0.0
            elif kind == "UnsymParaCurve":
                lin, lout = self.attr(child, "lengthIn"), self.attr(child, "lengthOut")
            else:
                lin = lout = self.attr(child, "length") / 2.0
            if pvi and sta <= pvi[-1][0]:
                raise self.error(child, f"<{kind}> station {sta:g} is not after the one before")
            pvi.append((sta, lev, lin, lout))
        if len(pvi) < 2:
            raise self.error(elem, "<ProfAlign> needs at least two PVIs")
        for k in (0, len(pvi) - 1):
            if pvi[k][2] or pvi[k][3]:
                raise self.error(elem, "<ProfAlign> cannot start or end with a vertical curve")
        sta = np.array([p[0] for p in pvi])
        lev = np.array([p[1] for p in pvi])
        grades = np.diff(lev) / np.diff(sta)
        samples = [sta]
        curves = []
        for k in range(1, len(pvi) - 1):
            s, _, lin, lout = pvi[k]
            if lin + lout <= 0.0:
                continue
            if s - lin < sta[k - 1] - 1e-6 or s + lout > sta[k + 1] + 1e-6:
                raise self.error(elem, f"vertical curve at station {s:g} overlaps the next PVI")
            n = max(2, math.ceil((lin + lout) / CURVE_SAMPLE_M) + 1)
            samples.append(np.linspace(s - lin, s + lout, n))
            # the high (or low) point of each half of the curve, where the slope is zero
            mid = (grades[k] - grades[k - 1]) * lin * lout / (2.0 * (lin + lout))
            if mid != 0.0:
                for x_turn in (
                    s - lin - grades[k - 1] * lin**2 / (2.0 * mid),
                    s + lout - grades[k] * lout**2 / (2.0 * mid),
                ):
                    if s - lin < x_turn < s + lout:
                        samples.append(np.array([x_turn]))
            # offset from the tangents at the PVI (unsymmetric parabola; symmetric when lin == lout)
            mid = (grades[k] - grades[k - 1]) * lin * lout / (2.0 * (lin + lout))
            curves.append((s, lin, lout, mid))
        x = np.unique(np.concatenate(samples))
        y = np.interp(x, sta, lev)
        for s, lin, lout, mid in curves:
            before = (x >= s - lin) & (x <= s)
            after = (x > s) & (x <= s + lout)
            y[before] += mid * ((x[before] - (s - lin)) / lin) ** 2
            y[after] += mid * (((s + lout) - x[after]) / lout) ** 2
        return x, y


def _is_float(word: str) -> bool:
    try:
        float(word)
    except ValueError:
        return False
    return True


def _unit(root: ET.Element, reader_source: str, lines: dict[int, int]) -> float:
    for units in root.iter():
        if _local(units.tag) != "Units":
            continue
        for system in units:
            raw = system.get("linearUnit")
            if raw is None:
                continue
            if raw.lower() not in LINEAR_UNITS_M:
                raise InputError(
                    f"linearUnit {raw!r} is not known; use one of {', '.join(LINEAR_UNITS_M)}",
                    file=reader_source,
                    line=lines.get(id(system)),
                )
            return LINEAR_UNITS_M[raw.lower()]
    return 1.0


def _pick(
    reader: _Reader, align: ET.Element, name: str | None, kind: str, role: str
) -> ET.Element | None:
    candidates = [
        e
        for prof in align
        if _local(prof.tag) == "Profile"
        for e in prof
        if _local(e.tag) in ("ProfAlign", "ProfSurf")
    ]
    if name is not None:
        found = [e for e in candidates if e.get("name") == name]
        if not found:
            names = ", ".join(repr(e.get("name")) for e in candidates) or "none"
            raise reader.error(
                align,
                f"alignment {align.get('name')!r} has no profile named {name!r} for the {role} "
                f"(it has {names})",
            )
        return found[0]
    return next((e for e in candidates if _local(e.tag) == kind), None)


def read_profile_xml(
    path: str | Path,
    *,
    text: str | None = None,
    top_profile: str | None = None,
    toe_profile: str | None = None,
    skipped: list[str] | None = None,
) -> list[ProfileLine]:
    """One :class:`ProfileLine` per alignment with a usable top and toe profile.

    An alignment with no top or no toe profile (a centreline with only its design
    profile, say) is passed over and said so in ``skipped``; none usable at all is an
    InputError.
    """
    source = str(path)
    if text is None:
        text = read_profile_text(path)
    root, lines = _parse(text, source)
    if _local(root.tag) != "LandXML":
        raise InputError(
            f"the root element is <{_local(root.tag)}>, not <LandXML>", file=source, line=1
        )
    reader = _Reader(source, lines, _unit(root, source, lines))
    out: list[ProfileLine] = []
    passed: list[InputError] = []
    for align in (e for e in root.iter() if _local(e.tag) == "Alignment"):
        if not any(_local(e.tag) == "Profile" for e in align):
            continue
        if any(_local(e.tag) == "StaEquation" for e in align.iter()):
            raise reader.error(
                align,
                f"alignment {align.get('name')!r} has station equations; export the profile "
                "with continuous chainage",
            )
        top = _pick(reader, align, top_profile, "ProfAlign", "top of the wall")
        toe = _pick(reader, align, toe_profile, "ProfSurf", "toe")
        if top is None or toe is None:
            missing = "<ProfAlign> for the top" if top is None else "<ProfSurf> for the toe"
            passed.append(
                reader.error(
                    align,
                    f"alignment {align.get('name')!r} has no {missing}; name the profiles to use",
                )
            )
            continue
        tx, ty = reader.design(top) if _local(top.tag) == "ProfAlign" else reader.surface(top)
        gx, gy = reader.design(toe) if _local(toe.tag) == "ProfAlign" else reader.surface(toe)
        lo, hi = max(tx[0], gx[0]), min(tx[-1], gx[-1])
        if hi - lo <= 0.0:
            raise reader.error(
                align,
                f"alignment {align.get('name')!r}: the top and toe profiles share no stations",
            )
        out.append(
            _height_line(align.get("name") or f"alignment {len(out) + 1}", tx, ty, gx, gy, lo, hi)
        )
    if not out:
        if passed:
            raise passed[0]
        raise InputError("no <Alignment> with a <Profile> in this LandXML file", file=source)
    if skipped is not None:
        skipped.extend(f"skipped {err.message}" for err in passed)
    return out


def _sides(x: np.ndarray, xp: np.ndarray, yp: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Level just before and just after each station ``x`` of a piecewise-linear profile
    whose repeated stations are steps (the first value holds before, the last after)."""
    last = len(xp) - 1

    def at(k: np.ndarray, exact: np.ndarray) -> np.ndarray:
        a = np.clip(k - 1, 0, last)
        b = np.clip(k, 0, last)
        span = np.where(xp[b] > xp[a], xp[b] - xp[a], 1.0)
        between = yp[a] + (yp[b] - yp[a]) * np.clip((x - xp[a]) / span, 0.0, 1.0)
        return np.where(exact, yp[np.clip(k, 0, last)], between)

    left = np.searchsorted(xp, x, side="left")
    before = at(left, (left <= last) & (xp[np.clip(left, 0, last)] == x))
    right = np.searchsorted(xp, x, side="right") - 1
    after_exact = (right >= 0) & (xp[np.clip(right, 0, last)] == x)
    after = np.where(after_exact, yp[np.clip(right, 0, last)], before)
    return before, after


def _height_line(
    name: str, tx: np.ndarray, ty: np.ndarray, gx: np.ndarray, gy: np.ndarray, lo: float, hi: float
) -> ProfileLine:
    """Top minus toe on the union of both profiles' stations; a step in either profile
    gives two points at one station (the height before and after it)."""
    xs = np.unique(np.concatenate([tx, gx, [lo, hi]]))
    xs = xs[(xs >= lo) & (xs <= hi)]
    t0, t1 = _sides(xs, tx, ty)
    g0, g1 = _sides(xs, gx, gy)
    before = np.maximum(t0 - g0, 0.0)
    after = np.maximum(t1 - g1, 0.0)
    step = after != before
    sta = np.repeat(xs, np.where(step, 2, 1))
    hts = np.empty(sta.shape)
    first = np.concatenate([[0], np.cumsum(np.where(step, 2, 1))[:-1]])
    hts[first] = before
    hts[first[step] + 1] = after[step]
    return ProfileLine(name, "", tuple(sta.tolist()), tuple(hts.tolist()))

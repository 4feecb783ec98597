"""A wall's exposed-height profile along the chainage, and its split into segments.

Both readers (CSV in :mod:`screening.profile.csv_file`, LandXML in :mod:`screening.profile.landxml`)
produce :class:`ProfileLine` objects; :func:`split_profile` turns one line into
``(chainage_start_m, chainage_end_m, height_start_m, height_end_m)`` pieces. The profile
is piecewise linear between its points; two points at the same chainage are a step in
the wall top (the height jumps there).

Rules for a new segment (all settable, sensible defaults in :func:`split_profile`):

- the exposed height over the segment would vary by more than ``max_step_m``;
- the segment would be longer than ``max_length_m`` (a long run is cut into equal parts,
  so no stub is left at its end);
- a break chainage (a culvert, a change of foundation, a construction joint) is reached;
- a step in the wall top;
- an interior high point of the profile stands more than ``peak_tolerance_m`` above both
  ends: the engine screens a segment at its larger end height, so no segment may hide a
  higher point inside it.

Stretches with no exposed height (both ends and every point inside at or below
``min_height_m``) are gaps in the wall and give no segment.
"""

from __future__ import annotations

import math
import re
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from screening.model.errors import InputError

Piece = tuple[float, float, float, float]
"""(chainage_start_m, chainage_end_m, height_start_m, height_end_m)."""

_EPS_M = 1e-6
"""Chainage and height tolerance: one micrometre (far below survey precision)."""


@dataclass(frozen=True)
class ProfileLine:
    """The exposed height of one wall (one side) along the chainage."""

    wall: str
    """Wall name as given in the profile (may be empty: the caller names it)."""
    side: str
    """"left", "right" or "" when the profile gives none."""
    chainage_m: tuple[float, ...]
    """Chainages, non-decreasing; a repeated chainage is a step in the wall top."""
    height_m: tuple[float, ...]
    """Exposed height at each chainage, m (>= 0)."""
    breaks_m: tuple[float, ...] = ()
    """Chainages marked in the profile itself where a segment must end."""


# ------------------------------------------------------------------ reading


def read_profile_text(path: str | Path) -> str:
    """The profile file's text (UTF-8, a leading byte-order mark dropped), or an
    InputError saying why it cannot be read."""
    source = str(path)
    try:
        raw = Path(path).read_bytes()
    except FileNotFoundError:
        raise InputError("profile file not found", file=source) from None
    except IsADirectoryError:
        raise InputError("is a folder, not a profile file", file=source) from None
    except OSError as err:
        raise InputError(f"cannot read the profile ({err.strerror})", file=source) from None
    if raw.startswith((b"\xff\xfe", b"\xfe\xff")):
        raise InputError(
            "is UTF-16 text, not UTF-8: save it as UTF-8 (in a spreadsheet: CSV UTF-8)",
            file=source,
        )
    try:
        return raw.decode("utf-8-sig")
    except UnicodeDecodeError as err:
        raise InputError(f"not a UTF-8 text file (byte {err.start})", file=source) from None


# ------------------------------------------------------------------ number parsing

_STATION = re.compile(r"^\s*(-?\d+)\+(\d{3}(?:\.\d*)?)\s*$")
_STATION_FT = re.compile(r"^\s*(-?\d+)\+(\d{2}(?:\.\d*)?)\s*$")
LENGTH_UNITS_M = {"m": 1.0, "ft": 0.3048}
"""Metres per unit of a profile's lengths (international foot, NIST SP 811)."""


def parse_number(text: str, *, decimal_comma: bool = False) -> float:
    """A finite float from ``text``; ValueError with a reason otherwise."""
    raw = text.strip()
    if decimal_comma:
        raw = raw.replace(",", ".")
    value = float(raw)  # ValueError on junk
    if not math.isfinite(value):
        raise ValueError("not a finite number")
    return value


def parse_chainage(text: str, *, decimal_comma: bool = False, unit: str = "m") -> float:
    """Chainage in the profile's unit: a number, or the station form with a ``+``.

    In metres the station form is kilometres+metres with exactly three digits of metres
    (``1+250.500``); in feet it is hundreds of feet (``12+50.00`` = 1250 ft). Anything
    else with a ``+`` is refused rather than guessed.
    """
    raw = text.strip()
    if decimal_comma:
        raw = raw.replace(",", ".")
    if "+" in raw[1:]:
        pattern, step, example = (
            (_STATION_FT, 100.0, "hundreds of feet, e.g. 12+50.00")
            if unit == "ft"
            else (_STATION, 1000.0, "kilometres+metres, e.g. 1+250.000")
        )
        match = pattern.match(raw)
        if not match:
            raise ValueError(f"chainage with '+' must be {example}")
        whole, rest = int(match.group(1)), float(match.group(2))
        return whole * step - rest if raw.startswith("-") else whole * step + rest
    return parse_number(raw)


def wall_code(name: str, taken: Iterable[str] = ()) -> str:
    """A short upper-case code for segment ids: "W2" -> "W2", "East approach" -> "EA".

    A code already in ``taken`` gets a number appended ("EA2").
    """
    words = re.findall(r"[A-Za-z0-9]+", name)
    if not words:
        base = "W"
    elif len(words) == 1 and len(words[0]) <= 4:
        base = words[0].upper()
    else:
        base = "".join(w[0] for w in words).upper()[:4]
    taken = set(taken)
    code, n = base, 2
    while code in taken:
        code, n = f"{base}{n}", n + 1
    return code


# ------------------------------------------------------------------ splitting


def _height_at(ch: np.ndarray, h: np.ndarray, x: float) -> float:
    """Height at chainage x on a profile without steps inside the queried piece."""
    return float(np.interp(x, ch, h))


def _split_by_step(
    ch: Sequence[float], h: Sequence[float], max_step_m: float, breaks: Sequence[float]
) -> list[Piece]:
    """Walk the profile; cut where the height range would exceed the step, at breaks and jumps."""
    pieces: list[Piece] = []
    seg_c, seg_h = ch[0], h[0]
    lo = hi = seg_h
    next_break = iter(
        [*sorted(b for b in breaks if ch[0] + _EPS_M < b < ch[-1] - _EPS_M), math.inf]
    )
    brk = next(next_break)

    def close(c_end: float, h_end: float) -> None:
        nonlocal seg_c, seg_h, lo, hi
        if c_end - seg_c > _EPS_M:
            pieces.append((seg_c, c_end, seg_h, h_end))
        seg_c, seg_h, lo, hi = c_end, h_end, h_end, h_end

    for k in range(len(ch) - 1):
        ca, ha, cb, hb = ch[k], h[k], ch[k + 1], h[k + 1]
        if cb - ca <= _EPS_M:  # step in the wall top
            close(ca, ha)
            seg_h, lo, hi = hb, hb, hb
            continue
        slope = (hb - ha) / (cb - ca)
        x = ca
        while True:
            while brk <= x + _EPS_M:  # a break already served (at a step or a cut)
                brk = next(next_break)
            cut = brk
            if slope > 0.0 and lo + max_step_m <= hb + _EPS_M:
                cut = min(cut, ca + (lo + max_step_m - ha) / slope)
            elif slope < 0.0 and hi - max_step_m >= hb - _EPS_M:
                cut = min(cut, ca + (hi - max_step_m - ha) / slope)
            if cut >= cb - _EPS_M:  # nothing cuts inside this stretch
                lo, hi = min(lo, hb), max(hi, hb)
                if cut <= cb + _EPS_M:  # a break or the step lands on the vertex
                    close(cb, hb)
                    if brk <= cb + _EPS_M:
                        brk = next(next_break)
                break
            hx = ha + slope * (max(cut, x) - ca)
            if cut <= x + _EPS_M and lo == hi == hx:
                # steeper than the tolerance can resolve: take the stretch whole
                lo, hi = min(lo, hb), max(hi, hb)
                break
            close(max(cut, x), hx)
            if brk <= max(cut, x) + _EPS_M:
                brk = next(next_break)
            x = max(cut, x)
    close(ch[-1], h[-1])
    return pieces


def _split_long(piece: Piece, ch: np.ndarray, h: np.ndarray, max_length_m: float) -> list[Piece]:
    c0, c1, h0, h1 = piece
    n = math.ceil((c1 - c0) / max_length_m - 1e-9)
    if n <= 1:
        return [piece]
    cuts = [c0 + (c1 - c0) * i / n for i in range(1, n)]
    hs = [_height_at(ch, h, c) for c in cuts]
    starts = [c0, *cuts]
    ends = [*cuts, c1]
    hstart = [h0, *hs]
    hend = [*hs, h1]
    return list(zip(starts, ends, hstart, hend, strict=True))


def _split_peak(piece: Piece, ch: np.ndarray, h: np.ndarray, tol_m: float) -> list[Piece]:
    c0, c1, h0, h1 = piece
    inside = (ch > c0 + _EPS_M) & (ch < c1 - _EPS_M)
    if not inside.any():
        return [piece]
    k = int(np.argmax(np.where(inside, h, -np.inf)))
    if h[k] <= max(h0, h1) + tol_m:
        return [piece]
    left = _split_peak((c0, float(ch[k]), h0, float(h[k])), ch, h, tol_m)
    right = _split_peak((float(ch[k]), c1, float(h[k]), h1), ch, h, tol_m)
    return left + right


def _wall_ends(ch: np.ndarray, h: np.ndarray, min_height_m: float) -> list[float]:
    """Chainages where the wall starts or stops (the height leaves or reaches the minimum)."""
    above = h > min_height_m + _EPS_M
    ends: list[float] = []
    for k in range(len(ch) - 1):
        if above[k] == above[k + 1]:
            continue
        ha, hb = h[k] - min_height_m, h[k + 1] - min_height_m
        if abs(ha) <= _EPS_M or abs(hb) <= _EPS_M or ch[k + 1] - ch[k] <= _EPS_M:
            ends.append(float(ch[k] if abs(ha) <= _EPS_M else ch[k + 1]))
        else:  # crosses the minimum between the two points
            ends.append(float(ch[k] + (ch[k + 1] - ch[k]) * ha / (ha - hb)))
    return ends


def _interior_max(piece: Piece, ch: np.ndarray, h: np.ndarray) -> float:
    c0, c1, h0, h1 = piece
    inside = (ch > c0 + _EPS_M) & (ch < c1 - _EPS_M)
    return max(h0, h1, float(h[inside].max()) if inside.any() else -math.inf)


def split_profile(
    chainage_m: Sequence[float],
    height_m: Sequence[float],
    *,
    max_step_m: float = 0.5,
    max_length_m: float = 30.0,
    breaks_m: Iterable[float] = (),
    peak_tolerance_m: float = 0.05,
    min_height_m: float = 0.0,
) -> list[Piece]:
    """Segments of one wall: see the module docstring for the rules.

    Chainages are rounded to the millimetre and heights to the millimetre, once, so two
    neighbouring segments share exactly the same end values.
    """
    if max_step_m <= 0.0:
        raise ValueError("max_step_m must be > 0")
    if max_length_m <= 0.0:
        raise ValueError("max_length_m must be > 0")
    if len(chainage_m) < 2:
        raise ValueError("a profile needs at least two points")
    ch = np.asarray(chainage_m, dtype=float)
    h = np.asarray(height_m, dtype=float)
    breaks = [float(b) for b in breaks_m] + _wall_ends(ch, h, min_height_m)
    pieces = _split_by_step(list(ch), list(h), max_step_m, breaks)
    # Split each piece on its own profile stretch: inside a piece there is no step.
    out: list[Piece] = []
    for piece in pieces:
        inner = (ch > piece[0] + _EPS_M) & (ch < piece[1] - _EPS_M)
        pch = np.concatenate(([piece[0]], ch[inner], [piece[1]]))
        ph = np.concatenate(([piece[2]], h[inner], [piece[3]]))
        for long_piece in _split_long(piece, pch, ph, max_length_m):
            for final in _split_peak(long_piece, pch, ph, peak_tolerance_m):
                if _interior_max(final, pch, ph) > min_height_m + _EPS_M:
                    out.append(final)
    rounded: list[Piece] = []
    for c0, c1, h0, h1 in out:
        piece = (round(float(c0), 3), round(float(c1), 3), round(float(h0), 3), round(float(h1), 3))
        if piece[1] > piece[0]:
            rounded.append(piece)
        elif rounded and rounded[-1][1] == piece[0]:  # a sliver under 1 mm joins the one before
            rounded[-1] = (rounded[-1][0], piece[1], rounded[-1][2], piece[3])
    return rounded

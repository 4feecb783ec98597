"""Which family a trial circle belongs to (METHOD section 6), as practice draws them.

- *global*: the arc passes under the whole reinforced zone (below its base from the face to
  x = L) and enters the ground behind it;
- *compound*: it cuts through the reinforced zone and through unreinforced soil besides the
  embedment in front: it enters the ground behind the reinforced zone, or dips below its
  base somewhere between the face and L; it leaves the ground at or in front of the toe
  (the search never tries an exit on the face);
- *internal*: it stays in the reinforced zone (and the embedment in front of the face): the
  tie-back checks' job (pullout and rupture), not searched [mem, FHWA GEC 11 ch. 4: compound
  surfaces pass behind or under the reinforced mass and through it].
"""

from __future__ import annotations

import numpy as np

from screening.engine.result import FloatArray
from screening.engine.slip.geometry import Circles, SlipSection

FAMILIES = ("compound", "global")
COMPOUND, GLOBAL = 0, 1
INVALID = -1
"""A circle that is not valid (see :mod:`screening.engine.slip.geometry`)."""
INTERNAL = -2
"""A circle that stays in the reinforced zone: internal stability, not a compound surface."""


def classify(section: SlipSection, circles: Circles) -> np.ndarray:
    """(n, c) family index: GLOBAL, COMPOUND, INTERNAL or INVALID (module docstring)."""
    length = section.length_m[:, None]
    xc, yc, r2 = circles.centre_x_m, circles.centre_y_m, circles.radius_m**2

    def below_base(x: FloatArray) -> np.ndarray:
        # The lower arc exists at x and lies at or below the base (a missing arc does not).
        inside = r2 - (x - xc) ** 2
        return (inside >= 0) & (yc - np.sqrt(np.maximum(inside, 0)) <= 1e-9)

    under = below_base(np.zeros_like(length)) & below_base(length) & (circles.x_entry_m >= length)
    # Through unreinforced soil behind (entering the ground behind the reinforced zone) or
    # below it (the arc dips under the base somewhere between the face and L).
    behind = circles.x_entry_m >= length - 1e-9
    low_x = np.minimum(np.maximum(xc, 0.0), np.minimum(length, circles.x_entry_m))
    dips = yc - np.sqrt(np.maximum(r2 - (low_x - xc) ** 2, 0.0)) < -1e-6
    family = np.where(under, GLOBAL, np.where(behind | dips, COMPOUND, INTERNAL))
    return np.where(circles.valid, family, INVALID)

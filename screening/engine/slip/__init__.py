"""Compound and global stability by Bishop's simplified method: circles and slices
(``geometry``), the factor of safety (``bishop``), the circle search (``search``), the wall
as a slip problem (``wall``), the check over a corridor (``check``) and the plug-in that
adds it to the screen (``compound``)."""

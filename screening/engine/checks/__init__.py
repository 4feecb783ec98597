"""The quick checks of one wall at a trial length L: earth pressure (``pressure``), external
stability (``external``: sliding, eccentricity, bearing), internal stability (``internal``:
tensions, pullout, rupture, grade choice; ``corrosion`` of steel) and the seismic case
(``seismic``, a plug-in check)."""

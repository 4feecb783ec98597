"""Road profiles to corridors: read a profile (``csv_file``, ``landxml``), split each wall
into segments (``split``) and build the corridor from them (``build``)."""

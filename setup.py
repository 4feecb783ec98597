"""The wheel's packages: every package under screening/ is found on its own (a new folder
with an ``__init__.py`` needs no entry anywhere), and the top-level ``presets/`` folder
ships as ``screening.presets`` (``package-dir`` in pyproject.toml).

pyproject.toml alone cannot say both: ``[tool.setuptools.packages.find]`` names packages
by their place on disk, so it never finds ``presets/`` as ``screening.presets``, and a
``packages`` list must be edited for every new folder.
"""

from setuptools import find_packages, setup

setup(packages=[*find_packages(include=["screening", "screening.*"]), "screening.presets"])

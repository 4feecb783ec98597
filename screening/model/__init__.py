"""The inputs and everything that reads them: what a corridor is, how files are checked.

``inputs`` the frozen dataclasses (re-exported here: ``from screening.model import
Corridor``); ``errors`` the one error type users see; ``schema``, ``validate`` and
``location`` turn TOML tables into inputs with located messages; ``presets`` the shipped
preset files; ``units`` display in US customary units.
"""

from screening.model.inputs import (
    CHECKS,
    SCHEMA,
    TRAFFIC_CLASSES,
    VERDICTS,
    Arrangement,
    Corridor,
    Defaults,
    FactorSet,
    Fill,
    Foundation,
    Grade,
    Kind,
    LoadCase,
    Material,
    Reinforcement,
    Rules,
    Segment,
    Soil,
    Structure,
    Traffic,
)

__all__ = [
    "CHECKS",
    "SCHEMA",
    "TRAFFIC_CLASSES",
    "VERDICTS",
    "Arrangement",
    "Corridor",
    "Defaults",
    "FactorSet",
    "Fill",
    "Foundation",
    "Grade",
    "Kind",
    "LoadCase",
    "Material",
    "Reinforcement",
    "Rules",
    "Segment",
    "Soil",
    "Structure",
    "Traffic",
]

"""wallscreen: screening of reinforced-soil (MSE) walls along a road corridor."""

__version__ = "0.1.0"

CAUTION = (
    "Screening only, not a design. Every result must be checked by a licensed engineer "
    "against the governing local code before it is used."
)
"""The one-line caution the JSON, the command-line table and every report carry."""

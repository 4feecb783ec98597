"""wallscreen: screening of reinforced-soil (MSE) walls along a road corridor."""

__version__ = "0.1.0"

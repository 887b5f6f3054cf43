"""sheetgen: laser-cut single-axis sun-tracker kits from one parameter file."""

__version__ = "0.1.0"

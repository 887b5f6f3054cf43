"""The version of sheetgen, on the ground floor so that any module may name it
(the STEP header, the command line) without importing the package's API."""

__version__ = "0.1.0"

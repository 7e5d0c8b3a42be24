"""Unit operations, the Linde-Hampson flowsheet and its recycle solve.

Importing this package is cheap; the property layer (CoolProp) is loaded when a cycle is
built or solved.
"""

__version__ = "0.1.0"

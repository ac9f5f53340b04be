"""Tidewell: sourced arithmetic for blood gases, hypercapnia, ventilation and flight oxygen.

Importing this package is cheap and imports no numpy. The only entry point the web shell uses is
:func:`tidewell.bridge.handle`.
"""

__version__ = "0.1.0"
__all__ = ["__version__"]

"""The front ends: the command line (``cli``), the batch audit (``batch``), the course file
(``coursefile``) and the episodes of an audit file (``episodes``), with their cell reader (``cells``) and
their text output (``text``).

Everything goes through the bridge or the calculations' own functions; only ``__main__`` and the front ends
import the front ends.
"""

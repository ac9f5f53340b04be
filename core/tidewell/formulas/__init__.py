"""Published formulas: one function per published model, keyword-only arguments with their units.

Each module is one domain (acidbase, oxygenation, ventilation, temperature, altitude, transport). A function
takes and returns plain floats (the few array helpers say so), names its unit in every argument
(``paco2_mmhg``, ``fio2_fraction``), states its unit in brackets in its docstring, cites its ``references.py``
key and checks its inputs with ``errors.require_number``. Formulas import only the standard library, each
other and the leaf modules ``errors``, ``units`` and ``arrays``; never numpy at module level, never the
bridge, the report or a calculation (tests/core/test_layout.py checks it).
"""

"""The contract's calculations: one module per calculation of docs/bridge.md, named as the calculation.

Each calculation is a function ``name(inputs: Inputs, report: Report) -> None`` that the bridge finds through
``bridge.CALCULATIONS``: it reads its inputs (``fields.Inputs``), calls the formulas and fills the report
(``report.Report``). Shared readers sit in the private modules ``_readings`` (oxygenation, ventilation,
temperature) and ``_flight`` (altitude, altitude profile, oxygen supply); ``blood_gas`` is a package, one
module per clinical step. Calculations never import the bridge or the front ends.
"""

"""The cautions every result carries (command line, report, README), in one place.

Its own small module so that `cli.py` and `report.py` both read it without importing each
other.
"""

CAUTIONS = (
    "Predictions are screening estimates for idealised particles and droplets. Confirm them "
    "by measurement before scale-up, pump or pressure-equipment selection, and follow local "
    "codes, licensed engineering practice and the materials' safety data sheets (fine "
    "powders, solvents)."
)

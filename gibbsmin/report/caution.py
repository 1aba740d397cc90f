"""The safety caution every report carries."""

CAUTION = (
    "Caution: these figures are thermodynamic limits, not designs. Hydrogen, carbon monoxide, ammonia and "
    "methanol are hazardous (flammable, toxic, or both), and so is gas at high pressure. Pressure equipment and "
    "fired heaters are governed by local codes and licensed engineering practice; have every design decision "
    "made and checked under them."
)

"""The general safety cautions of an evaluated surface, defined once for the library, the command line and the
dashboard (the cautions of a particular calculation -- sizing, tracing, freezing, steam, transients, bare
fittings -- live beside it). Temperatures are written in degC here; the dashboard and reports convert them to the
reader's units (:meth:`dashboard.display.Display.localize`)."""
from __future__ import annotations

__all__ = ["CAUTION_HOT_SURFACE", "CAUTION_COLD_SURFACE", "CAUTION_BELOW_DEW_POINT", "CAUTION_FREEZE_RISK"]

#: A surface hotter than about 60 degC (common practice, no source; ISO 13732-1 and ASTM C1055 give the limits).
CAUTION_HOT_SURFACE = ("Hot surface: above about 60 degC a touch can burn (ISO 13732-1 and ASTM C1055 set limits by "
                       "material and contact time); local codes and licensed practice govern guarding and insulation.")
#: A surface colder than the air when the air's humidity is not known.
CAUTION_COLD_SURFACE = ("Cold surface: a surface colder than the air gathers condensation where it is below the air's "
                        "dew point (and ice below 0 degC); check it against the site's design humidity and local "
                        "practice.")
#: A surface below the dew point of the air.
CAUTION_BELOW_DEW_POINT = ("Cold surface below the dew point of the air: condensation (ice below 0 degC) will form; a "
                           "cold line needs insulation with a continuous vapour retarder. Local codes and licensed "
                           "practice govern.")
#: Fluid at or below 0 degC, or air below freezing.
CAUTION_FREEZE_RISK = ("Fluid at or below 0 degC or air below freezing: water lines can freeze when flow stops; this "
                       "estimate is no substitute for draining or heat tracing.")

"""The commented starter project that ``workbench new`` writes."""

from __future__ import annotations

__all__ = ["STARTER", "US_VALUES", "starter_text"]

STARTER = '''\
# A gravity-flow system for the workbench (project file, schema 1).
#
# Quantities are text with units: "150 mm", "6 in", "20 degC", "3.5 m3/h", "120 gpm".
# Plain numbers only where the quantity has no unit (friction factors, K values,
# valve openings). Pressures are gauge unless the unit says absolute ("bara", "psia",
# "kPa abs"). Ids are the table keys ([reservoirs.TK1]) and are unique across all kinds.
# Check the file with:  workbench check THIS_FILE
#
# Results are screening estimates for trained people. Surge, sub-atmospheric pressure
# (pipe and tank collapse), siphon break, overflow and confined spaces need the care of
# local codes, company standards and licensed engineering practice.
schema = 1

[project]
title = "New gravity system"
description = "Describe the system and what the study is for."
units = "SI"  # display units: "SI" or "US" (files keep what you typed)
site_elevation = "0 m"  # sets the atmospheric pressure for vapour checks

[fluid]
kind = "water"  # "water", a catalogue liquid (e.g. "ethylene_glycol"), or "custom"
temperature = "20 degC"
# Solutions: kind = "ethylene_glycol_water" or "propylene_glycol_water" with
# mass_fraction = 0.3 (30 % glycol by mass), or kind = "seawater" with salinity = "35 g/kg".
# kind = "custom" takes: name, density, viscosity, vapor_pressure (absolute), bulk_modulus

# A tank whose level falls as it drains. For a constant level use kind = "constant_level"
# and leave out the tank keys (shape, diameter, height, min_level ...).
[reservoirs.TK1]
kind = "tank"
shape = "vertical_cylinder"  # or horizontal_cylinder, rectangular, cone_bottom
diameter = "3 m"
height = "5 m"  # level at which the tank overflows
bottom_elevation = "10 m"  # outlet lines leave at this elevation
level = "4 m"  # initial liquid depth above the bottom
min_level = "0.1 m"  # the level counted as drained
surface_pressure = "0 kPa"  # gauge gas pressure on the surface (vented tank: 0)
# Flows from and to outside the modelled lines (simulations; never negative):
# inflow = "40 L/s"    # a constant feed into the tank, e.g. from the filters
# draw_off = "5 L/s"   # taken out by something outside the model, e.g. a pump to process;
#                      # it stops while the tank is drained
# inflow_schedule = [{ time = "0 s", flow = "0 L/s" }, { time = "10 min", flow = "40 L/s" }]
#                      # the feed in time instead (linear between points; draw_off_schedule alike)
# restart_level = "0.5 m"  # a drained tank's outlets and draw-off start again at this level
# Its gas space (without vent the tank is open to the atmosphere and this is not modelled):
# vent = { inner_diameter = "50 mm", k = 1.5 }  # or { nominal_size = "2 in", schedule = "40",
#                      # k = 1.5 }, { rated_flow = "300 m3/h", rated_pressure_drop = "0.5 kPa" }
#                      # (air at 20 degC, 1 atm), or "none" for a sealed (or blanked) tank
# design_vacuum = "0.5 kPa"   # the vacuum the tank is built for, a positive gauge figure
# design_pressure = "2 kPa"   # the gas-space pressure it is built for

# Where the line ends: free discharge to air, or kind = "vessel" with a gauge pressure.
[receivers.OUT]
kind = "open_discharge"
elevation = "2 m"

[lines.L1]
from = "TK1"  # positive flow runs from -> to
to = "OUT"
length = "60 m"
nominal_size = "3 in"  # or inner_diameter = "77.9 mm"
schedule = "40"
material = "commercial_steel"  # sets roughness (or give roughness = "0.045 mm")
entrance = "sharp"  # inlet shape, or a loss coefficient K
fittings = [{ type = "elbow_90_standard", count = 2 }, { type = "gate_valve" }]
# profile = [{ distance = "0 m", elevation = "10 m" }, { distance = "60 m", elevation = "2 m" }]
# pressure_rating = "10 bar"

# An optional throttling valve on the line:
# [lines.L1.valve]
# characteristic = "equal_percentage"   # linear | equal_percentage | quick_opening
# k_open = 0.5                          # K at full opening, or kv_open = "120 m3/h"
# opening = 1.0
# schedule = [{ time = "0 s", opening = 1.0 }, { time = "30 s", opening = 0.0 }]

[simulation]
duration = "2 h"
initial_state = "steady"  # or "at_rest" (lines full, no flow)
stop_when = "drained"  # stop when every tank reaches its min_level
'''


#: The starter's SI texts and what a US project file gets instead: round figures a US plant
#: would write, not exact conversions (the file keeps what is typed). Each left-hand text
#: occurs exactly once in :data:`STARTER` (tested). A Kv stays in m3/h: it is defined so.
US_VALUES: tuple[tuple[str, str], ...] = (
    ('units = "SI"', 'units = "US"'),
    ('site_elevation = "0 m"', 'site_elevation = "0 ft"'),
    ('temperature = "20 degC"', 'temperature = "68 degF"'),
    ('diameter = "3 m"', 'diameter = "10 ft"'),
    ('height = "5 m"', 'height = "16 ft"'),
    ('bottom_elevation = "10 m"', 'bottom_elevation = "33 ft"'),
    ('level = "4 m"', 'level = "13 ft"'),
    ('min_level = "0.1 m"', 'min_level = "4 in"'),
    ('surface_pressure = "0 kPa"', 'surface_pressure = "0 psi"'),
    ('inflow = "40 L/s"', 'inflow = "600 gpm"'),
    ('draw_off = "5 L/s"', 'draw_off = "80 gpm"'),
    ('flow = "0 L/s" }, { time = "10 min", flow = "40 L/s"',
     'flow = "0 gpm" }, { time = "10 min", flow = "600 gpm"'),
    ('restart_level = "0.5 m"', 'restart_level = "1.5 ft"'),
    ('inner_diameter = "50 mm", k = 1.5', 'inner_diameter = "2 in", k = 1.5'),
    ('rated_flow = "300 m3/h", rated_pressure_drop = "0.5 kPa"',
     'rated_flow = "180 ft3/min", rated_pressure_drop = "2 inH2O"'),
    ('(air at 20 degC, 1 atm)', '(air at 68 degF, 1 atm)'),
    ('design_vacuum = "0.5 kPa"', 'design_vacuum = "2 inH2O"'),
    ('design_pressure = "2 kPa"', 'design_pressure = "8 inH2O"'),
    ('elevation = "2 m"\n', 'elevation = "6.5 ft"\n'),
    ('length = "60 m"', 'length = "200 ft"'),
    ('inner_diameter = "77.9 mm"', 'inner_diameter = "3.068 in"'),
    ('roughness = "0.045 mm"', 'roughness = "0.0018 in"'),
    ('{ distance = "0 m", elevation = "10 m" }, { distance = "60 m", elevation = "2 m" }',
     '{ distance = "0 ft", elevation = "33 ft" }, { distance = "200 ft", elevation = "6.5 ft" }'),
    ('pressure_rating = "10 bar"', 'pressure_rating = "150 psi"'),
)


def starter_text(units: str = "SI") -> str:
    """The commented starter project (valid: it passes ``workbench check``), its figures in
    ``units`` ("SI" or "US")."""
    if units != "US":
        return STARTER
    text = STARTER
    for si, us in US_VALUES:
        text = text.replace(si, us)
    return text

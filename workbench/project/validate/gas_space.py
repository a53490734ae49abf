"""A gas space or vessel held below the liquid's vapour pressure: refused.

A liquid surface under a gas pressure below its vapour pressure boils: the gas space fills
with vapour until its pressure is the vapour pressure, so the pressure the file gives cannot
be held (and a steady answer built on it would show heads the liquid cannot have). The
checked keys are a reservoir's ``surface_pressure``, a vented tank's starting
``gas_pressure`` and a vessel receiver's ``pressure``, all gauge; the vapour pressure is the
liquid's at the file's temperature (absolute). A liquid with no known vapour pressure is not
checked here (the solver's vapour checks say so).
"""

from __future__ import annotations

from workbench.project.units import UnitError, parse_quantity
from workbench.project.validate.checker import Checker

__all__ = ["check_gas_spaces"]

#: (section, key) of each gauge pressure over a liquid surface.
_SURFACE_KEYS = (("reservoirs", "surface_pressure"), ("reservoirs", "gas_pressure"),
                 ("receivers", "pressure"))


def check_gas_spaces(c: Checker, parts) -> None:
    """Add a problem for each gas pressure over a liquid that is below its vapour pressure."""
    fluid = parts.fluid
    if fluid is None or fluid.vapor_pressure is None:
        return
    floor_gauge = fluid.vapor_pressure - c.atmosphere
    for section, key in _SURFACE_KEYS:
        for eid, table in parts.tables.get(section, {}).items():
            if not isinstance(table, dict) or key not in table:
                continue
            path = f"{section}.{eid}"
            try:  # the element's own check has said what is wrong with a bad value
                value = parse_quantity(table[key], "pressure", atmosphere=c.atmosphere)
            except (UnitError, TypeError, ValueError):
                continue
            if not -c.atmosphere < value < floor_gauge:
                continue  # below a perfect vacuum (said already), or a pressure it can hold
            c.add(f"{path}.{key}", f"{table[key]!r} (gauge) is below the vapour pressure of "
                  f"the {fluid.name} ({c.shown(floor_gauge, 'pressure', 5)} gauge at this site "
                  f"and temperature): the liquid would boil at its surface, so this pressure "
                  f"cannot be held; give at least {_at_least(c, floor_gauge)}")


def _at_least(c: Checker, floor_gauge: float) -> str:
    """The floor [Pa gauge] as shown, or, where showing it rounds it below the floor (which
    the check would refuse again), the next figure up: the five significant figures shown
    are within half a part in ten thousand of the value, so adding that much rounds up."""
    text = c.shown(floor_gauge, "pressure", 5)
    try:
        if parse_quantity(text, "pressure", atmosphere=c.atmosphere) >= floor_gauge:
            return text
    except (UnitError, ValueError):
        pass
    return c.shown(floor_gauge + 5e-5 * abs(floor_gauge), "pressure", 5)

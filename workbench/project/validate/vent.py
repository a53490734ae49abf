"""A tank's vent and gas space: ``vent``, ``gas_pressure``, ``design_vacuum``,
``design_pressure``, ``gas_process`` and ``shell_height`` of ``[reservoirs.ID]``.

``vent`` is a table giving a bore (``inner_diameter``, or ``nominal_size`` with
``schedule``) with its loss coefficient ``k``, or a stated air flow at a stated pressure
drop (``rated_flow``, ``rated_pressure_drop``: air at 20 degC and 1 atm), or the word
``"none"`` for a sealed tank. A tank without ``vent`` is open (its gas space is not
modelled), as before.
"""

from __future__ import annotations

from workbench.core import model as m
from workbench.project.schema import SECTIONS
from workbench.project.validate.checker import Checker, describe, field_spec

__all__ = ["VENT_KEYS", "check_vent"]

#: The keys of a tank's gas space (refused on constant-level reservoirs).
VENT_KEYS = ("vent", "gas_pressure", "design_vacuum", "design_pressure", "gas_process",
             "shell_height")

_NEEDS_VENT = ("gas_pressure", "gas_process", "shell_height")


def check_vent(c: Checker, t: dict, path: str, dims: dict, surface: float | None) -> dict:
    """The gas-space keys of a tank as :class:`~workbench.core.model.Reservoir` keyword
    arguments (empty for an open tank); problems are added with their key paths."""
    out: dict = {}
    for key, word in (("design_vacuum", "vacuum"), ("design_pressure", "pressure")):
        value = c.quantity(t, key, "pressure", path)
        if value is not None and value <= 0.0:
            c.add(f"{path}.{key}", f"{t[key]!r}: give the design {word} as a positive gauge "
                  f"figure, e.g. {key} = \"{c.example('0.5 kPa', 'pressure')}\"")
        elif value is not None:
            out[key] = value
    if "vent" not in t:
        for key in _NEEDS_VENT:
            if key in t:
                c.add(f"{path}.{key}", f"'{key}' applies only to a tank with a vent (add "
                      f"vent = {{ inner_diameter = \"{c.example('50 mm', 'diameter')}\", "
                      "k = 1.5 }, or vent = \"none\" for a sealed tank)")
        return out
    vent = _vent(c, t["vent"], f"{path}.vent")
    if vent is not None:
        out["vent"] = vent
    if surface:
        c.add(f"{path}.surface_pressure", "a tank with a vent has its gas-space pressure "
              "computed: give the pressure at the start as gas_pressure instead")
    gas_p = c.quantity(t, "gas_pressure", "pressure", path)
    if gas_p is not None and gas_p <= -c.atmosphere:
        c.add(f"{path}.gas_pressure", f"{t['gas_pressure']!r} is below a perfect vacuum "
              f"({c.shown(-c.atmosphere, 'pressure')} gauge at this site)")
    elif gas_p is not None:
        out["gas_pressure"] = gas_p
    process = c.choice(t, field_spec("reservoirs", "gas_process"), path)
    if process is not None:
        out["gas_process"] = process
    shell = _shell_height(c, t, path, dims)
    if shell is not None:
        out["shell_height"] = shell
    return out


def _shell_height(c: Checker, t: dict, path: str, dims: dict) -> float | None:
    """The top of the gas space (m): given, or the overflow level; needed for the gas
    space's volume."""
    shell = c.quantity(t, "shell_height", "length", path, positive=True)
    height, shape = dims.get("height"), dims.get("shape")
    if shell is None:
        if "shell_height" not in t and height is None and shape != "horizontal_cylinder":
            c.add(f"{path}.vent", "a tank with a vent needs height (or shell_height): its "
                  "gas space reaches up to it")
        return None
    if height is not None and shell < height * (1 - 1e-9):
        c.add(f"{path}.shell_height", f"{t['shell_height']!r} is below the overflow level "
              f"(height {t.get('height')!r}): the gas space's top is at or above it")
    if shape == "horizontal_cylinder" and dims.get("diameter") is not None \
            and shell > dims["diameter"] * (1 + 1e-9):
        c.add(f"{path}.shell_height", f"{t['shell_height']!r} is above the top of the "
              f"horizontal cylinder (diameter {t.get('diameter')!r})")
    return shell


def _vent(c: Checker, value, key: str) -> m.Vent | None:
    """``vent``: a table of a bore and k, or of a rated flow and drop, or ``"none"``."""
    if isinstance(value, str):
        if value.strip().lower() == "none":
            return m.Vent(0.0)
        c.add(key, f"expected a table such as {{ inner_diameter = "
              f"\"{c.example('50 mm', 'diameter')}\", k = 1.5 }} or the "
              f"word \"none\" (a sealed tank), got {describe(value)}")
        return None
    if not isinstance(value, dict):
        c.add(key, f"expected a table such as {{ inner_diameter = "
              f"\"{c.example('50 mm', 'diameter')}\", k = 1.5 }} or "
              f"\"none\", got {describe(value)}")
        return None
    c.known_keys(value, SECTIONS["reservoirs.vent"], key)
    bore = "inner_diameter" in value or "nominal_size" in value
    rated = "rated_flow" in value or "rated_pressure_drop" in value
    if bore and rated:
        c.add(f"{key}.rated_flow", "give a bore with k, or rated_flow with "
              "rated_pressure_drop, not both")
        return None
    if rated:
        return _rated(c, value, key)
    if not bore:
        c.add(key, "the vent needs inner_diameter (or nominal_size) with k, or rated_flow "
              "with rated_pressure_drop")
        return None
    return _bored(c, value, key)


def _bored(c: Checker, value: dict, key: str) -> m.Vent | None:
    from workbench.core.vent import bore_effective_area
    from workbench.project.validate.lines import _bore

    n0 = len(c.problems)
    diameter, _ = _bore(c, value, key)
    if "k" not in value:
        c.add(f"{key}.k", "missing required key 'k': the vent's loss coefficient on its "
              "bore's velocity head, e.g. k = 1.5")
        return None
    k = c.number(value, field_spec("reservoirs.vent", "k"), key, exclusive_minimum=True)
    if len(c.problems) > n0 or diameter is None or k is None:
        return None
    return m.Vent(bore_effective_area(diameter, float(k)), diameter=diameter, k=float(k))


def _rated(c: Checker, value: dict, key: str) -> m.Vent | None:
    from workbench.core.vent import rated_effective_area

    if "k" in value:
        c.add(f"{key}.k", "k applies to a vent given by its bore; a rated vent's stated flow "
              "and drop already include its losses")
    flow = c.quantity(value, "rated_flow", "gas_flow", key, required=True, positive=True)
    drop = c.quantity(value, "rated_pressure_drop", "pressure", key, required=True,
                      positive=True)
    if flow is None or drop is None or "k" in value:
        return None
    return m.Vent(rated_effective_area(flow, drop), rated_flow=flow, rated_pressure_drop=drop)

"""``[lines.ID]``: a line's ends, length, bore (an inside diameter, or a nominal size and
schedule from the pipe tables), wall (roughness and elastic data, from the material unless
given), entrance, and its fittings, profile, valve and surge tables."""

from __future__ import annotations

import math

from workbench.core import model as m
from workbench.project.schema import SECTIONS
from workbench.project.validate.air_valves import check_air_valves
from workbench.project.validate.checker import (
    Checker,
    describe,
    did_you_mean,
    field_spec,
    words,
)
from workbench.project.validate.fittings import check_fittings, check_profile
from workbench.project.validate.valve import check_surge, check_valve

__all__ = ["check_line"]


def check_line(c: Checker, lid: str, t: dict, node_ids: dict[str, str],
               fluid: m.FluidProps | None) -> m.Line | None:
    """A line between two nodes, or ``None`` after adding its problems."""
    path = f"lines.{lid}"
    c.known_keys(t, SECTIONS["lines"], path)
    c.text(t, "description", path)
    n0 = len(c.problems)
    ends = _line_ends(c, t, path, node_ids)
    length = c.quantity(t, "length", "length", path, positive=True)
    diameter, wall = _bore(c, t, path)
    material, roughness = _roughness(c, t, path, diameter)
    friction_factor = c.number(t, field_spec("lines", "friction_factor"), path,
                               exclusive_minimum=True)
    entrance_k, entrance_name = _entrance(c, t, path)
    fittings = check_fittings(c, t, path)
    profile = check_profile(c, t, path, length)
    air_valves = check_air_valves(c, t, path)
    wall, elastic, poisson = _elastic_wall(c, t, path, diameter, wall, material)
    support = c.choice(t, field_spec("lines", "support"), path)
    rating = c.quantity(t, "pressure_rating", "pressure", path, positive=True)
    valve_ok, valve = check_valve(c, t, path, diameter, fluid)
    surge_ok, surge = check_surge(c, t, path)
    if len(c.problems) > n0 or not (valve_ok and surge_ok) or None in (length, diameter, roughness) \
            or len(ends) < 2 or fittings is None or profile is None:
        return None
    return m.Line(
        id=lid, from_node=ends["from"], to_node=ends["to"], length=length, diameter=diameter,
        roughness=roughness, friction_factor=friction_factor, entrance_k=entrance_k,
        entrance_name=entrance_name, fittings=fittings, profile=profile, air_valves=air_valves,
        wall_thickness=wall,
        elastic_modulus=elastic, poisson_ratio=0.3 if poisson is None else float(poisson),
        support=support or "anchored", pressure_rating=rating, valve=valve, surge=surge,
        material=t.get("material") if material is not None else None,
    )


def _line_ends(c: Checker, t: dict, path: str, node_ids: dict[str, str]) -> dict[str, str]:
    """The ``from`` and ``to`` nodes that name a reservoir, junction or receiver."""
    ends = {}
    for end in ("from", "to"):
        node = c.text(t, end, path)
        if node is None:
            continue
        if node in node_ids and node_ids[node] != "lines":
            ends[end] = node
        elif node in node_ids:
            c.add(f"{path}.{end}", f"{end} = '{node}' names a line; a line must end at a "
                  "reservoir, junction or receiver")
        else:
            c.add(f"{path}.{end}", f"{end} = '{node}' names no element"
                  f"{did_you_mean(node, [k for k, s in node_ids.items() if s != 'lines'])}")
    if len(ends) == 2 and ends["from"] == ends["to"]:
        c.add(f"{path}.to", f"the line starts and ends at '{ends['to']}'")
    return ends


def _bore(c: Checker, t: dict, path: str) -> tuple[float | None, float | None]:
    """Inside diameter and wall thickness (m): the diameter as given (wall unknown), or both
    from the pipe tables for a nominal size and schedule."""
    if "inner_diameter" in t and "nominal_size" in t:
        c.add(f"{path}.nominal_size", "give inner_diameter or nominal_size, not both")
        return None, None
    if "inner_diameter" in t:
        diameter = c.quantity(t, "inner_diameter", "diameter", path, positive=True)
        if "schedule" in t:
            c.add(f"{path}.schedule", "schedule applies only with nominal_size")
        return diameter, None
    if "nominal_size" not in t:
        c.add(f"{path}.inner_diameter", "missing required key 'inner_diameter' (or "
              "nominal_size with schedule), e.g. inner_diameter = "
              f"\"{c.example('102.26 mm', 'diameter')}\"")
        return None, None
    nominal = t["nominal_size"]
    schedule = t.get("schedule", field_spec("lines", "schedule").default)
    from workbench.core.pipes import PipeSizeError, pipe_dimensions

    if not isinstance(nominal, (str, int, float)) or isinstance(nominal, bool):
        c.add(f"{path}.nominal_size", f"expected a nominal size such as \"4 in\" or "
              f"\"DN100\", got {describe(nominal)}")
    elif not isinstance(schedule, (str, int)) or isinstance(schedule, bool):
        c.add(f"{path}.schedule", f"expected a schedule such as \"40\", got "
              f"{describe(schedule)}")
    else:
        from workbench.core.pipes import parse_schedule

        try:
            parse_schedule(schedule)
        except (PipeSizeError, ValueError) as exc:  # the schedule itself is not one
            c.add(f"{path}.schedule", str(exc))
            return None, None
        try:
            size = pipe_dimensions(nominal, schedule)
        except (PipeSizeError, ValueError) as exc:
            c.add(f"{path}.nominal_size", str(exc))
        else:
            return size.inner_diameter, size.wall_thickness
    return None, None


def _roughness(c: Checker, t: dict, path: str, diameter: float | None):
    """The pipe material (or ``None``) and the wall roughness (m), given or the material's."""
    material = None
    if "material" in t:
        from workbench.core.pipes import MaterialError, pipe_material

        try:
            material = pipe_material(t["material"])
        except (MaterialError, ValueError) as exc:
            c.add(f"{path}.material", str(exc))
    roughness = c.quantity(t, "roughness", "roughness", path, nonnegative=True)
    if roughness is None and "roughness" not in t:
        if material is not None:
            roughness = material.roughness
        elif "material" not in t:
            c.add(f"{path}.roughness", "missing required key 'roughness' (or material), e.g. "
                  f"roughness = \"{c.example('0.045 mm', 'roughness')}\"")
    if roughness is not None and diameter is not None and roughness >= diameter / 2:
        c.add(f"{path}.roughness", f"{t.get('roughness', t.get('material'))!r}: the roughness "
              "must be below the pipe radius")
    return material, roughness


def _entrance(c: Checker, t: dict, path: str) -> tuple[float, str]:
    """The entrance loss coefficient and its name: a named entrance or a K >= 0."""
    from workbench.core.fittings import ENTRANCES

    if "entrance" not in t:
        return ENTRANCES["sharp"].k, "sharp"
    e = t["entrance"]
    if isinstance(e, str) and e in ENTRANCES:
        return ENTRANCES[e].k, e
    if isinstance(e, (int, float)) and not isinstance(e, bool) and math.isfinite(e) and e >= 0:
        return float(e), f"K = {e:g}"
    hint = did_you_mean(e, ENTRANCES) if isinstance(e, str) else ""
    c.add(f"{path}.entrance", f"{describe(e)} is not an entrance{hint}; expected one of "
          f"{words(ENTRANCES)} or a loss coefficient K >= 0")
    return ENTRANCES["sharp"].k, "sharp"


def _elastic_wall(c: Checker, t: dict, path: str, diameter: float | None, wall: float | None,
                  material):
    """Wall thickness (m), elastic modulus (Pa) and Poisson's ratio for the wave speed:
    given, else from the pipe tables and the material."""
    given_wall = c.quantity(t, "wall_thickness", "thickness", path, positive=True)
    if given_wall is not None:
        wall = given_wall
    if wall is not None and diameter is not None and "wall_thickness" in t and wall >= diameter:
        c.add(f"{path}.wall_thickness", f"{t['wall_thickness']!r} is thicker than the bore; "
              "check the value")
    elastic = c.quantity(t, "elastic_modulus", "modulus", path, positive=True)
    if elastic is None and material is not None and "elastic_modulus" not in t:
        elastic = material.elastic_modulus
    poisson = c.number(t, field_spec("lines", "poisson_ratio"), path)
    if "poisson_ratio" not in t and material is not None and material.poisson_ratio is not None:
        poisson = material.poisson_ratio
    return wall, elastic, poisson

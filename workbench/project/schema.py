"""Schema 1 of the project file: the one description of every section and key.

Validation (:mod:`workbench.project.validate`), the terminal app's forms and the docs all
read these tables, so a key is described once. A :class:`FieldSpec` says what a key holds
(a quantity kind from :data:`workbench.project.units.QUANTITY_KINDS`, or ``"number"``,
``"int"``, ``"text"``, ``"choice"``, ``"bool"``, ``"list"``), whether it is required and a
one-line help text. Keys required only in some cases (``shape`` for a tank, ``pressure``
for a vessel) are marked ``required=False`` and say so in ``help``; validation checks them.

Element sections (``reservoirs``, ``junctions``, ``receivers``, ``lines``) hold one table per
element, keyed by the element id; their FieldSpecs describe the keys of one element.
``lines.valve`` and ``lines.surge`` are the sub-tables ``[lines.ID.valve]`` and
``[lines.ID.surge]``. :data:`LIST_ITEMS` describes the entries of list-valued keys.

This module imports nothing heavy: it is read at start-up.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = [
    "ELEMENT_SECTIONS",
    "FieldSpec",
    "LIST_ITEMS",
    "ROOT_KEYS",
    "SCHEMA_VERSION",
    "SECTIONS",
    "choices_for",
    "field",
    "reference_markdown",
    "spec_for",
]

#: The schema version this program reads and writes (the top-level ``schema`` key).
SCHEMA_VERSION = 1


@dataclass(frozen=True)
class FieldSpec:
    """One key of a section: what it holds, whether it is needed, and help for forms."""

    name: str
    kind: str
    """A quantity kind (``"length"``, ``"pressure"`` ...), or ``"number"``, ``"int"``,
    ``"text"``, ``"choice"``, ``"bool"``, ``"list"``, ``"table"`` (a sub-table)."""
    required: bool
    help: str
    choices: tuple[str, ...] = ()
    """For ``"choice"``: the valid words. Empty when the words come from a core table at
    run time (fluid kinds, pipe materials, fitting types)."""
    default: object = None
    """The value used when the key is absent (as the file would write it), or ``None``."""
    minimum: float | None = None
    """For ``"number"``/``"int"``: smallest valid value (inclusive)."""
    maximum: float | None = None
    """For ``"number"``/``"int"``: largest valid value (inclusive)."""
    example: str = ""
    """A valid value as it would be typed, for forms and the starter file."""


def field(name, kind, required=False, help="", **kw) -> FieldSpec:  # noqa: A002 - mirrors FieldSpec
    """Shorthand used by the tables below."""
    return FieldSpec(name, kind, required, help, **kw)


_DESCRIPTION = field("description", "text", help="free text: what this element is")

SECTIONS: dict[str, tuple[FieldSpec, ...]] = {
    "project": (
        field("title", "text", True, "name of the system, shown in reports", example="Tank drain"),
        field("description", "text", help="what the system is and what the study is for"),
        field("units", "choice", help="display units: SI or US customary (files keep what you typed)",
              choices=("SI", "US"), default="SI"),
        field("site_elevation", "elevation",
              help="site elevation above sea level; sets the atmospheric pressure for vapour "
              "and sub-atmospheric checks (standard atmosphere)", default="0 m", example="120 m"),
    ),
    "fluid": (
        field("kind", "choice", True,
              "'water' (IAPWS formulations from temperature), a catalogue liquid, "
              "'ethylene_glycol_water' or 'propylene_glycol_water' (with mass_fraction), "
              "'seawater' (with salinity), or 'custom'",
              example="water"),
        field("temperature", "temperature", help="liquid temperature; required for water, "
              "catalogue liquids and solutions", example="20 degC"),
        field("mass_fraction", "number", help="glycol-water: glycol mass fraction, 0 to 0.6 "
              "(0.3 = 30 % by mass; Melinder 2010 fits, from the freezing point to 100 degC)",
              minimum=0.0, maximum=0.6, example="0.3"),
        field("salinity", "salinity", help="seawater: absolute salinity, 0 to 120 g/kg (open "
              "ocean about 35 g/kg; Sharqawy et al. 2010 fits, 0 to 120 degC)",
              example="35 g/kg"),
        field("name", "text", help="custom liquid: its name"),
        field("density", "density", help="custom liquid: density (required)", example="998 kg/m3"),
        field("viscosity", "viscosity", help="custom liquid: dynamic viscosity (required)",
              example="1.0 mPa*s"),
        field("vapor_pressure", "pressure_abs",
              help="custom liquid: vapour pressure, absolute (optional; without it vapour "
              "checks are skipped with a note)", example="2.34 kPa"),
        field("bulk_modulus", "modulus",
              help="bulk modulus (optional; surge wave speeds need it; for water it comes "
              "from IAPWS-95, for ethanol, methanol, acetone, toluene, propylene glycol and "
              "n-dodecane from their reference equations of state; other catalogue liquids, "
              "glycol-water and seawater have none; a value here overrides)",
              example="2.2 GPa"),
    ),
    "reservoirs": (
        field("kind", "choice", True, "'constant_level' (level held) or 'tank' (level changes "
              "with flow)", choices=("constant_level", "tank")),
        field("bottom_elevation", "elevation", True,
              "elevation of the bottom, where outlet lines leave or enter", example="12 m"),
        field("level", "length", True,
              "liquid depth above the bottom (the initial level of a tank)", example="4.5 m"),
        field("surface_pressure", "pressure", help="gauge gas pressure on the surface",
              default="0 kPa", example="0 kPa"),
        field("shape", "choice", help="tank: vertical_cylinder, horizontal_cylinder, "
              "rectangular or cone_bottom (required for a tank)",
              choices=("vertical_cylinder", "horizontal_cylinder", "rectangular", "cone_bottom")),
        field("diameter", "length", help="tank: inside diameter (vertical and horizontal "
              "cylinder, cone bottom)", example="3 m"),
        field("length", "length", help="tank: length (horizontal cylinder, rectangular)"),
        field("width", "length", help="tank: width (rectangular)"),
        field("cone_angle", "angle", help="cone bottom: included angle at the apex "
              "(or give cone_height)", example="60 deg"),
        field("cone_height", "length", help="cone bottom: height of the cone, apex at the "
              "bottom (or give cone_angle)"),
        field("height", "length", help="tank: level at which it overflows, above the bottom"),
        field("min_level", "length", help="tank: the level counted as drained",
              default="0 m"),
        field("inflow", "flow", help="tank: constant feed into the tank from outside the "
              "modelled lines (e.g. from filters); not negative (a flow taken out is draw_off)",
              example="40 L/s"),
        field("inflow_schedule", "list", help="tank: the feed in time for simulations, "
              "instead of inflow: { time = '...', flow = '...' } points with increasing time, "
              "linear between them, holding the first and last values"),
        field("draw_off", "flow", help="tank: constant flow taken out by something outside "
              "the model (e.g. a pump to process); it stops while the tank is drained",
              example="5 L/s"),
        field("draw_off_schedule", "list", help="tank: the draw-off in time for simulations, "
              "instead of draw_off: { time = '...', flow = '...' } points with increasing "
              "time, linear between them, holding the first and last values"),
        field("restart_level", "length", help="tank: level at which a drained tank's outlets "
              "and draw-off start again (default: min_level plus 5 % of the depth up to "
              "height)", example="0.5 m"),
        field("vent", "table", help="tank: its vent to the atmosphere, { inner_diameter = "
              "'50 mm', k = 1.5 }, { nominal_size = '2 in', schedule = '40', k = 1.5 } or "
              "{ rated_flow = '300 m3/h', rated_pressure_drop = '0.5 kPa' } (air at 20 degC "
              "and 1 atm), or \"none\" for a sealed tank; without it the tank is open and its "
              "gas space is not modelled"),
        field("gas_pressure", "pressure", help="tank with a vent: gauge pressure of the gas "
              "space at the start (with initial_state = 'steady', the steady vacuum instead)",
              default="0 kPa", example="0 kPa"),
        field("design_vacuum", "pressure", help="tank with a vent: the vacuum the tank is "
              "built for, as a positive gauge figure from its nameplate or design",
              example="0.5 kPa"),
        field("design_pressure", "pressure", help="tank with a vent: the gas-space pressure "
              "the tank is built for, gauge", example="2 kPa"),
        field("gas_process", "choice", help="tank with a vent: the gas space as 'isothermal' "
              "(slow moves, heat from shell and liquid) or 'adiabatic' (quick moves)",
              choices=("isothermal", "adiabatic"), default="isothermal"),
        field("shell_height", "length", help="tank with a vent: height of the top of the gas "
              "space above the bottom (default: height, the overflow level)", example="6 m"),
        _DESCRIPTION,
    ),
    "reservoirs.vent": (
        field("inner_diameter", "diameter", help="bore of the vent (or nominal_size, or "
              "rated_flow)", example="50 mm"),
        field("nominal_size", "text", help="nominal size of the vent pipe, e.g. '2 in' (with "
              "schedule)", example="2 in"),
        field("schedule", "text", help="pipe schedule for nominal_size", default="40",
              example="40"),
        field("k", "number", help="loss coefficient of the vent on its bore's velocity head "
              "(entry, pipe, fittings, cowl and exit together)", minimum=0.0, example="1.5"),
        field("rated_flow", "gas_flow", help="the vent's stated air flow (air at 20 degC and "
              "1 atm), with rated_pressure_drop", example="300 m3/h"),
        field("rated_pressure_drop", "pressure", help="the pressure drop at the stated flow",
              example="0.5 kPa"),
    ),
    "junctions": (
        field("elevation", "elevation", True, "elevation of the junction", example="10 m"),
        _DESCRIPTION,
    ),
    "receivers": (
        field("kind", "choice", True, "'open_discharge' (free discharge to air) or 'vessel' "
              "(a closed vessel at a fixed gauge pressure)", choices=("open_discharge", "vessel")),
        field("elevation", "elevation", True, "elevation of the discharge point or vessel inlet",
              example="2 m"),
        field("pressure", "pressure", help="vessel: gauge pressure (required for a vessel)",
              example="50 kPa"),
        _DESCRIPTION,
    ),
    "lines": (
        field("from", "text", True, "id of the node where the line starts (positive flow "
              "runs from -> to)"),
        field("to", "text", True, "id of the node where the line ends"),
        field("length", "length", True, "developed length of the line", example="120 m"),
        field("inner_diameter", "diameter", help="inside diameter (or nominal_size with "
              "schedule)", example="102.26 mm"),
        field("nominal_size", "text", help="nominal size, e.g. '4 in' or 'DN100' (with "
              "schedule), instead of inner_diameter", example="4 in"),
        field("schedule", "text", help="pipe schedule for nominal_size: '40', 'STD', '10S' ...",
              default="40", example="40"),
        field("roughness", "roughness", help="absolute wall roughness (or give material)",
              example="0.045 mm"),
        field("material", "choice", help="pipe material from the materials table: sets "
              "roughness, and the elastic modulus for surge", example="commercial_steel"),
        field("friction_factor", "number", help="a fixed Darcy friction factor instead of "
              "the correlation", minimum=0.0, maximum=1.0),
        field("entrance", "choice", help="where flow leaves a free surface into the line: "
              "a named shape (sharp, inward_projecting, rounded, well_rounded ...) or a "
              "number K", default="sharp"),
        field("fittings", "list", help="minor losses: { type = '...', count = n } or "
              "{ k = 0.9, label = '...' }"),
        field("profile", "list", help="centreline profile: { distance = '...', elevation = "
              "'...' } points with increasing distance"),
        field("wall_thickness", "thickness", help="wall thickness, for the surge wave speed "
              "(taken from the schedule when nominal_size is given)", example="6 mm"),
        field("elastic_modulus", "modulus", help="Young's modulus of the wall, for the surge "
              "wave speed (taken from material when given)", example="207 GPa"),
        field("poisson_ratio", "number", help="Poisson's ratio of the wall (taken from "
              "material when given)", minimum=0.0, maximum=0.5, default=0.3),
        field("support", "choice", help="pipe restraint for the wave speed",
              choices=("anchored", "anchored_upstream", "expansion_joints"), default="anchored"),
        field("pressure_rating", "pressure", help="allowable gauge pressure", example="10 bar"),
        field("valve", "table", help="a throttling valve on the line: [lines.ID.valve]"),
        field("surge", "table", help="how surge is computed: [lines.ID.surge]"),
        _DESCRIPTION,
    ),
    "lines.valve": (
        field("characteristic", "choice", True, "inherent characteristic (IEC 60534-2-4)",
              choices=("linear", "equal_percentage", "quick_opening")),
        field("k_open", "number", help="loss coefficient at full opening, on the line's "
              "velocity head (or kv_open)", minimum=0.0),
        field("kv_open", "kv", help="flow coefficient Kv at full opening (or k_open)",
              example="250 m3/h"),
        field("opening", "number", help="steady opening, relative travel 0..1", minimum=0.0,
              maximum=1.0, default=1.0),
        field("rangeability", "number", help="equal-percentage rangeability R", minimum=1.0,
              default=50.0),
        field("position", "choice", help="end of the line where the valve sits",
              choices=("from", "to"), default="to"),
        field("low_opening", "choice", help="equal percentage below x = 1/ln R: 'tangent' "
              "(a line to zero, closes smoothly) or 'iec' (R^(x-1), IEC 60534-2-4)",
              choices=("tangent", "iec"), default="tangent"),
        field("schedule", "list", help="opening in time for simulations: { time = '...', "
              "opening = x } points with increasing time"),
    ),
    "lines.surge": (
        field("model", "choice", help="'rigid' column or 'elastic' (method of characteristics)",
              choices=("rigid", "elastic"), default="rigid"),
        field("reaches", "int", help="reaches for the elastic model (automatic when absent)",
              minimum=1),
    ),
    "simulation": (
        field("duration", "time", True, "simulated time", example="2 h"),
        field("initial_state", "choice", help="'steady' (start from the steady state) or "
              "'at_rest' (lines full, no flow)", choices=("steady", "at_rest"), default="steady"),
        field("stop_when", "choice", help="stop early when every tank has drained",
              choices=("drained",)),
        field("output_interval", "time", help="spacing of the reported time series "
              "(automatic when absent)", example="10 s"),
    ),
    # [measurements.NAME]: what was read on the plant in a site test (one table per test).
    "measurements": (
        field("element", "text", True, "id of the tank or reservoir (level above its bottom), "
              "line (flow, positive from -> to) or junction (gauge pressure) that was measured",
              example="TK-7"),
        field("quantity", "choice", True, "what was read: level, flow or pressure",
              choices=("level", "flow", "pressure")),
        field("points", "list", help="the readings typed in: { time = '...', value = '...' } "
              "points with increasing time (one point without time: a steady reading); or "
              "give file"),
        field("file", "text", help="a CSV file of readings beside the project (instead of "
              "points); its first row names the columns", example="drain_test.csv"),
        field("time_column", "text", help="CSV: the column of reading times", example="t"),
        field("time_unit", "text", help="CSV: unit of the time column (s, min, h) or "
              "'iso' for ISO 8601 timestamps, counted from the first row; absent: each cell "
              "has its unit", example="min"),
        field("value_column", "text", help="CSV: the column of readings", example="level"),
        field("value_unit", "text", help="CSV: unit of the readings (m, L/s, kPa ...); "
              "absent: each cell has its unit", example="m"),
        field("initial_level", "length", help="test condition: the measured tank's level at "
              "the start of the test (for a line, the tank it draws from), if not the "
              "project's; or a table { TANK = '...' } for several tanks", example="3.2 m"),
        field("valve_opening", "number", help="test condition: the measured line's valve "
              "opening held through the test, 0..1, if not the project's; or a table "
              "{ LINE = x } for several valves", minimum=0.0, maximum=1.0),
        field("initial_state", "choice", help="test condition: 'at_rest' (the outlet was "
              "opened at time zero) or 'steady' (already flowing); default the project's "
              "[simulation] initial_state", choices=("steady", "at_rest")),
        field("description", "text", help="free text: who measured what, with what, when"),
    ),
}

#: Entries of list-valued keys: "section.key" -> FieldSpecs of one entry (an inline table).
LIST_ITEMS: dict[str, tuple[FieldSpec, ...]] = {
    "lines.fittings": (
        field("type", "choice", help="a named fitting from the fittings table (or give k)"),
        field("k", "number", help="a fixed loss coefficient (or give type)", minimum=0.0),
        field("count", "int", help="how many", minimum=1, default=1),
        field("label", "text", help="what the loss is, e.g. 'strainer'"),
        field("method", "choice", help="published method for a named fitting",
              choices=("darby_3k", "hooper_2k"), default="darby_3k"),
    ),
    "lines.profile": (
        field("distance", "length", True, "distance along the line from its from-end"),
        field("elevation", "elevation", True, "centreline elevation there"),
        field("air_valve", "bool", help="an air valve here: true means the column parts here "
              "as soon as the pressure falls below atmospheric (air comes in)", default=False),
    ),
    "reservoirs.inflow_schedule": (
        field("time", "time", True, "time from the start of the simulation"),
        field("flow", "flow", True, "feed into the tank then, not negative"),
    ),
    "reservoirs.draw_off_schedule": (
        field("time", "time", True, "time from the start of the simulation"),
        field("flow", "flow", True, "draw-off asked of the tank then, not negative"),
    ),
    "lines.valve.schedule": (
        field("time", "time", True, "time from the start of the simulation"),
        field("opening", "number", True, "relative travel 0..1", minimum=0.0, maximum=1.0),
    ),
    "measurements.points": (
        field("time", "time", help="time from the start of the test (optional for one steady "
              "reading)"),
        field("value", "text", True, "the reading with its unit, e.g. '3.20 m', '12 L/s', "
              "'85 kPa' (gauge); the quantity's name (level, flow, pressure) may stand for "
              "'value'"),
    ),
}

#: Keys of the top level of the file.
ROOT_KEYS: tuple[FieldSpec, ...] = (
    field("schema", "int", True, "schema version of the file", default=SCHEMA_VERSION),
    field("project", "table", True, "title, display units and site"),
    field("fluid", "table", True, "the liquid"),
    field("reservoirs", "table", help="free liquid surfaces: sources, sinks and tanks"),
    field("junctions", "table", help="points where lines meet"),
    field("receivers", "table", help="open discharges and closed vessels"),
    field("lines", "table", True, "pipe runs between nodes"),
    field("simulation", "table", help="settings for simulations in time"),
    field("measurements", "table", help="site tests: readings taken on the plant, to compare "
          "with the model and calibrate it ([measurements.NAME])"),
)

#: Sections whose tables are keyed by element id, in the order files list them.
ELEMENT_SECTIONS: tuple[str, ...] = ("reservoirs", "junctions", "receivers", "lines")


def spec_for(section: str, key: str) -> FieldSpec | None:
    """The FieldSpec of ``key`` in ``section`` (``"lines.valve"`` etc.), or ``None``."""
    for spec in SECTIONS.get(section, ()) or LIST_ITEMS.get(section, ()):
        if spec.name == key:
            return spec
    return None


def choices_for(section: str, name: str) -> tuple[str, ...]:
    """Valid words for a choice key, including those that come from the core's tables
    (fluid kinds, pipe materials, fitting types, entrance shapes). Imports those tables."""
    key = f"{section}.{name}"
    if key == "fluid.kind":
        from workbench.core.fluid import CATALOGUE, SOLUTIONS

        return ("water", *(k for k in CATALOGUE if k != "water"), *SOLUTIONS, "custom")
    if key == "lines.material":
        from workbench.core.pipes import ROUGHNESS

        return tuple(ROUGHNESS)
    if key == "lines.fittings.type":
        from workbench.core.fittings import FITTINGS

        return tuple(FITTINGS)
    if key == "lines.entrance":
        from workbench.core.fittings import ENTRANCES

        return tuple(ENTRANCES)
    spec = spec_for(section, name)
    return spec.choices if spec is not None else ()


def reference_markdown() -> str:
    """The schema as Markdown tables, one per section (for the docs and ``--help`` text)."""
    from workbench.project.units import QUANTITY_KINDS

    def rows(specs) -> list[str]:
        out = ["| key | holds | required | default | what it is |", "|---|---|---|---|---|"]
        for spec in specs:
            holds = spec.kind
            if spec.kind in QUANTITY_KINDS:
                holds = f"{QUANTITY_KINDS[spec.kind].name} with a unit, e.g. \"{QUANTITY_KINDS[spec.kind].example}\""
            elif spec.choices:
                holds = " / ".join(f"`{c}`" for c in spec.choices)
            default = "" if spec.default is None else f"`{spec.default}`"
            out.append(f"| `{spec.name}` | {holds} | {'yes' if spec.required else ''} | "
                       f"{default} | {spec.help} |")
        return out

    lines = [f"# Project file reference (schema {SCHEMA_VERSION})", "", "## Top level", ""]
    lines += rows(ROOT_KEYS)
    headings = {
        "project": "[project]", "fluid": "[fluid]", "reservoirs": "[reservoirs.ID]",
        "junctions": "[junctions.ID]", "receivers": "[receivers.ID]", "lines": "[lines.ID]",
        "lines.valve": "[lines.ID.valve]", "lines.surge": "[lines.ID.surge]",
        "reservoirs.vent": "[reservoirs.ID.vent]",
        "simulation": "[simulation]", "measurements": "[measurements.NAME]",
    }
    for section, specs in SECTIONS.items():
        lines += ["", f"## {headings.get(section, section)}", ""] + rows(specs)
    for section, specs in LIST_ITEMS.items():
        lines += ["", f"## Entries of `{section}`", ""] + rows(specs)
    return "\n".join(lines) + "\n"

"""The calculation record: a Markdown document a checker can read, sign and file.

One function, :func:`calculation_record`, turns a loaded project and its results into
GitHub-flavoured Markdown: plain headings, pipe tables and lists only (no HTML, no colour),
so it reads well in a version-control web view and converts cleanly to PDF (e.g. with
pandoc). Sections:

1. identification: title, file, sha256 of the file as loaded, date, program and library
   versions;
2. every input as the user entered it, with its unit, read from the TOML document;
3. fluid properties and their formulation; site atmosphere;
4. methods and correlations used, each with its published source and validity range;
5. steady results (lines, nodes, profiles, solver convergence);
6. simulation summary, surge screening and events;
7. every warning, with its code, element and source;
8. the cautions (:mod:`workbench.cautions`);
9. sign-off lines for the preparer and the checker.

:func:`result_tables` gives the same results as plain tables for CSV export.
"""

from __future__ import annotations

import csv
import datetime as _dt
import math
import platform
from collections.abc import Iterable, Mapping, Sequence
from pathlib import Path
from typing import TYPE_CHECKING, Any

from workbench.printable import printable

if TYPE_CHECKING:  # pragma: no cover
    from workbench.core.network import SteadyResult
    from workbench.core.transient import TransientResult
    from workbench.project.document import Project

__all__ = ["calculation_record", "result_tables", "write_result_csvs"]

_SECTION_TITLES = {
    "project": "Project",
    "fluid": "Fluid",
    "reservoirs": "Reservoirs and tanks",
    "junctions": "Junctions",
    "receivers": "Receivers",
    "lines": "Lines",
    "simulation": "Simulation settings",
}


# --- Markdown helpers -----------------------------------------------------------------------


def _cell(value: Any) -> str:
    """Text safe inside a pipe-table cell."""
    text = "" if value is None else str(value)
    text = text.replace("\\", "\\\\").replace("|", "\\|").replace("\n", " ").strip()
    return printable(text) or " "


def _table(header: Sequence[str], rows: Iterable[Sequence[Any]], align: str | None = None) -> list[str]:
    """A GitHub-flavoured pipe table; ``align`` is one letter per column (l or r)."""
    align = align or "l" * len(header)
    rule = ["---:" if a == "r" else "---" for a in align]
    out = ["| " + " | ".join(_cell(h) for h in header) + " |", "| " + " | ".join(rule) + " |"]
    for row in rows:
        out.append("| " + " | ".join(_cell(c) for c in row) + " |")
    return out + [""]


def _inline(value: Any) -> str:
    """An input value as the file holds it, on one line."""
    if isinstance(value, Mapping):
        return "{ " + ", ".join(f"{k} = {_inline(v)}" for k, v in value.items()) + " }"
    if isinstance(value, list | tuple):
        return "[ " + ", ".join(_inline(v) for v in value) + " ]"
    if isinstance(value, str):
        return f'"{value}"'
    if isinstance(value, bool):
        return "true" if value else "false"
    return str(value)


def _q(value: float | None, kind: str, units: str, digits: int = 4) -> str:
    if value is None or (isinstance(value, float) and math.isnan(value)):
        return "-"
    if isinstance(value, float) and math.isinf(value):
        return "infinite"
    from workbench.output.sweep_table import tidy
    from workbench.project.units import format_quantity

    return format_quantity(tidy(float(value), kind), kind, units, digits)


def _residual(value: float | None, kind: str, units: str) -> str:
    """A solver residual in the display units, as it is (no rounding of small values to 0)."""
    if value is None or not math.isfinite(value):
        return "-"
    from workbench.project.units import format_quantity

    return format_quantity(float(value), kind, units, 3)


def _num(value: float | None, digits: int = 4) -> str:
    if value is None or (isinstance(value, float) and not math.isfinite(value)):
        return "-"
    return f"{value:.{digits}g}"


def _time(seconds: float | None) -> str:
    from workbench.output.sweep_table import format_time

    return "-" if seconds is None else format_time(float(seconds))


# --- sections -------------------------------------------------------------------------------


def _versions() -> str:
    from importlib import metadata

    from workbench import __version__

    libs = []
    for name in ("numpy", "scipy", "fluids", "chemicals", "pint"):
        try:
            libs.append(f"{name} {metadata.version(name)}")
        except metadata.PackageNotFoundError:
            continue
    return f"gravity workbench {__version__} (Python {platform.python_version()}; {', '.join(libs)})"


def _identification(project: Project, date: _dt.datetime) -> list[str]:
    from workbench.project.schema import SCHEMA_VERSION

    title = project.system.title
    out = [f"# Calculation record: {title}", ""]
    description = (project.data.get("project") or {}).get("description")
    if description:
        out += [printable(description, keep_lines=True), ""]
    out += _table(
        ["Item", "Value"],
        [
            ["Project file", f"`{project.path.name}`" if project.path else project.name],
            ["File hash (sha256, as loaded)", f"`{project.loaded_hash}`"],
            ["Schema", SCHEMA_VERSION],
            ["Date", date.strftime("%Y-%m-%d %H:%M %Z").strip()],
            ["Program", _versions()],
            ["Display units", project.unit_system],
        ],
    )
    from workbench.cautions import PREAMBLE

    out += [f"> {PREAMBLE}", ""]
    return out


def _inputs(project: Project) -> list[str]:
    data = project.data
    out = ["## 1. Inputs as entered", "",
           "Every key of the project file, as typed, with its unit. Keys not given take the "
           "schema defaults; the values the model used for each line follow the inputs.", ""]
    for section, title in _SECTION_TITLES.items():
        content = data.get(section)
        if not content:
            continue
        out += [f"### {title}", ""]
        if section in ("reservoirs", "junctions", "receivers", "lines"):
            rows = []
            for element_id, fields in content.items():
                for key, value in _flatten(fields):
                    rows.append([element_id, key, _inline(value)])
            out += _table(["Element", "Key", "Value as entered"], rows)
        else:
            out += _table(["Key", "Value as entered"], [[k, _inline(v)] for k, v in _flatten(content)])
    return out


def _flatten(fields: Mapping, prefix: str = "") -> list[tuple[str, Any]]:
    """Sub-tables (``valve``, ``surge``) as ``valve.opening`` keys; lists stay whole."""
    out = []
    for key, value in fields.items():
        if isinstance(value, Mapping):
            out += _flatten(value, f"{prefix}{key}.")
        else:
            out.append((f"{prefix}{key}", value))
    return out


def _derived(project: Project) -> list[str]:
    system, units = project.system, project.unit_system
    out = ["### Derived values used by the model", ""]
    rows = []
    for lid, line in system.lines.items():
        rows.append([
            lid, f"{line.from_node} -> {line.to_node}", _q(line.length, "length", units),
            _q(line.diameter, "diameter", units), _q(line.roughness, "roughness", units),
            _q(line.wall_thickness, "thickness", units) if line.wall_thickness else "-",
            f"{line.entrance_name} (K {line.entrance_k:g})",
            "-" if line.friction_factor is None else f"{line.friction_factor:g} (fixed)",
        ])
    out += _table(["Line", "From -> to", "Length", "Inside diameter", "Roughness", "Wall",
                   "Entrance", "Friction factor"], rows, "llrrrrll")
    fed = [r for r in system.reservoirs.values() if r.kind == "tank" and r.has_external_flow]
    if fed:
        from workbench.core.model import restart_level

        def flow_text(constant, schedule):
            if schedule is None:
                return _q(constant, "flow", units)
            points = ", ".join(f"{_time(t)}: {_q(q, 'flow', units)}"
                               for t, q in zip(schedule.times, schedule.flows))
            return f"schedule ({points}; linear between, end values held)"

        rows = [[r.id, flow_text(r.inflow, r.inflow_schedule),
                 flow_text(r.draw_off, r.draw_off_schedule),
                 _q(restart_level(r), "length", units)
                 + ("" if r.restart_level is not None else " (default)")] for r in fed]
        out += ["", "Tank feeds and draw-offs from outside the modelled lines (the draw-off "
                "stops while the tank is drained; its outlets and draw-off start again at the "
                "restart level):", ""]
        out += _table(["Tank", "Feed", "Draw-off", "Restart level"], rows, "llll")
    return out


def _fluid(project: Project) -> list[str]:
    system, units = project.system, project.unit_system
    fluid = system.fluid
    out = ["## 2. Fluid properties", ""]
    rows = [
        ["Liquid", fluid.name],
        ["Temperature", _q(fluid.temperature, "temperature", units) if fluid.temperature else "-"],
        ["Density", _q(fluid.density, "density", units, 6)],
        ["Dynamic viscosity", _q(fluid.viscosity, "viscosity", units, 5)],
        ["Vapour pressure (absolute)", _q(fluid.vapor_pressure, "pressure_abs", units, 5)
         if fluid.vapor_pressure is not None else "not known: vapour checks skipped"],
        ["Bulk modulus", _q(fluid.bulk_modulus, "modulus", units) if fluid.bulk_modulus else "not known"],
        ["Formulation", fluid.formulation or "given by the user"],
        ["Site elevation", _q(system.site_elevation, "elevation", units)],
        ["Atmospheric pressure (absolute)", _q(system.atmospheric_pressure, "pressure_abs", units, 5)
         + " (standard atmosphere, ISO 2533)"],
    ]
    out += _table(["Property", "Value"], rows)
    from workbench.output.common import finding_message

    for note in fluid.notes:
        out.append(f"- Note: {finding_message(note, units)}")
    if fluid.notes:
        out.append("")
    return out


_FITTING_SOURCES = {
    "hooper_2k": ("Hooper 2-K: K = K1/Re + Kinf (1 + 1/D[in])",
                  "Hooper, W. B., Chem. Eng., Aug. 24, 1981, 96-100 (table in fluids.fittings)",
                  "Re from laminar to turbulent; the sizes of the original tables"),
    "darby_3k": ("Darby 3-K: K = K1/Re + Ki (1 + Kd/D[in]^0.3)",
                 "Darby, R., Chem. Eng., 1999 and 2001 (table in fluids.fittings)",
                 "Re from laminar to turbulent; the sizes of the original tables"),
    "fixed": ("Fixed loss coefficient K", "given by the user", "as the user's source states"),
}


def _methods(project: Project, steady: SteadyResult | None, transient: TransientResult | None,
             elastic: Mapping[str, Any] | None = None) -> list[str]:
    from workbench.core.friction import FRICTION_METHODS
    from workbench.core.line import LineSet

    system = project.system
    rows: list[list[str]] = []
    labels = {r.friction_method for r in (steady.lines.values() if steady else ())}
    used = set()
    for label in labels:
        low = label.lower()
        if "blend" in low:
            used.add("laminar_blend_colebrook")
        elif "colebrook" in low:
            used.add("colebrook")
        elif "laminar" in low:
            used.add("laminar")
        elif label in FRICTION_METHODS:
            used.add(label)
    if not used and any(ln.friction_factor is None for ln in system.lines.values()):
        used.add("laminar_blend_colebrook")
    for name in sorted(used):
        m = FRICTION_METHODS[name]
        re_lo, re_hi = m.re_range
        rr_lo, rr_hi = m.roughness_range
        rows.append(["Friction factor", name.replace("_", " "), m.source,
                     f"Re {re_lo:g} to {re_hi:g}; eps/D {rr_lo:g} to {rr_hi:g}"])
    if any(ln.friction_factor is not None for ln in system.lines.values()):
        rows.append(["Friction factor", "fixed by the user", "the user's value", "-"])
    try:
        lines = LineSet(system)
        fitting_methods = {m for ms in lines.fittings_methods for m in ms}
    except Exception:  # noqa: BLE001 - a record of an unsolvable network still lists the rest
        fitting_methods = set()
    for method in sorted(fitting_methods):
        title, source, validity = _FITTING_SOURCES.get(method, (method, "-", "-"))
        rows.append(["Fittings", title, source, validity])
    entrance_names = sorted({ln.entrance_name for ln in system.lines.values()})
    if entrance_names:
        from workbench.core.fittings import ENTRANCES

        for name in entrance_names:
            entrance = ENTRANCES.get(name)
            rows.append(["Entrance loss", f"{name} (K {entrance.k:g})" if entrance else name,
                         entrance.source if entrance else "the user's value", "turbulent flow"])
    rows.append(["Exit loss", "the kinetic energy of the profile: K = 2 laminar (Re up to 2000), "
                 "1 turbulent (from Re 4000), blended between like friction",
                 "kinetic-energy coefficient 2 of the Hagen-Poiseuille profile; turbulent K = 1, "
                 "a rule of thumb (as fluids' exit_normal)",
                 "the blend over Re 2000 to 4000 has no published law"])
    if any(ln.valve is not None for ln in system.lines.values()):
        chars = sorted({ln.valve.characteristic for ln in system.lines.values() if ln.valve})
        rows.append(["Valve", "K = K_open / c(x)^2, inherent " + ", ".join(chars),
                     "IEC 60534-2-4 inherent characteristics", "opening 0 to 1"])
        rows += _equal_percentage_rows(system)
    rows.append(["Fluid properties", system.fluid.name, system.fluid.formulation or "the user's values",
                 "taken at the liquid's temperature and the site's atmospheric pressure "
                 f"({_q(system.atmospheric_pressure, 'pressure_abs', project.unit_system, 4)}); "
                 "a liquid's properties hardly change with pressure over a gravity system's "
                 "range"])
    rows.append(["Atmospheric pressure", "standard atmosphere", "ISO 2533", "site elevation below 11 km"])
    rows.append(["Network solution", "Newton's method on line flows and junction heads",
                 "energy and continuity equations (Bernoulli with losses)",
                 "full-bore, steady, single-phase Newtonian liquid"])
    if transient is not None:
        rows.append(["Transient", f"rigid-column lines and tank balances, {transient.method} (scipy solve_ivp)",
                     "rigid water column theory (Wylie and Streeter, Fluid Transients in Systems, 1993)",
                     "valve moves slower than about five wave round trips 2L/a"])
        rows += _laminar_rows(steady)
        if any(r.kind == "tank" and r.has_external_flow for r in system.reservoirs.values()):
            rows.append(["Tank feed and draw-off",
                         "dV/dt = sum Q_in - sum Q_out + Q_feed(t) - Q_draw(t); schedules "
                         "piecewise linear, break points landed by the integrator",
                         "mass balance of an incompressible liquid",
                         "a drained tank's outlets stop at min_level and restart at the restart "
                         "level (in the plant they would run part-full)"])
        if transient.gas_tank_ids:
            from workbench.output.vent import RECORD_METHOD_ROW

            rows.append(list(RECORD_METHOD_ROW))
        formulas = sorted({s.formula for s in transient.surge.values() if s.formula})
        for formula in formulas:
            rows.append(["Wave speed", formula, "Korteweg; Wylie and Streeter, Fluid Transients in Systems (1993)",
                         "linear-elastic pipe wall; the support condition stated"])
        if transient.surge:
            rows.append(["Surge pressure", "Joukowsky, dp = rho a dv", "Joukowsky (1898)",
                         "instantaneous closure; an upper bound for the rigid-column peak"])
    for res in _unique(elastic):
        rows.append(["Elastic surge", f"method of characteristics, Courant number 1, friction "
                     f"'{res.friction}'", "Wylie and Streeter, Fluid Transients in Systems (1993), ch. 3",
                     "one-dimensional water hammer; until column separation"])
        if len(getattr(res, "cavity_volume", ())):
            rows.append(["Vapour cavities", "discrete vapour cavity model, cavity volume "
                         "weighting psi = 1", "Wylie and Streeter (1993), ch. 8; Bergant, Simpson "
                         "and Tijsseling (2006)", "cavities lumped at the computing sections; "
                         "collapse peaks depend on the grid (repeat at twice the reaches "
                         "reported); after separation indicative only"])
    out = ["## 3. Methods and correlations", ""]
    out += _table(["Topic", "Method", "Published source", "Validity range"], rows)
    return out


def _equal_percentage_rows(system) -> list[list[str]]:
    """How equal-percentage valves are taken below x = 1/ln R (``valve.low_opening``)."""
    from workbench.core.valve import equal_percentage_note

    lows = sorted({(ln.valve.low_opening, ln.valve.rangeability) for ln in system.lines.values()
                   if ln.valve and ln.valve.characteristic == "equal_percentage"})
    return [["Valve, low openings", equal_percentage_note(low, r),
             "IEC 60534-2-4 (R^(x-1)); below 1/ln R the tangent is our choice" if low == "tangent"
             else "IEC 60534-2-4", "valve.low_opening = \"tangent\" or \"iec\""]
            for low, r in lows]


def _laminar_rows(steady) -> list[list[str]]:
    """The laminar start-up caution when a line ran laminar in the steady solution."""
    from workbench.core.checks import LAMINAR_TRANSIENT_CAUTION as LAMINAR_CAUTION

    if steady is None or not any(r.regime == "laminar" for r in steady.lines.values()):
        return []
    return [["Laminar transients", LAMINAR_CAUTION,
             "Szymanski (1932), exact start-up of laminar pipe flow", "laminar lines"]]


def _steady(project: Project, steady: SteadyResult | None) -> list[str]:
    units = project.unit_system
    out = ["## 4. Steady results", ""]
    if steady is None:
        return out + ["Not computed.", ""]
    if not steady.success:
        from workbench.output.common import finding_message

        return out + [f"**No steady solution:** {finding_message(steady, units)}", ""]
    res = steady.residuals or {}
    out += [f"Converged in {steady.iterations} Newton iterations; largest continuity residual "
            f"{_residual(res.get('continuity'), 'flow', units)}, energy residual "
            f"{_residual(res.get('energy'), 'head', units)}.", ""]
    out += ["### Lines", ""]
    out += _table(
        ["Line", "Flow", "Velocity", "Re", "Regime", "f", "f from", "Friction loss", "Minor loss",
         "Head loss", "Velocity head", "Status"],
        [[lid, _q(r.flow, "flow", units), _q(r.velocity, "velocity", units), _num(r.reynolds, 4),
          r.regime, _num(r.friction_factor, 4), r.friction_method, _q(r.friction_loss, "head", units),
          _q(r.minor_loss, "head", units), _q(r.head_loss, "head", units),
          _q(r.velocity_head, "head", units), r.status]
         for lid, r in steady.lines.items()],
        "lrrrlrlrrrrl",
    )
    out += ["### Nodes", ""]
    out += _table(
        ["Node", "Kind", "Elevation", "Head", "Pressure (gauge)"],
        [[nid, n.kind, _q(n.elevation, "elevation", units), _q(n.head, "head", units),
          _q(n.pressure, "pressure", units)] for nid, n in steady.nodes.items()],
        "llrrr",
    )
    for lid, prof in (steady.profiles or {}).items():
        if len(prof.distance) <= 2 and not project.system.lines[lid].profile:
            continue
        out += [f"### Profile of {lid}", ""]
        out += _table(
            ["Distance", "Elevation", "Hydraulic grade", "Pressure (gauge)", "Pressure (absolute)"],
            [[_q(d, "length", units), _q(z, "elevation", units), _q(h, "head", units),
              _q(pg, "pressure", units), _q(pa, "pressure_abs", units)]
             for d, z, h, pg, pa in zip(prof.distance, prof.elevation, prof.hgl,
                                        prof.pressure_gauge, prof.pressure_abs, strict=False)],
            "rrrrr",
        )
    return out


def _simulation(project: Project, transient: TransientResult | None) -> list[str]:
    from workbench.output.common import finding_message

    units = project.unit_system
    out = ["## 5. Simulation", ""]
    if transient is None:
        return out + ["The project has no `[simulation]` section.", ""]
    t_end = float(transient.t[-1]) if len(transient.t) else 0.0
    out += _table(
        ["Item", "Value"],
        [["Outcome", transient.message], ["Simulated time", _time(t_end)],
         ["Integrator", f"{transient.method}, {transient.nsteps} steps"]],
    )
    if transient.tank_ids:
        rows = []
        for k, tid in enumerate(transient.tank_ids):
            levels = transient.levels[k]
            rows.append([tid, _q(float(levels[0]), "length", units), _q(float(levels[-1]), "length", units),
                         _time(transient.drain_times[tid]) if tid in transient.drain_times else "not drained",
                         getattr(transient, "end_states", {}).get(tid, "-")])
        out += ["### Tanks", ""]
        out += _table(["Tank", "Initial level", "Final level", "Drain time", "At end"], rows, "lrrrl")
    if transient.gas_tank_ids:
        from workbench.output.vent import RECORD_GAS_HEADER, record_gas_rows

        out += ["### Tank gas spaces", ""]
        out += _table(RECORD_GAS_HEADER, record_gas_rows(transient, project.system, units),
                      "llrrrrrr")
    rows = []
    for k, lid in enumerate(transient.line_ids):
        q = transient.flows[k]
        rows.append([lid, _q(float(q.max()), "flow", units), _q(float(q.min()), "flow", units),
                     _q(transient.max_pressure.get(lid), "pressure", units),
                     _time(transient.max_pressure_time.get(lid)),
                     _q(transient.min_pressure.get(lid), "pressure", units),
                     _time(transient.min_pressure_time.get(lid))])
    out += ["### Lines", ""]
    out += _table(["Line", "Peak flow", "Lowest flow", "Max pressure (gauge)", "at", "Min pressure (gauge)", "at"],
                  rows, "lrrrrrr")
    if transient.surge:
        out += ["### Surge screening", ""]
        out += _table(
            ["Line", "Wave speed", "Round trip 2L/a", "Effective closure", "Joukowsky rise", "Rapid closure", "Peak capped"],
            [[lid, _q(s.wave_speed, "velocity", units), _time(s.round_trip), _time(s.effective_closure),
              _q(s.joukowsky, "pressure", units), "YES - elastic analysis needed" if s.rapid_closure else "no",
              "yes" if s.capped else "no"] for lid, s in transient.surge.items()],
            "lrrrrll",
        )
    out += ["### Events", ""]
    if transient.events:
        out += _table(["Time", "Code", "Element", "Message"],
                      [[_time(e.time), f"`{e.code}`", e.element,
                        finding_message(e, project.unit_system)] for e in transient.events],
                      "rlll")
    else:
        out += ["No events.", ""]
    return out


def _all_findings(steady, transient, elastic,
                  units: str = "SI") -> list[tuple[str, str, str, str, str]]:
    """(severity, code, element, message, source) of every warning: steady, simulation, elastic;
    messages in the ``units`` display system."""
    from workbench.output.common import finding_message

    rows = [(f.severity, f.code, f.element, finding_message(f, units), f.source)
            for f in list(steady.warnings if steady else ()) + list(transient.warnings if transient else ())]
    if elastic:
        from workbench.output.elastic import elastic_findings

        rows += [(w["severity"], w["code"], w["element"], w["message"], w.get("source", ""))
                 for w in elastic_findings(dict(elastic), units)]
    return rows


def _warnings(project: Project, steady: SteadyResult | None, transient: TransientResult | None,
              elastic: Mapping[str, Any] | None = None) -> list[str]:
    findings = _all_findings(steady, transient, elastic, project.unit_system)
    out = ["## 6. Warnings", ""]
    if not findings:
        return out + ["No warnings.", ""]
    out += _table(
        ["Severity", "Code", "Element", "Message", "Source"],
        [[sev.upper(), f"`{code}`", element, message, source or "-"]
         for sev, code, element, message, source in findings],
    )
    return out


def _unique(elastic: Mapping[str, Any] | None) -> list[Any]:
    """Each elastic result once (a chain's lines share one result)."""
    seen: dict[int, Any] = {}
    for res in (elastic or {}).values():
        seen.setdefault(id(res), res)
    return list(seen.values())


def _elastic(project: Project, elastic: Mapping[str, Any] | None) -> list[str]:
    if not elastic:
        return []
    units = project.unit_system
    from workbench.output.common import finding_message

    out = ["### Elastic surge (method of characteristics)", ""]
    rows = []
    for lid, res in elastic.items():
        env = getattr(res, "envelopes", {}).get(lid)
        speed = getattr(res, "wave_speeds", {}).get(lid)
        if not res.success or env is None or speed is None:
            rows.append([lid, "-", "-", "-", "-", "-", "-", res.message])
            continue
        sep = res.column_separation
        note = "trusted throughout" if res.trusted_until is None else f"trusted until {_time(res.trusted_until)}"
        if sep is not None:
            note += f"; column separation at {_time(sep.time)} on {sep.line}"
        rows.append([lid, f"{_q(speed.used, 'velocity', units)} (Korteweg {_q(speed.korteweg, 'velocity', units)})",
                     res.reaches.get(lid, "-"), _time(res.dt), _q(float(max(env.max_pressure)), "pressure", units),
                     _q(float(min(env.min_pressure)), "pressure", units), _time(res.duration), note])
    out += _table(["Line", "Wave speed used", "Reaches", "Time step", "Max pressure (gauge)",
                   "Min pressure (gauge)", "Simulated", "Note"], rows, "llrrrrrl")
    for res in _unique(elastic):
        for note in getattr(res, "notes", ()):
            out.append(f"- {finding_message(note, units)}")
    from workbench.output.elastic import cavity_lines, envelope_rows

    for lid, res in elastic.items():
        rows = envelope_rows(res, lid, units)
        if rows:
            out += ["", f"Envelope along {lid} (gauge pressure):", ""]
            out += _table(["Chainage", "Max pressure", "Min pressure", "Note"], rows, "rrrl")
            out += [f"- DANGER: {text}" for text in cavity_lines(res, lid, units)]
    return out + [""]


def _cautions() -> list[str]:
    from workbench.cautions import CAUTIONS, PREAMBLE

    out = ["## 7. Cautions", "", PREAMBLE, ""]
    out += [f"- **{c.topic}.** {c.text}" for c in CAUTIONS]
    return out + [""]


def _signoff() -> list[str]:
    out = ["## 8. Sign-off", ""]
    out += _table(["Role", "Name", "Signature", "Date"],
                  [["Prepared by", "", "", ""], ["Checked by", "", "", ""]])
    out += ["The checker confirms that the inputs match the design basis, the methods suit the "
            "case, and every warning and caution above has been considered.", ""]
    return out


def calculation_record(
    project: Project,
    steady: SteadyResult | None,
    transient: TransientResult | None = None,
    *,
    elastic: Mapping[str, Any] | None = None,
    date: _dt.datetime | None = None,
) -> str:
    """The Markdown calculation record of a project and its results.

    Parameters
    ----------
    project : Project
        The loaded project (its document gives the inputs as entered).
    steady : SteadyResult or None
        The steady solution (``None`` when not computed).
    transient : TransientResult or None
        The simulation, when the project has one.
    elastic : mapping, optional
        Line id -> ``ElasticResult`` of the elastic surge runs (lines marked
        ``model = "elastic"``), as :func:`workbench.core.elastic.run_elastic` returns them.
    date : datetime, optional
        Date written in the record; default now (UTC).
    """
    date = date or _dt.datetime.now(_dt.timezone.utc)
    parts = (
        _identification(project, date) + _inputs(project) + _derived(project) + _fluid(project)
        + _methods(project, steady, transient, elastic) + _steady(project, steady)
        + _simulation(project, transient) + _measured(project, transient)
        + _elastic(project, elastic)
        + _warnings(project, steady, transient, elastic)
        + _cautions() + _signoff()
    )
    text = "\n".join(parts)
    while "\n\n\n" in text:
        text = text.replace("\n\n\n", "\n\n")
    return text.rstrip() + "\n"


def _measured(project: Project, transient: TransientResult | None) -> list[str]:
    """Site tests against the model (:mod:`workbench.output.measurements`)."""
    from workbench.output.measurements import record_lines

    return record_lines(project, transient)


# --- CSV exports ----------------------------------------------------------------------------


def result_tables(project: Project, steady: SteadyResult | None,
                  transient: TransientResult | None = None,
                  elastic: Mapping[str, Any] | None = None) -> dict[str, list[list[Any]]]:
    """Result tables for spreadsheets: file name -> rows (header first), SI numbers."""
    tables: dict[str, list[list[Any]]] = {}
    if steady is not None and steady.success:
        tables["lines.csv"] = [["line", "flow [m^3/s]", "velocity [m/s]", "reynolds [-]", "regime",
                                "friction_factor [-]", "friction_method", "friction_loss [m]",
                                "minor_loss [m]", "head_loss [m]", "velocity_head [m]", "status"]] + [
            [lid, r.flow, r.velocity, r.reynolds, r.regime, r.friction_factor, r.friction_method,
             r.friction_loss, r.minor_loss, r.head_loss, r.velocity_head, r.status]
            for lid, r in steady.lines.items()]
        tables["nodes.csv"] = [["node", "kind", "elevation [m]", "head [m]", "pressure_gauge [Pa]"]] + [
            [nid, n.kind, n.elevation, n.head, n.pressure] for nid, n in steady.nodes.items()]
        profile_rows = [["line", "distance [m]", "elevation [m]", "hgl [m]", "pressure_gauge [Pa]",
                         "pressure_abs [Pa]"]]
        for lid, p in (steady.profiles or {}).items():
            for row in zip(p.distance, p.elevation, p.hgl, p.pressure_gauge, p.pressure_abs, strict=False):
                profile_rows.append([lid, *map(float, row)])
        tables["profiles.csv"] = profile_rows
    tables["warnings.csv"] = [["severity", "code", "element", "message", "source"]] + [
        list(row) for row in _all_findings(steady, transient, elastic)]
    if transient is not None:
        header = ["time [s]"] + [f"flow {lid} [m^3/s]" for lid in transient.line_ids] + [
            f"level {tid} [m]" for tid in transient.tank_ids] + [
            f"gas pressure {tid} [Pa]" for tid in transient.gas_tank_ids]
        rows = [header]
        for k, t in enumerate(transient.t):
            rows.append([float(t)] + [float(transient.flows[i, k]) for i in range(len(transient.line_ids))]
                        + [float(transient.levels[i, k]) for i in range(len(transient.tank_ids))]
                        + [float(transient.gas_pressures[i, k])
                           for i in range(len(transient.gas_tank_ids))])
        tables["timeseries.csv"] = rows
        tables["events.csv"] = [["time [s]", "code", "element", "message"]] + [
            [e.time, e.code, e.element, e.message] for e in transient.events]
    return tables


def write_result_csvs(directory: str | Path, tables: Mapping[str, list[list[Any]]]) -> list[Path]:
    """Write each table to ``directory`` (created if needed); return the paths written."""
    directory = Path(directory)
    directory.mkdir(parents=True, exist_ok=True)
    written = []
    for name, rows in tables.items():
        path = directory / name
        with open(path, "w", newline="", encoding="utf-8") as fh:
            writer = csv.writer(fh)
            for row in rows:
                writer.writerow(["" if v is None else (repr(v) if isinstance(v, float) else v) for v in row])
        written.append(path)
    return written

"""One pass over a file's data: every section's checker in turn, then the core model.

:func:`check_data` reads the sections in a fixed order (root and ``[project]``, ``[fluid]``,
the element tables, ``[simulation]``), collecting what each builds in a :class:`Parts`; then
it runs the further checks listed in :data:`FURTHER_CHECKS`, builds
:class:`~workbench.core.model.System` and checks its topology.

**Hooking in a new table's checker.** Write it in its own module of this package as
``check_x(c: Checker, parts: Parts) -> None``: read ``parts.data`` (the whole file) with the
:class:`~workbench.project.validate.checker.Checker` methods, which add each problem with its
key path; where the checked table changes an element, replace that element in ``parts``
(``parts.reservoirs[rid] = dataclasses.replace(...)``). Then add the function to
:data:`FURTHER_CHECKS` below and the table's keys to :mod:`workbench.project.schema`.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, Callable

from workbench.core import model as m
from workbench.project.problems import Problem, ProjectError
from workbench.project.validate.checker import Checker, describe
from workbench.project.validate.discharges import check_open_discharge_ends
from workbench.project.validate.elements import check_junction, check_receiver, element_tables
from workbench.project.validate.fluid import check_fluid
from workbench.project.validate.gas_space import check_gas_spaces
from workbench.project.validate.lines import check_line
from workbench.project.validate.profile_ends import check_profile_ends
from workbench.project.validate.root import check_project, check_root
from workbench.project.validate.simulation import check_simulation
from workbench.project.validate.tanks import check_reservoir

__all__ = ["FURTHER_CHECKS", "Parts", "build_system", "check_data"]


@dataclass
class Parts:
    """What the checks have read from one file so far (SI units), before the system is built.

    ``None`` or an absent element id stands for a part that had problems.
    """

    data: dict
    title: str = ""
    units: str = "SI"
    site: float = 0.0
    fluid: m.FluidProps | None = None
    tables: dict[str, dict[str, dict]] = field(default_factory=dict)
    reservoirs: dict = field(default_factory=dict)
    junctions: dict = field(default_factory=dict)
    receivers: dict = field(default_factory=dict)
    lines: dict = field(default_factory=dict)
    simulation: m.SimulationSettings | None = None

    @property
    def node_ids(self) -> dict[str, str]:
        """Each element id and the section it is in."""
        return {eid: section for section, ts in self.tables.items() for eid in ts}


def _check_measurements(c: Checker, parts: Parts) -> None:
    """The ``[measurements]`` tables (site tests): :mod:`workbench.project.measurements`."""
    if "measurements" in parts.data:
        from workbench.project.measurements import check_measurements

        c.problems.extend(check_measurements(parts.data, c.file, atmosphere=c.atmosphere,
                                             read_files=False, unit_system=c.unit_system)[1])


#: Checks run after the built-in sections, in order, each as ``check(c, parts)``.
FURTHER_CHECKS: list[Callable[[Checker, Parts], None]] = [check_profile_ends,
                                                        check_open_discharge_ends,
                                                        check_gas_spaces,
                                                        _check_measurements]


def check_data(data: Any, file: str | None = None,
               unit_system: str | None = None) -> tuple[m.System | None, list[Problem]]:
    """Validate a project file's data and build the core model.

    Parameters
    ----------
    data : dict
        The file as ``tomllib.loads`` returns it.
    file : str, optional
        File name for messages.
    unit_system : {"SI", "US"}, optional
        Display units of the numbers the messages compute (a limit, a bore); by default the
        file's ``[project] units``.

    Returns
    -------
    (System or None, list of Problem)
        The system when there are no problems; otherwise ``None`` and every problem found.
    """
    c = Checker(file, unit_system or display_system(data))
    if not isinstance(data, dict):
        c.add("", f"expected a TOML document, got {describe(data)}")
        return None, c.problems
    if not check_root(c, data):
        return None, c.problems
    parts = Parts(data)
    parts.title, parts.units, parts.site = check_project(c, data)
    parts.fluid = check_fluid(c, data)
    _check_elements(c, parts)
    has_tank = any(isinstance(t, dict) and t.get("kind") == "tank"
                   for t in parts.tables["reservoirs"].values())
    parts.simulation = check_simulation(c, data, has_tank)
    for check in FURTHER_CHECKS:
        check(c, parts)
    if c.problems or parts.fluid is None:
        return None, c.problems
    system = m.System(
        title=parts.title, fluid=parts.fluid, reservoirs=parts.reservoirs,
        junctions=parts.junctions, receivers=parts.receivers, lines=parts.lines,
        atmospheric_pressure=c.atmosphere, site_elevation=parts.site,
        simulation=parts.simulation,
    )
    _check_topology(c, system, parts.node_ids)
    return (None if c.problems else system), c.problems


def display_system(data: Any) -> str:
    """The file's ``[project] units`` when it is ``"SI"`` or ``"US"``, else ``"SI"``."""
    project = data.get("project") if isinstance(data, dict) else None
    units = project.get("units") if isinstance(project, dict) else None
    return units if units in ("SI", "US") else "SI"


def _check_elements(c: Checker, parts: Parts) -> None:
    """The reservoirs, junctions, receivers and lines, and junctions no line reaches."""
    data = parts.data
    tables = parts.tables = element_tables(c, data)
    node_ids = parts.node_ids
    parts.reservoirs = {k: check_reservoir(c, k, t) for k, t in tables["reservoirs"].items()}
    parts.junctions = {k: check_junction(c, k, t) for k, t in tables["junctions"].items()}
    parts.receivers = {k: check_receiver(c, k, t) for k, t in tables["receivers"].items()}
    parts.lines = {k: check_line(c, k, t, node_ids, parts.fluid)
                   for k, t in tables["lines"].items()}
    if not tables["lines"] and "lines" in data:
        c.add("lines", "no lines: a system needs at least one [lines.ID] table")
    connected = {t.get(end) for t in tables["lines"].values() for end in ("from", "to")
                 if isinstance(t.get(end), str)}
    for jid in tables["junctions"]:
        if jid not in connected:
            c.add(f"junctions.{jid}", f"junction '{jid}' is not connected to any line")


def _check_topology(c: Checker, system: m.System, node_ids: dict[str, str]) -> None:
    """The network's shape (every line reachable, no isolated part), as a problem keyed to
    the first element the topology names."""
    from workbench.core.topology import TopologyError, build_topology

    try:
        build_topology(system)
    except TopologyError as exc:
        elements = getattr(exc, "elements", ())
        key = ""
        if elements:
            first = elements[0]
            key = f"{node_ids.get(first, 'lines')}.{first}"
        c.add(key or "lines", str(exc))


def build_system(data: Any, file: str | None = None) -> m.System:
    """The core model of a project file's data; raises :class:`ProjectError` listing every
    problem."""
    system, problems = check_data(data, file)
    if problems or system is None:
        raise ProjectError(problems or [Problem(file, "", "the project could not be built")])
    return system

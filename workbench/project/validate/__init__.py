"""Validate the data of a project file and build the core model from it, in one pass.

:func:`check_data` walks the plain data of a file (as ``tomllib`` returns it) section by
section, following :mod:`workbench.project.schema`. It collects every problem rather than
stopping at the first, each with its key path, what was found and what was expected, and
builds :class:`workbench.core.model.System` when there are none. :func:`build_system` is the
same, raising :class:`~workbench.project.problems.ProjectError`.

One module per concern:

* :mod:`.checker` -- the :class:`Checker` that reads values and collects problems, and the
  message helpers;
* :mod:`.root` -- the schema version and ``[project]`` (site elevation -> atmosphere);
* :mod:`.fluid` -- ``[fluid]``;
* :mod:`.elements` -- element ids, junctions and receivers;
* :mod:`.tanks` -- reservoirs and tanks, their feeds and draw-offs;
* :mod:`.lines`, :mod:`.fittings`, :mod:`.valve` -- lines and their tables;
* :mod:`.simulation` -- ``[simulation]``;
* :mod:`.system` -- :func:`check_data`, :func:`build_system`, and ``FURTHER_CHECKS``, where a
  new table's checker is hooked in (see that module's docstring).

Units are read by :mod:`workbench.project.units`; the liquid by :mod:`workbench.core.fluid`,
the site atmosphere by :mod:`workbench.core.atmosphere`, pipe sizes and materials by
:mod:`workbench.core.pipes`. These are imported when a file is checked, not at start-up.
"""

from __future__ import annotations

from workbench.project.validate.checker import (
    ID_PATTERN,
    QUANTITY_LIMIT,
    Checker,
    describe,
    did_you_mean,
)
from workbench.project.validate.system import FURTHER_CHECKS, Parts, build_system, check_data

__all__ = ["FURTHER_CHECKS", "ID_PATTERN", "QUANTITY_LIMIT", "Checker", "Parts", "build_system",
           "check_data", "describe", "did_you_mean"]

"""Vortex-prevention submergence of draining outlets along a run (post-processing).

The steady check's rule (:data:`workbench.core.checks.SUBMERGENCE_SOURCE`) applied to the
output series: when the depth over an outlet falls below ``S = D(1 + 2.3 Fr)``.
"""

from __future__ import annotations

import math

import numpy as np

from workbench.core.finding_text import finding, slots
from workbench.core.model import Finding, G
from workbench.core.transient.model import TransientModel
from workbench.core.transient.results import Event


def submergence(model: TransientModel, t: np.ndarray, flows: np.ndarray, levels: np.ndarray):
    """When a draining tank's depth over an outlet falls below the vortex-prevention
    submergence ``S = D(1 + 2.3 Fr)`` (the steady check's rule, applied along the run).

    The depth is the tank's level over its bottom, where the outlet is (as in the steady
    check); ``Fr = v/sqrt(gD)`` with the line's velocity at that time. The crossing is
    placed by linear interpolation between output times. Returns the ``outlet.submergence``
    events and findings, one per outlet at most.
    """
    from workbench.core.checks import SUBMERGENCE_SOURCE

    events: list[Event] = []
    findings: list[Finding] = []
    if not len(t):
        return events, findings
    system = model.system
    for i, lid in enumerate(model.topo.line_ids):
        line = system.lines[lid]
        area = math.pi * line.diameter**2 / 4.0
        for end, sign in ((line.from_node, 1.0), (line.to_node, -1.0)):
            if end not in model.tank_ids:
                continue
            k = model.tank_ids.index(end)
            out = sign * flows[i]  # flow leaving the tank into the line [m^3/s]
            fr = np.abs(out) / area / math.sqrt(G * line.diameter)
            margin = levels[k] - line.diameter * (1.0 + 2.3 * fr)
            short = (out > 0.0) & (margin < 0.0)
            if not short.any():
                continue
            j = int(np.argmax(short))
            when = float(t[j])
            if j > 0 and margin[j - 1] >= 0.0 and out[j - 1] > 0.0:
                w = margin[j - 1] / (margin[j - 1] - margin[j])
                when = float(t[j - 1] + w * (t[j] - t[j - 1]))
            level = float(np.interp(when, t, levels[k]))
            rule = (f"the submergence a vortex-prevention rule asks for (S = D(1 + 2.3 Fr), "
                    f"Fr {fr[j]:.3g})")
            events.append(Event(when, "outlet.submergence", end, *slots(
                f"the depth over the outlet into line {lid}, {{level}}, falls below {rule}: "
                "a vortex can draw air in", level=(level, "length", 4))))
            start = "from the start" if j == 0 else f"from about t = {when:.4g} s"
            findings.append(finding(
                "outlet.submergence", lid,
                f"during the run the depth over the outlet of {end!r} into line {lid} is below "
                f"{rule} {start}, at a level of {{level}}: air can be drawn in by a vortex "
                "from then on, and the flows and drained time after it assume none is",
                "caution", SUBMERGENCE_SOURCE, level=(level, "length", 4)))
    return events, findings

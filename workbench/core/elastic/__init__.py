r"""Elastic surge (water hammer) by the method of characteristics.

The rigid-column solver (:mod:`workbench.core.transient`) treats each line as one
incompressible slug; for a valve closing in less than about five wave round trips ``2L/a``
that overstates or misses the peak (see :mod:`workbench.core.surge`). This package solves
the one-dimensional water-hammer equations instead, with the liquid compressible and the
pipe wall elastic (Wylie & Streeter, *Fluid Transients in Systems*, 1993, ch. 3): along the
characteristic lines ``dx/dt = +a`` and ``dx/dt = -a``

.. math::

    C^+:\ H_P = C_P - B\,Q_P,\quad C_P = H_A + B\,Q_A - R\,Q_A|Q_A|

    C^-:\ H_P = C_M + B\,Q_P,\quad C_M = H_B - B\,Q_B + R\,Q_B|Q_B|

with ``B = a/(gA)`` [s/m^2] and ``R = f dx/(2 g D A^2)`` [s^2/m^5].

The parts, each readable on its own:

* :mod:`.topology` -- which lines are run together;
* :mod:`.grid` -- wave speeds, reaches and the common time step (Courant number one);
* :mod:`.losses` -- friction and fittings per line and per reach;
* :mod:`.steady` -- the steady state the run starts from;
* :mod:`.boundaries` -- reservoir/tank/outlet ends, junctions and dead ends, valves between
  lines, each a small function with its equations;
* :mod:`.plan`, :mod:`.setup` -- the arrays the time march reads;
* :mod:`.kernel` -- the time march behind one interface: :mod:`.numpy_march` (always) and
  :mod:`.compiled` (numba, optional, imported only when chosen);
* :mod:`.record`, :mod:`.post` -- envelope, traces, first separation, result and findings;
* :mod:`.run` -- :func:`simulate_elastic` and :func:`run_elastic`.

Unsteady friction (e.g. Brunone's or Vardy's models) is **not** included: it would add
damping to the later cycles and steepen their decay, while the first peak after a closure is
nearly unchanged. Ends held fixed over the run: a tank's level is held at its initial value
(a surge run lasts seconds to minutes), as are receivers' pressures; a free discharge is a
fixed head at the outlet elevation (flow reversing there would draw in air, which the model
does not represent). These are screening calculations: surge protection is a matter for
licensed practice and local codes.
"""

from workbench.core.elastic.grid import AUTO_REACHES, MAX_AUTO_REACHES, SPEED_TOLERANCE
from workbench.core.elastic.losses import FRICTION_MODELS
from workbench.core.elastic.results import (
    STATUS_MESSAGES,
    CavityZone,
    ColumnSeparation,
    ElasticResult,
    ElasticSetupError,
    Envelope,
    GridCheck,
    WaveSpeedUse,
)
from workbench.core.elastic.run import run_elastic, simulate_elastic
from workbench.core.elastic.setup import DEFAULT_ROUND_TRIPS
from workbench.core.elastic.topology import connected_lines, elastic_line_ids, series_chain

__all__ = [
    "AUTO_REACHES", "CavityZone", "ColumnSeparation", "DEFAULT_ROUND_TRIPS",
    "ElasticResult", "ElasticSetupError", "Envelope", "FRICTION_MODELS", "GridCheck",
    "MAX_AUTO_REACHES", "SPEED_TOLERANCE", "STATUS_MESSAGES", "WaveSpeedUse",
    "connected_lines", "elastic_line_ids", "run_elastic", "series_chain", "simulate_elastic",
]

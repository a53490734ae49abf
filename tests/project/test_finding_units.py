"""Numbers in findings follow the display unit system; the core's SI text agrees with pint's."""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from workbench.core.finding_text import SI_DISPLAY, finding, si_text
from workbench.output.common import finding_message
from workbench.project.units import format_quantity


@settings(deadline=None)
@given(value=st.floats(min_value=-1e7, max_value=1e7, allow_nan=False).filter(lambda x: x != 0),
       kind=st.sampled_from(sorted(SI_DISPLAY)), digits=st.integers(2, 5))
def test_the_core_writes_si_numbers_exactly_as_the_display_layer_does(value, kind, digits):
    # Reference: pint's conversion through project.units.format_quantity (SI system); the
    # core's own scale factors must give the same text.
    assert si_text(value, kind, digits) == format_quantity(value, kind, "SI", digits)


def test_a_finding_reads_in_psi_ft_and_gpm_on_a_us_project():
    # Conversions (NIST SP 811): 1 psi = 6.894757 kPa, 1 ft = 0.3048 m, 1 US gal/min =
    # 6.309020e-5 m3/s.
    f = finding("x.test", "L1", "pressure {p} at {s}, flow {q}", p=(-50_000.0, "pressure"),
                s=(30.48, "length"), q=(0.0063090196, "flow"))
    assert f.message == "pressure -50 kPa at 30.5 m, flow 6.31 L/s"
    us = finding_message(f, "US")
    assert us == f"pressure {-50_000.0 / 6894.757:.3g} psi at 100 ft, flow 100 gpm"
    assert finding_message(f, "SI") == f.message


def test_an_unknown_quantity_kind_is_refused():
    with pytest.raises(ValueError, match="unknown quantity kind"):
        finding("x.test", "L1", "{v}", v=(1.0, "furlong"))

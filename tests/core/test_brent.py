"""Brent's method of ``workbench.core.brent`` against ``scipy.optimize.brentq``, the reference
library it stands in for (scipy's import is what it saves): the same root bit for bit, the
same refusals.

Closed forms named in the docstrings of the checks; the rest compares with scipy.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import brentq as scipy_brentq

from workbench.core.brent import brentq
from workbench.core.vent import gas_density, vent_inflow

#: Functions with one sign change on [lo, hi] (name, f(x, c), lo, hi), c a shape parameter.
FAMILIES = [
    ("cubic", lambda x, c: x ** 3 - c, 0.0, 10.0),
    ("exponential", lambda x, c: math.exp(x) - 1.0 - c, -1.0, 5.0),
    ("cosine", lambda x, c: math.cos(x) - x * c, 0.0, 2.0),
    ("steep", lambda x, c: math.tanh(50.0 * (x - c / 10.0)), -1.0, 12.0),
    ("flat at the root", lambda x, c: (x - c / 7.0) ** 3, -2.0, 15.0),
    ("reciprocal", lambda x, c: 1.0 / (x + 0.01) - c, 1e-3, 100.0),
]


@settings(max_examples=60, deadline=None)
@given(family=st.sampled_from(FAMILIES), c=st.floats(0.05, 9.5),
       xtol=st.sampled_from([2e-12, 1e-9, 1e-4]), rtol=st.sampled_from([8.881784197001252e-16, 1e-10]))
def test_the_root_is_scipys_root_bit_for_bit(family, c, xtol, rtol) -> None:
    _name, f, lo, hi = family
    expected = _outcome(scipy_brentq, f, lo, hi, args=(c,), xtol=xtol, rtol=rtol)
    assert _outcome(brentq, f, lo, hi, args=(c,), xtol=xtol, rtol=rtol) == expected


def _outcome(solver, *args, **kwargs):
    """The root, or the kind of error (a flat root can exhaust the iterations in both)."""
    try:
        return solver(*args, **kwargs)
    except (ValueError, RuntimeError) as exc:
        return type(exc).__name__


def test_the_square_root_of_two_to_the_last_digit() -> None:
    """x^2 - 2 = 0 on [0, 2]: sqrt(2) = 1.4142135623730951 (the nearest double), within
    the tolerance scipy's defaults allow (2e-12 + 4 eps |x|)."""
    root = brentq(lambda x: x * x - 2.0, 0.0, 2.0)
    assert root == scipy_brentq(lambda x: x * x - 2.0, 0.0, 2.0)
    assert abs(root - math.sqrt(2.0)) < 2e-12


def test_the_vent_balance_root_is_scipys() -> None:
    """The steady vent balance mdot(p) = rho(p) Q that core/vent.py solves, on a 50 mm vent
    passing the air for 0.02 m^3/s of outflow."""
    area, p_atm, rho_atm, q = 0.6 * math.pi * 0.05 ** 2 / 4, 101_325.0, 1.2, 0.02

    def balance(p):
        rho = gas_density(p, p_atm, rho_atm, 1.0)
        return vent_inflow(area, p, p_atm, rho, rho_atm) - rho * q

    args = (balance, 1e-3 * p_atm, p_atm)
    assert brentq(*args, xtol=1e-9, rtol=1e-14) == scipy_brentq(*args, xtol=1e-9, rtol=1e-14)


def test_a_root_at_an_end_of_the_bracket_is_that_end() -> None:
    assert brentq(lambda x: x - 1.0, 1.0, 3.0) == 1.0
    assert brentq(lambda x: x - 3.0, 1.0, 3.0) == 3.0


@pytest.mark.parametrize("call, words", [
    (lambda: brentq(lambda x: x * x + 1.0, -1.0, 1.0), "different signs"),
    (lambda: brentq(lambda x: math.nan, -1.0, 1.0), "NaN"),
    (lambda: brentq(lambda x: x, -1.0, 1.0, xtol=0.0), "xtol"),
    (lambda: brentq(lambda x: x, -1.0, 1.0, rtol=1e-17), "rtol"),
])
def test_what_scipy_refuses_is_refused_with_a_value_error(call, words) -> None:
    with pytest.raises(ValueError, match=words):
        call()


def test_too_few_iterations_is_a_runtime_error_as_in_scipy() -> None:
    with pytest.raises(RuntimeError):
        scipy_brentq(math.sin, 1.0, 4.0, maxiter=2)
    with pytest.raises(RuntimeError, match="2 iterations"):
        brentq(math.sin, 1.0, 4.0, maxiter=2)

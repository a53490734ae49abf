"""Darcy friction factor of full-bore pipe flow in every regime, vectorised over numpy arrays.

The default method, ``"laminar_blend_colebrook"``, is what the line model and the solvers use:

* laminar, Re <= 2000: ``f = 64/Re`` (Hagen-Poiseuille);
* turbulent, Re >= 4000: Colebrook (1939), solved to machine precision by Clamond's (2009)
  two-step iteration on the Lambert-W form (our own vectorised implementation);
* between them, a smooth (C1) blend ``f = (1 - w) 64/Re + w f_Colebrook`` with the cubic
  weight ``w = 3s^2 - 2s^3``, ``s = (Re - 2000)/2000``. The transitional band has no
  published law (friction there is uncertain by up to about 2x, common practice); the blend
  only makes the head loss differentiable for Newton's method, and the checks warn about it.

Every function takes ``|Re|`` (the sign of the flow does not matter) and handles ``Re = 0``:
``f`` is then ``inf`` (the laminar limit), while the product ``f*Re`` returned by
:func:`friction_re_product` stays finite (64), which is what a head-loss model needs.

Other methods (``"colebrook"``, ``"laminar"``, ``"churchill_1977"``, ``"swamee_jain_1976"``)
are chosen by name from :data:`FRICTION_METHODS`; :func:`in_published_range` says whether a
point lies inside a method's published range.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

#: Reynolds number below which flow is taken as laminar [-] (common practice).
RE_LAMINAR = 2000.0
#: Reynolds number above which flow is taken as fully turbulent [-] (common practice).
RE_TURBULENT = 4000.0

_LN10 = np.log(10.0)


def _as_array(x) -> np.ndarray:
    return np.abs(np.asarray(x, dtype=float))


def friction_laminar(re):
    """Hagen-Poiseuille friction factor ``f = 64/Re``.

    Parameters
    ----------
    re : array_like
        Reynolds number [-]; its absolute value is used; ``Re = 0`` gives ``inf``.

    Returns
    -------
    ndarray
        Darcy friction factor [-].

    Examples
    --------
    >>> float(friction_laminar(1000.0))
    0.064
    """
    re = _as_array(re)
    with np.errstate(divide="ignore"):
        return 64.0 / re


def friction_colebrook(re, rel_roughness):
    r"""Colebrook (1939) friction factor, solved by Clamond's (2009) method.

    Solves :math:`1/\sqrt{f} = -2\log_{10}\left(\frac{\varepsilon/D}{3.7}
    + \frac{2.51}{Re\sqrt{f}}\right)`. Clamond writes it as :math:`F + \ln(a + F) = b` with
    :math:`a = Re\,(\varepsilon/D)\ln(10)/18.574`, :math:`b = \ln(Re\ln(10)/5.02)` and
    :math:`1/\sqrt{f} = (2/\ln 10)\,F`; two third-order (Householder) steps from
    :math:`F_0 = b - 0.2` give ``f`` to about machine precision for ``Re`` from 10 up.

    Parameters
    ----------
    re : array_like
        Reynolds number [-] (absolute value used; meaningful for Re >= about 10).
    rel_roughness : array_like
        Relative roughness eps/D [-], >= 0.

    Returns
    -------
    ndarray
        Darcy friction factor [-]; ``nan`` where ``Re`` < 1.

    References
    ----------
    Colebrook, C. F. (1939). Turbulent flow in pipes... J. Inst. Civil Eng. 11(4), 133-156.
    Clamond, D. (2009). Efficient resolution of the Colebrook equation. Ind. Eng. Chem.
    Res. 48(7), 3665-3671. doi:10.1021/ie801626g

    Examples
    --------
    >>> round(float(friction_colebrook(1e5, 1e-4)), 10)
    0.0185138661
    """
    re = _as_array(re)
    rr = np.abs(np.asarray(rel_roughness, dtype=float))
    with np.errstate(divide="ignore", invalid="ignore"):
        y = _clamond_inv_sqrt_f(np.where(re >= 1.0, re, np.nan), rr)
        return 1.0 / (y * y)


def _clamond_inv_sqrt_f(re: np.ndarray, rr: np.ndarray) -> np.ndarray:
    """``1/sqrt(f)`` of Colebrook by Clamond's two Householder steps (``re`` >= 1)."""
    a = rr * re * (_LN10 / 18.574)
    b = np.log(re * (_LN10 / 5.02))
    f_ = b - 0.2
    # First step: e = (ln(a + F) + F - b)/(1 + a + F), with F = b - 0.2 it simplifies.
    af = a + f_
    e = (np.log(af) - 0.2) / (1.0 + af)
    f_ -= (1.0 + af + 0.5 * e) * e * af / (1.0 + af + e * (1.0 + e / 3.0))
    af = a + f_
    e = (np.log(af) + f_ - b) / (1.0 + af)
    f_ -= (1.0 + af + 0.5 * e) * e * af / (1.0 + af + e * (1.0 + e / 3.0))
    return f_ * (2.0 / _LN10)


def colebrook_slope(re, rel_roughness, f=None):
    r"""Derivative ``df/dRe`` of the Colebrook friction factor, by implicit differentiation.

    With :math:`y = 1/\sqrt f`, :math:`a = (\varepsilon/D)/3.7`, :math:`b = 2.51/Re`,
    :math:`c = 2/\ln 10`: :math:`df/dRe = -2 f c b / (Re (a + b y + c b))`.

    Parameters
    ----------
    re, rel_roughness : array_like
        Reynolds number [-] and relative roughness [-].
    f : array_like, optional
        Colebrook friction factor at these points, if already known [-].
    """
    re = _as_array(re)
    rr = np.abs(np.asarray(rel_roughness, dtype=float))
    if f is None:
        f = friction_colebrook(re, rr)
    c = 2.0 / _LN10
    with np.errstate(divide="ignore", invalid="ignore"):
        b = 2.51 / re
        y = 1.0 / np.sqrt(f)
        return -2.0 * f * c * b / (re * (rr / 3.7 + b * y + c * b))


def transition_weight(re):
    """Weight of the turbulent law across the transition band, and its slope.

    ``w = 3s^2 - 2s^3`` with ``s = (Re - 2000)/2000`` clipped to 0..1: 0 when laminar, 1
    when turbulent, continuous with a continuous slope at both band edges. The friction
    blend (:func:`friction_re_product`) and the exit loss
    (:func:`workbench.core.fittings.exit_k`) both use it, so the two move together. No
    published law: it only keeps the head loss smooth for Newton's method.

    Parameters
    ----------
    re : array_like
        Reynolds number [-] (absolute value expected).

    Returns
    -------
    w, dw_dre : ndarray
        Weight [-] and its derivative with respect to Re [-].

    Examples
    --------
    >>> [float(x) for x in transition_weight(3000.0)]
    [0.5, 0.00075]
    """
    re = np.asarray(re, dtype=float)
    s = np.clip((re - RE_LAMINAR) / (RE_TURBULENT - RE_LAMINAR), 0.0, 1.0)
    w = s * s * (3.0 - 2.0 * s)
    dw = 6.0 * s * (1.0 - s) / (RE_TURBULENT - RE_LAMINAR)
    return w, dw


def friction_re_product(re, rel_roughness):
    r"""``phi = f*Re`` and ``dphi/dRe`` for the default method; finite at ``Re = 0``.

    The head loss of a line is ``h = phi * nu * L * v / (2 g D^2)``, linear in ``v`` when
    laminar (``phi = 64``) and quadratic when turbulent, so a line model built on ``phi``
    is smooth through zero flow and reversal. This is the fast path for solvers.

    Parameters
    ----------
    re : array_like
        Reynolds number [-]; its absolute value is used.
    rel_roughness : array_like
        eps/D [-].

    Returns
    -------
    phi, dphi_dre : ndarray
        ``f*Re`` [-] and its derivative with respect to ``|Re|`` [-].
    """
    re = _as_array(re)
    rr = np.abs(np.asarray(rel_roughness, dtype=float))
    r = np.maximum(re, RE_LAMINAR)  # Colebrook is evaluated where it is used (Re > 2000)
    y = _clamond_inv_sqrt_f(r, rr)
    fc = 1.0 / (y * y)
    c = 2.0 / _LN10
    bb = 2.51 / r
    dfc = -2.0 * fc * c * bb / (r * (rr / 3.7 + bb * y + c * bb))
    w, dw = transition_weight(r)
    fcr = fc * r
    phi = 64.0 + w * (fcr - 64.0)
    dphi = dw * (fcr - 64.0) + w * (fc + r * dfc)
    # Laminar side: w = dw = 0 there already, so phi = 64 and dphi = 0 exactly.
    return phi, dphi


def friction_blend(re, rel_roughness):
    """Default method: laminar, C1 blend over 2000-4000, Colebrook (Clamond) above.

    Parameters
    ----------
    re : array_like
        Reynolds number [-] (absolute value used; 0 gives ``inf``).
    rel_roughness : array_like
        eps/D [-].

    Returns
    -------
    ndarray
        Darcy friction factor [-].

    Examples
    --------
    >>> float(friction_blend(1000.0, 1e-3))
    0.064
    """
    re = _as_array(re)
    phi, _ = friction_re_product(re, rel_roughness)
    with np.errstate(divide="ignore"):
        return phi / re


def friction_with_slope(re, rel_roughness):
    r"""Default-method friction factor and its slope, for solvers iterating on velocity.

    :math:`f = \phi/Re` and :math:`df/dRe = (\phi' - \phi/Re)/Re` from
    :func:`friction_re_product` (laminar 64/Re, the C1 blend, Colebrook by Clamond 2009):
    the one vectorised Colebrook solution of the core, shared by the network solver's line
    model and the sweep engine (:mod:`workbench.core.sweep`).

    Parameters
    ----------
    re : array_like
        Reynolds number [-]; its absolute value is used (``Re = 0`` gives ``inf``).
    rel_roughness : array_like
        eps/D [-].

    Returns
    -------
    f, df_dre : ndarray
        Darcy friction factor [-] and its derivative with respect to ``|Re|`` [-].

    Examples
    --------
    >>> f, df = friction_with_slope(1000.0, 0.0)
    >>> float(f), float(df)
    (0.064, -6.4e-05)
    """
    re = _as_array(re)
    phi, dphi = friction_re_product(re, rel_roughness)
    with np.errstate(divide="ignore", invalid="ignore"):
        f = phi / re
        return f, (dphi - f) / re


def friction_churchill(re, rel_roughness):
    r"""Churchill (1977) friction factor: one continuous expression for every regime.

    :math:`f = 8[(8/Re)^{12} + (A + B)^{-3/2}]^{1/12}`,
    :math:`A = [2.457\ln(1/((7/Re)^{0.9} + 0.27\varepsilon/D))]^{16}`,
    :math:`B = (37530/Re)^{16}`.

    Reference: Churchill, S. W. (1977). Friction-factor equation spans all fluid-flow
    regimes. Chem. Eng. 84(24), 91-92 (from memory; checked against fluids'
    ``Churchill_1977``).
    """
    re = _as_array(re)
    rr = np.abs(np.asarray(rel_roughness, dtype=float))
    with np.errstate(divide="ignore", over="ignore", invalid="ignore"):
        a = (2.457 * np.log(1.0 / ((7.0 / re) ** 0.9 + 0.27 * rr))) ** 16
        b = (37530.0 / re) ** 16
        return 8.0 * ((8.0 / re) ** 12 + (a + b) ** -1.5) ** (1.0 / 12.0)


def friction_swamee_jain(re, rel_roughness):
    r"""Swamee and Jain (1976) explicit approximation of Colebrook.

    :math:`f = 0.25/[\log_{10}(\varepsilon/3.7D + 5.74/Re^{0.9})]^2`, published for
    5e3 <= Re <= 1e8 and 1e-6 <= eps/D <= 1e-2.

    Reference: Swamee, P. K. and Jain, A. K. (1976). J. Hydraulics Div. ASCE 102(HY5), 657-664.
    """
    re = _as_array(re)
    rr = np.abs(np.asarray(rel_roughness, dtype=float))
    with np.errstate(divide="ignore"):
        return 0.25 / np.log10(rr / 3.7 + 5.74 / re**0.9) ** 2


@dataclass(frozen=True)
class FrictionMethod:
    """A friction-factor method with its published range of validity."""

    name: str
    function: Callable
    """``function(re, rel_roughness) -> f`` (vectorised)."""
    re_range: tuple[float, float]
    """Published Reynolds-number range [-]."""
    roughness_range: tuple[float, float]
    """Published relative-roughness range [-]."""
    source: str


FRICTION_METHODS: dict[str, FrictionMethod] = {
    m.name: m
    for m in (
        FrictionMethod(
            "laminar_blend_colebrook",
            friction_blend,
            (0.0, 1e8),
            (0.0, 0.05),
            "64/Re below Re 2000 (Hagen-Poiseuille); Colebrook (1939) above Re 4000 solved "
            "by Clamond (2009); a smooth interpolation between (no published law)",
        ),
        FrictionMethod(
            "colebrook",
            friction_colebrook,
            (4000.0, 1e8),
            (0.0, 0.05),
            "Colebrook (1939), solved by Clamond (2009); range that of the Moody (1944) chart",
        ),
        FrictionMethod(
            "laminar",
            friction_laminar,
            (0.0, RE_LAMINAR),
            (0.0, np.inf),
            "Hagen-Poiseuille, f = 64/Re; laminar below Re about 2000 (rule of thumb)",
        ),
        FrictionMethod(
            "churchill_1977",
            friction_churchill,
            (0.0, 1e8),
            (0.0, 0.05),
            "Churchill (1977), Chem. Eng. 84(24)",
        ),
        FrictionMethod(
            "swamee_jain_1976",
            friction_swamee_jain,
            (5e3, 1e8),
            (1e-6, 1e-2),
            "Swamee and Jain (1976), J. Hydraulics Div. ASCE 102(HY5)",
        ),
    )
}

#: Name of the method used when none is chosen.
DEFAULT_METHOD = "laminar_blend_colebrook"


def regime_of(re):
    """Flow regime by Reynolds number: ``"laminar"``, ``"transitional"`` or ``"turbulent"``.

    Laminar up to 2000, turbulent from 4000 (common practice). Returns a ``str`` for scalar
    input, else an array of ``str``.
    """
    re = _as_array(re)
    out = np.where(re <= RE_LAMINAR, "laminar",
                   np.where(re < RE_TURBULENT, "transitional", "turbulent"))
    return str(out) if out.ndim == 0 else out


def method_label(re, method: str = DEFAULT_METHOD):
    """Which law gave ``f`` at each point: e.g. ``"laminar 64/Re"``, ``"Colebrook (Clamond)"``."""
    re = _as_array(re)
    if method == DEFAULT_METHOD:
        out = np.where(
            re <= RE_LAMINAR,
            "laminar 64/Re",
            np.where(re < RE_TURBULENT, "transition blend 64/Re-Colebrook", "Colebrook (Clamond)"),
        )
    else:
        out = np.full(re.shape, method)
    return str(out) if out.ndim == 0 else out


def darcy_friction(re, rel_roughness, method: str = DEFAULT_METHOD):
    """Darcy friction factor and the name of the law that gave it.

    Parameters
    ----------
    re : array_like
        Reynolds number [-]; its absolute value is used; ``Re = 0`` gives ``f = inf``.
    rel_roughness : array_like
        Relative roughness eps/D [-].
    method : str
        A key of :data:`FRICTION_METHODS`.

    Returns
    -------
    f : float or ndarray
        Darcy friction factor [-].
    method_name : str or ndarray of str
        The law used at each point (see :func:`method_label`).

    Raises
    ------
    KeyError
        Unknown method; the message lists the known ones.

    Examples
    --------
    >>> f, name = darcy_friction(1e5, 1e-4)
    >>> round(float(f), 6), name
    (0.018514, 'Colebrook (Clamond)')
    """
    try:
        entry = FRICTION_METHODS[method]
    except KeyError:
        raise KeyError(
            f"unknown friction method {method!r}; known: {', '.join(FRICTION_METHODS)}"
        ) from None
    f = entry.function(re, rel_roughness)
    if np.ndim(f) == 0:
        f = float(f)
    return f, method_label(re, method)


def in_published_range(method: str, re, rel_roughness):
    """Whether each (Re, eps/D) point lies inside the method's published range.

    Parameters
    ----------
    method : str
        A key of :data:`FRICTION_METHODS`.
    re, rel_roughness : array_like
        Reynolds number [-] (absolute value) and eps/D [-].

    Returns
    -------
    bool or ndarray of bool
    """
    entry = FRICTION_METHODS[method]
    re = _as_array(re)
    rr = np.abs(np.asarray(rel_roughness, dtype=float))
    ok = (
        (re >= entry.re_range[0]) & (re <= entry.re_range[1])
        & (rr >= entry.roughness_range[0]) & (rr <= entry.roughness_range[1])
    )
    return bool(ok) if ok.ndim == 0 else ok

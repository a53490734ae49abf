"""Pipe sizes by nominal size and schedule, and pipe materials with their roughness.

Users name a pipe the way the trade does: ``"4 in"`` with schedule ``"40"``, ``'1-1/2"'``
with ``"80"``, or the metric designation ``"DN100"``. This module turns that into inside
diameter, outside diameter and wall thickness in metres from the dimension tables of
ASME B36.10M (welded and seamless wrought steel pipe) and ASME B36.19M (stainless steel
pipe, the ``S`` schedules), as tabulated in ``fluids.piping`` (imported on first use, it
costs about 0.15 s).

DN designations (ISO 6708) map onto NPS by the correspondence printed beside the NPS
column of ASME B36.10M/B36.19M: DN 6 = NPS 1/8 ... DN 100 = NPS 4, and DN = 25 x NPS
from NPS 4 up. A DN value is only a designation: the pipe is still the NPS pipe with its
outside diameter (DN 100 is 114.3 mm OD, not 100 mm).

Materials (:data:`ROUGHNESS`) are a small table of our own. Each entry carries its source;
values not re-read in the original are marked "from memory" or "common practice". The
fuzzy material lookup of ``fluids`` is deliberately not used: it matches loosely and can
return the roughness of a different surface without saying so.
"""

from __future__ import annotations

import difflib
import math
import re
from dataclasses import dataclass
from fractions import Fraction

__all__ = [
    "ASME_SCHEDULES",
    "DN_TO_NPS",
    "DEFAULT_SCHEDULE",
    "Material",
    "MaterialError",
    "PipeSize",
    "PipeSizeError",
    "ROUGHNESS",
    "parse_nominal",
    "parse_schedule",
    "pipe_dimensions",
    "pipe_material",
    "valid_sizes",
]


class PipeSizeError(ValueError):
    """A nominal size or schedule that the tables do not hold; the message lists what is valid."""


class MaterialError(ValueError):
    """An unknown pipe material; the message lists the known names and the nearest match."""


@dataclass(frozen=True)
class PipeSize:
    """Dimensions of a standard pipe. Lengths in metres."""

    nominal: str
    """Canonical nominal size, e.g. ``"NPS 1-1/2"``."""
    schedule: str
    """Schedule as in the standard's table, e.g. ``"40"``, ``"STD"``, ``"10S"``."""
    inner_diameter: float
    """Inside diameter [m] = outer_diameter - 2 * wall_thickness."""
    outer_diameter: float
    """Outside diameter [m]."""
    wall_thickness: float
    """Nominal wall thickness [m] (mill tolerance not deducted)."""
    nps: float = math.nan
    """Nominal pipe size as a number [in designation, not a dimension]."""
    dn: int | None = None
    """Metric designation DN (ISO 6708) of the same pipe, ``None`` when the table has none."""
    standard: str = ""
    """The dimensional standard the row comes from."""


#: Schedules of ASME B36.10M (carbon and alloy steel) and ASME B36.19M (stainless, ``S``).
ASME_SCHEDULES: dict[str, str] = {
    **{s: "ASME B36.10M" for s in ("5", "10", "20", "30", "40", "60", "80", "100", "120",
                                   "140", "160", "STD", "XS", "XXS")},
    **{s: "ASME B36.19M" for s in ("5S", "10S", "40S", "80S")},
}

#: Schedule assumed when none is given (common practice, no source: Sch 40 is the usual
#: default for process piping up to NPS 10, where it equals STD).
DEFAULT_SCHEDULE = "40"

#: DN (ISO 6708) -> NPS, as printed side by side in ASME B36.10M / B36.19M Table 1
#: (DN = 25 x NPS from NPS 4 upward). The pairs for 6..750 agree with fluids.piping's
#: ``SS10DN``/``NPSS10`` tables (checked in tests/core/test_pipes.py).
DN_TO_NPS: dict[int, float] = {
    6: 0.125, 8: 0.25, 10: 0.375, 15: 0.5, 20: 0.75, 25: 1.0, 32: 1.25, 40: 1.5, 50: 2.0,
    65: 2.5, 80: 3.0, 90: 3.5, 100: 4.0, 125: 5.0, 150: 6.0,
    **{25 * n: float(n) for n in range(8, 82, 2)},
}
_NPS_TO_DN = {nps: dn for dn, nps in DN_TO_NPS.items()}

_INCH_WORDS = re.compile(r'\s*(?:in(?:ch(?:es)?)?\.?|"|\'\'|”)\s*$', re.IGNORECASE)
_NPS_WORD = re.compile(r"^\s*nps\s*", re.IGNORECASE)
_DN = re.compile(r"^\s*DN\s*-?\s*(\d+)\s*$|^\s*(\d+)\s*DN\s*$", re.IGNORECASE)
_MIXED = re.compile(r"^(\d+)\s*(?:-|\s)\s*(\d+)\s*/\s*(\d+)$")  # 1-1/2, 1 1/2
_FRACTION = re.compile(r"^(\d+)\s*/\s*(\d+)$")  # 3/4
_DECIMAL = re.compile(r"^\d+(?:\.\d*)?$|^\.\d+$")  # 4, 1.5, .5
_SCHEDULE_WORD = re.compile(r"^\s*(?:sch(?:ed(?:ule)?)?\.?)\s*", re.IGNORECASE)


def _format_nps(nps: float) -> str:
    """``1.5 -> "1-1/2"``, ``0.125 -> "1/8"``, ``4.0 -> "4"``."""
    frac = Fraction(nps).limit_denominator(8)
    whole, rest = divmod(frac, 1)
    if rest == 0:
        return str(int(whole))
    if whole == 0:
        return f"{rest.numerator}/{rest.denominator}"
    return f"{int(whole)}-{rest.numerator}/{rest.denominator}"


def parse_nominal(nominal: str | float) -> tuple[float, int | None]:
    """Read a nominal size as users type it.

    Accepts NPS forms (``"4"``, ``"4 in"``, ``'4"'``, ``"NPS 4"``, ``"1-1/2"``,
    ``"1 1/2 in"``, ``"3/4"``, ``"1.5 in"``, a number) and DN forms (``"DN100"``,
    ``"DN 100"``, ``"100 DN"``).

    Parameters
    ----------
    nominal : str or float
        The nominal size as typed.

    Returns
    -------
    nps : float
        Nominal pipe size [in designation]
    dn : int or None
        The DN designation when one was typed, else ``None``.

    Raises
    ------
    PipeSizeError
        When the text is not a nominal size or names a DN the tables do not hold.

    Examples
    --------
    >>> parse_nominal("1-1/2 in")
    (1.5, None)
    >>> parse_nominal("DN100")
    (4.0, 100)
    """
    if isinstance(nominal, bool):
        raise PipeSizeError(f"expected a nominal pipe size such as '4 in' or 'DN100', got {nominal!r}")
    if isinstance(nominal, (int, float)):
        if not math.isfinite(nominal) or nominal <= 0:
            raise PipeSizeError(f"a nominal pipe size must be a positive number, got {nominal!r}")
        return float(nominal), None
    if not isinstance(nominal, str):
        raise PipeSizeError(f"expected a nominal pipe size such as '4 in' or 'DN100', got {nominal!r}")
    text = nominal.strip()
    m = _DN.match(text)
    if m:
        dn = int(m.group(1) or m.group(2))
        if dn not in DN_TO_NPS:
            valid = ", ".join(str(d) for d in sorted(DN_TO_NPS))
            raise PipeSizeError(
                f"'{nominal}' is not a DN size of ASME B36.10M/B36.19M; valid DN: {valid}"
            )
        return DN_TO_NPS[dn], dn
    body = _INCH_WORDS.sub("", _NPS_WORD.sub("", text)).strip()
    nps: float | None = None
    if (m := _MIXED.match(body)) is not None:
        den = int(m.group(3))
        if den:
            nps = int(m.group(1)) + int(m.group(2)) / den
    elif (m := _FRACTION.match(body)) is not None:
        den = int(m.group(2))
        if den:
            nps = int(m.group(1)) / den
    elif _DECIMAL.match(body):
        nps = float(body)
    if nps is None or nps <= 0:
        raise PipeSizeError(
            f"'{nominal}' is not a nominal pipe size; write it like '4 in', '4\"', "
            "'1-1/2 in', '1.5 in' or 'DN100'"
        )
    return nps, None


def parse_schedule(schedule: str | float | None) -> str:
    """Canonical schedule name: ``"sch 40" -> "40"``, ``"std" -> "STD"``, ``"10s" -> "10S"``.

    ``None`` gives :data:`DEFAULT_SCHEDULE`.

    Raises
    ------
    PipeSizeError
        When the schedule is not one of ASME B36.10M/B36.19M.
    """
    if schedule is None:
        return DEFAULT_SCHEDULE
    if isinstance(schedule, bool):
        raise PipeSizeError(f"expected a pipe schedule such as '40' or 'STD', got {schedule!r}")
    if isinstance(schedule, (int, float)):
        if not math.isfinite(schedule) or schedule != int(schedule):
            raise PipeSizeError(f"'{schedule}' is not a pipe schedule")
        text = str(int(schedule))
    else:
        text = _SCHEDULE_WORD.sub("", str(schedule)).strip().upper().replace(" ", "")
    if text not in ASME_SCHEDULES:
        valid = ", ".join(ASME_SCHEDULES)
        raise PipeSizeError(
            f"'{schedule}' is not a schedule of ASME B36.10M/B36.19M; valid schedules: {valid}"
        )
    return text


def _table(schedule: str):
    from fluids.piping import schedule_lookup  # lazy: fluids costs ~0.15 s to import

    return schedule_lookup[schedule]  # (NPS list, Di [mm], Do [mm], t [mm])


def valid_sizes(schedule: str | float | None = None) -> list[str]:
    """Nominal sizes the tables hold for a schedule, as readable text (``"1-1/2"``)."""
    nps_list = _table(parse_schedule(schedule))[0]
    return [_format_nps(n) for n in nps_list]


def pipe_dimensions(nominal: str | float, schedule: str | float | None = None) -> PipeSize:
    """Inside and outside diameter and wall of a standard pipe.

    .. math:: D_i = D_o - 2 t

    Parameters
    ----------
    nominal : str or float
        Nominal size: NPS (``"4"``, ``"4 in"``, ``'4"'``, ``"1-1/2"``, ``"1.5 in"``) or DN
        (``"DN100"``).
    schedule : str or float, optional
        ``"5"`` ... ``"160"``, ``"STD"``, ``"XS"``, ``"XXS"`` (ASME B36.10M) or ``"5S"``,
        ``"10S"``, ``"40S"``, ``"80S"`` (ASME B36.19M); ``"Sch 40"`` is read as ``"40"``.
        ``None`` means :data:`DEFAULT_SCHEDULE`.

    Returns
    -------
    PipeSize
        Diameters and wall thickness [m].

    Raises
    ------
    PipeSizeError
        For an unreadable size or schedule, or a size the schedule does not include;
        the message lists the valid sizes of that schedule.

    Examples
    --------
    >>> p = pipe_dimensions("4 in", "40")
    >>> round(p.inner_diameter * 1000, 2), round(p.wall_thickness * 1000, 2)
    (102.26, 6.02)

    References
    ----------
    ASME B36.10M-2004, Welded and Seamless Wrought Steel Pipe; ASME B36.19M-2004,
    Stainless Steel Pipe; tables as in ``fluids.piping``.
    """
    nps, dn = parse_nominal(nominal)
    sched = parse_schedule(schedule)
    nps_list, di_mm, do_mm, t_mm = _table(sched)
    for i, n in enumerate(nps_list):
        if abs(n - nps) < 1e-9:
            break
    else:
        sizes = ", ".join(valid_sizes(sched))
        raise PipeSizeError(
            f"'{nominal}' is not a size of schedule {sched} in {ASME_SCHEDULES[sched]}; "
            f"sizes (NPS) for schedule {sched}: {sizes}"
        )
    do = do_mm[i] / 1000.0
    t = t_mm[i] / 1000.0
    return PipeSize(
        nominal=f"NPS {_format_nps(nps_list[i])}",
        schedule=sched,
        inner_diameter=do - 2.0 * t,
        outer_diameter=do,
        wall_thickness=t,
        nps=float(nps_list[i]),
        dn=dn if dn is not None else _NPS_TO_DN.get(float(nps_list[i])),
        standard=ASME_SCHEDULES[sched],
    )


# --------------------------------------------------------------------------------------
# Materials


@dataclass(frozen=True)
class Material:
    """A pipe material: wall roughness for friction, wall elasticity for surge wave speed."""

    roughness: float
    """Absolute (equivalent sand-grain) roughness of the bore, new pipe [m]."""
    elastic_modulus: float | None
    """Young's modulus of the wall [Pa]; ``None`` when too variable to tabulate
    (ask the manufacturer)."""
    poisson_ratio: float | None
    """Poisson's ratio of the wall [-]; ``None`` when unknown."""
    source: str
    """Where the roughness came from (published source, or "rule of thumb")."""
    elastic_source: str = ""
    """Where the elastic modulus and Poisson's ratio came from."""
    description: str = ""
    """What the entry covers, in words."""


_MOODY = "Moody (1944), Trans. ASME 66, table on the friction chart"
_FLUIDS_MOODY = "same value in fluids.friction's material table (Moody-chart values, ft -> m)"
_IDELCHIK = "Idelchik, Handbook of Hydraulic Resistance (2007), via fluids.friction.HHR_roughness"
_FARSHAD = "Farshad & Rieke (2006), SPE 'Surface roughness design values', via fluids.friction"

#: Pipe materials by name. Roughness of new, clean pipe; aged pipe is rougher (Idelchik
#: lists corroded steel at 0.15-1 mm): raise it by hand for old lines.
ROUGHNESS: dict[str, Material] = {
    "commercial_steel": Material(
        0.045e-3, 207e9, 0.30,
        f"{_MOODY}: 0.00015 ft (0.046 mm), commonly rounded to 0.045 mm; "
        f"inside the 0.02-0.1 mm range for new seamless steel in {_IDELCHIK}",
        "E 207 GPa, nu 0.30: typical handbook values for carbon steel (rule of thumb)",
        "new carbon-steel pipe (welded or seamless)",
    ),
    "stainless_steel": Material(
        0.015e-3, 193e9, 0.30,
        "0.015 mm: rule of thumb",
        "E 193 GPa, nu 0.30: austenitic stainless at room temperature (typical handbook value, rule of thumb)",
        "new austenitic stainless pipe",
    ),
    "galvanised_steel": Material(
        0.15e-3, 207e9, 0.30,
        f"{_MOODY}: galvanised iron 0.0005 ft (0.15 mm); {_FLUIDS_MOODY} (0.152 mm)",
        "as carbon steel (typical handbook value, rule of thumb)",
        "galvanised steel pipe",
    ),
    "cast_iron": Material(
        0.26e-3, 100e9, 0.25,
        f"{_MOODY}: 0.00085 ft (0.26 mm); {_FLUIDS_MOODY} (0.259 mm)",
        "grey cast iron E about 80-170 GPa (100 GPa used), nu 0.25 (typical handbook values, rule of thumb)",
        "uncoated grey cast-iron pipe",
    ),
    "asphalted_cast_iron": Material(
        0.12e-3, 100e9, 0.25,
        f"{_MOODY}: 0.0004 ft (0.12 mm); {_FLUIDS_MOODY} (0.122 mm)",
        "as cast iron (typical handbook value, rule of thumb)",
        "asphalt-dipped cast-iron pipe",
    ),
    "ductile_iron_cement_lined": Material(
        0.033e-3, 169e9, 0.28,
        f"{_FARSHAD}: cement lining, average 33 um (measured on lined oil-well tubing)",
        "E 169 GPa, nu 0.28: ductile iron (typical handbook value, rule of thumb)",
        "ductile-iron pipe with cement-mortar lining",
    ),
    "concrete_smooth": Material(
        0.3e-3, 30e9, 0.20,
        f"{_MOODY}: concrete 0.001-0.01 ft (0.3-3 mm), smooth end; {_FLUIDS_MOODY} (0.305 mm)",
        "E about 30 GPa, nu 0.2: concrete (typical handbook value, rule of thumb); reinforcement is ignored",
        "concrete pipe, smooth finish",
    ),
    "concrete_rough": Material(
        3.0e-3, 30e9, 0.20,
        f"{_MOODY}: concrete 0.001-0.01 ft (0.3-3 mm), rough end; {_FLUIDS_MOODY} (3.05 mm)",
        "E about 30 GPa, nu 0.2: concrete (typical handbook value, rule of thumb); reinforcement is ignored",
        "concrete pipe, rough finish or poor joints",
    ),
    "riveted_steel": Material(
        0.9e-3, 207e9, 0.30,
        f"{_MOODY}: 0.003-0.03 ft (0.9-9 mm), smooth end; {_FLUIDS_MOODY} (0.914 mm)",
        "as carbon steel (typical handbook value, rule of thumb)",
        "riveted steel pipe (old installations)",
    ),
    "drawn_tubing": Material(
        0.0015e-3, None, None,
        f"{_MOODY}: drawn tubing 0.000005 ft (0.0015 mm); {_FLUIDS_MOODY} (0.00152 mm)",
        "depends on the metal; give the elastic modulus by hand",
        "drawn tubing of brass, copper, lead or glass",
    ),
    "copper": Material(
        0.0015e-3, 117e9, 0.34,
        f"{_MOODY}: drawn tubing 0.0015 mm; inside the 0.0015-0.01 mm range for "
        f"commercially smooth copper in {_IDELCHIK}",
        "E 117 GPa, nu 0.34: copper (typical handbook value, rule of thumb)",
        "drawn copper tube",
    ),
    "glass": Material(
        0.0015e-3, 70e9, 0.22,
        f"{_MOODY}: drawn tubing/glass 0.0015 mm; {_FLUIDS_MOODY} (0.00152 mm)",
        "E about 70 GPa, nu 0.22: soda-lime/borosilicate glass (typical handbook value, rule of thumb)",
        "glass pipe",
    ),
    "pvc": Material(
        0.0015e-3, 3.0e9, 0.38,
        "0.0015-0.007 mm for PVC/PE: rule of thumb; smooth end used",
        "E about 3.0 GPa short-term, nu 0.38: unplasticised PVC (typical handbook value, rule of thumb)",
        "unplasticised PVC (PVC-U) pressure pipe",
    ),
    "pe100": Material(
        0.007e-3, 1.1e9, 0.45,
        "0.0015-0.007 mm for PVC/PE: rule of thumb; rough end used",
        "E about 0.8-1.2 GPa short-term (1.1 GPa used), nu 0.45: PE100 (typical handbook value, rule of thumb); "
        "E of PE falls with temperature and load time",
        "high-density polyethylene PE100 (HDPE) pipe",
    ),
    "grp": Material(
        0.038e-3, None, None,
        f"{_FARSHAD}: fibreglass lining, average 38 um",
        "glass-fibre reinforced plastic: hoop modulus varies with the lay-up "
        "(about 10-30 GPa, rule of thumb); ask the manufacturer",
        "glass-fibre reinforced plastic (GRP/FRP) pipe",
    ),
}

_ALIASES = {
    "steel": "commercial_steel",
    "carbon_steel": "commercial_steel",
    "cs": "commercial_steel",
    "stainless": "stainless_steel",
    "ss": "stainless_steel",
    "galvanized_steel": "galvanised_steel",
    "galvanised": "galvanised_steel",
    "galvanized": "galvanised_steel",
    "galvanised_iron": "galvanised_steel",
    "galvanized_iron": "galvanised_steel",
    "ductile_iron": "ductile_iron_cement_lined",
    "concrete": "concrete_smooth",
    "pvc_u": "pvc",
    "upvc": "pvc",
    "hdpe": "pe100",
    "pe": "pe100",
    "polyethylene": "pe100",
    "frp": "grp",
    "fibreglass": "grp",
    "fiberglass": "grp",
}


def _normalise(name: str) -> str:
    return re.sub(r"[\s\-]+", "_", name.strip().lower())


def pipe_material(name: str) -> Material:
    """A pipe material by name (case, spaces and hyphens do not matter; a few aliases
    such as ``"carbon steel"``, ``"HDPE"``, ``"galvanized"`` are understood).

    Raises
    ------
    MaterialError
        For an unknown name, listing the known names and the nearest one.

    Examples
    --------
    >>> pipe_material("Commercial steel").roughness
    4.5e-05
    """
    if not isinstance(name, str):
        raise MaterialError(f"expected a pipe material name, got {name!r}")
    key = _normalise(name)
    key = _ALIASES.get(key, key)
    if key in ROUGHNESS:
        return ROUGHNESS[key]
    known = sorted(ROUGHNESS)
    close = difflib.get_close_matches(key, known + sorted(_ALIASES), n=1, cutoff=0.6)
    hint = ""
    if close:
        hint = f" (did you mean '{_ALIASES.get(close[0], close[0])}'?)"
    raise MaterialError(
        f"unknown pipe material '{name}'{hint}; known materials: {', '.join(known)}"
        " (or give roughness and elastic_modulus directly)"
    )

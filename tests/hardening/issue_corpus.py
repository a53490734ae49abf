"""Project files of the kinds an outside corpus used to break the workbench, by seed.

Each case starts from the tank-to-tank transfer demo (a valve, a profile, a surge table)
and changes one thing, of one kind:

``extreme``     a typable but absurd magnitude on a key (1e-320, 1e300, 2**63 - 1, ...);
``unit``        a unit of the wrong kind or none at all;
``vacuum``      a gauge pressure at or below minus the atmosphere (a tank's gas space, a vessel);
``profile``     a profile end point away from its node's elevation;
``injection``   control characters in a title, a description, a label or an id;
``schedule``    a valve schedule of many points toggling every few milliseconds;
``overflow``    a tank that starts at its overflow level, with or without a feed.

A case says which key a refusal must name (``must_name``) where the change can only be
refused. Used by ``test_issue_corpus.py`` (a small number in CI) and by the benchmark
``tests/benchmarks/bench_issue_corpus.py`` (the long form).
"""

from __future__ import annotations

import random
from dataclasses import dataclass

from tests.hardening.harness import ROOT

BASE = (ROOT / "projects" / "fellgate_process_water_transfer.toml").read_text()
LINE = "310-PW-12"

EXTREMES = ("1e-320", "1e-300", "1e-6", "0", "-1", "1e300", "9223372036854775807")
#: (key path, unit written after the number or None for a plain number).
EXTREME_KEYS = (
    (f"lines.{LINE}.length", "m"), (f"lines.{LINE}.wall_thickness", "mm"),
    (f"lines.{LINE}.elastic_modulus", "Pa"), (f"lines.{LINE}.pressure_rating", "bar"),
    (f"lines.{LINE}.valve.kv_open", "m3/h"), (f"lines.{LINE}.valve.rangeability", None),
    (f"lines.{LINE}.valve.opening", None), (f"lines.{LINE}.surge.reaches", None),
    ("reservoirs.TK-310.diameter", "m"), ("reservoirs.TK-310.bottom_elevation", "m"),
    ("reservoirs.TK-320.level", "m"), ("fluid.temperature", "degC"),
)
WRONG_UNITS = ("kg", "s", "m3/h", "", "furlong", "m m", "1/s", "degC")
CONTROL = ("\x1b]52;c;aGk=\x07", "\x1b[2J", "\x08\x08", "\x00", "\u202e", "\r\n[forged]",
           "\x9b31m", "\u2066")


@dataclass(frozen=True)
class Case:
    name: str
    text: str
    kind: str
    must_name: str | None = None
    """A key path the refusal must name, when the change can only be refused."""


def _doc():
    import tomlkit

    return tomlkit.parse(BASE)


def _table(doc, path: str):
    parts = path.split(".")
    if parts[0] in ("lines", "reservoirs"):
        parts = [parts[0], parts[1], *parts[2:]]
    node = doc
    for p in parts[:-1]:
        node = node[p]
    return node, parts[-1]


def _toml_number_or_text(value: str, unit: str | None):
    if unit is None:
        number = float(value)
        return int(number) if number.is_integer() and abs(number) < 2**63 else number
    return f"{value} {unit}"


def _extreme(doc, rng):
    key, unit = rng.choice(EXTREME_KEYS)
    value = rng.choice(EXTREMES)
    table, name = _table(doc, key)
    table[name] = _toml_number_or_text(value, unit)
    return f"{key} = {value} {unit or ''}".strip(), None


def _unit(doc, rng):
    key, unit = rng.choice([k for k in EXTREME_KEYS if k[1] is not None])
    wrong = rng.choice([u for u in WRONG_UNITS if u != unit])
    table, name = _table(doc, key)
    table[name] = f"12 {wrong}".strip() if wrong else 12
    return f"{key} in {wrong or 'no unit'}", key


def _vacuum(doc, rng):
    kpa = -rng.uniform(101.4, 2000.0)
    key = rng.choice(["reservoirs.TK-310.surface_pressure", "reservoirs.TK-320.surface_pressure"])
    table, name = _table(doc, key)
    table[name] = f"{kpa:.1f} kPa"
    return f"{key} = {kpa:.1f} kPa", key


def _profile(doc, rng):
    offset = rng.choice([-1, 1]) * rng.uniform(0.06, 50.0)
    index = rng.choice([0, -1])
    point = doc["lines"][LINE]["profile"][index]
    z = 18.0 if index == 0 else 1.5
    point["elevation"] = f"{z + offset:.3f} m"
    n = len(doc["lines"][LINE]["profile"])
    return (f"profile point {index} off by {offset:.2f} m",
            f"lines.{LINE}.profile[{1 if index == 0 else n}].elevation")


def _injection(doc, rng):
    chars = rng.choice(CONTROL)
    where = rng.choice(["title", "description", "label", "id"])
    if where == "title":
        doc["project"]["title"] = "Transfer" + chars
    elif where == "description":
        doc["lines"][LINE]["description"] = chars + "rack"
    elif where == "label":
        doc["lines"][LINE]["fittings"][3]["label"] = "meter" + chars
    else:
        doc["lines"][LINE]["to"] = "TK-320" + chars
        return f"id with {chars!r}", f"lines.{LINE}.to"
    return f"{where} with {chars!r}", None


def _schedule(doc, rng, points: int):
    import tomlkit

    step = rng.choice([0.01, 0.02, 0.05])
    schedule = tomlkit.array()
    for i in range(points):
        schedule.append({"time": f"{i * step:.3f} s", "opening": 0.6 if i % 2 else 0.55})
    doc["lines"][LINE]["valve"]["schedule"] = schedule
    return f"{points}-point schedule toggling every {step * 1000:.0f} ms", None


def _overflow(doc, rng):
    tank = rng.choice(["TK-310", "TK-320"])
    t = doc["reservoirs"][tank]
    top = t["height"] if "height" in t else t["diameter"]
    t["level"] = str(top)
    if rng.random() < 0.5:
        t["inflow"] = f"{rng.uniform(0.0, 80.0):.1f} L/s"
    return f"{tank} starts at its overflow level", None


KINDS = ("extreme", "unit", "vacuum", "profile", "injection", "schedule", "overflow")


def issue_case(seed: int, *, schedule_points: int = 200) -> Case:
    """The case of ``seed`` (kinds in turn, details drawn from the seed)."""
    import tomlkit

    rng = random.Random(seed)
    kind = KINDS[seed % len(KINDS)]
    doc = _doc()
    if kind == "schedule":
        label, must = _schedule(doc, rng, schedule_points)
    else:
        label, must = globals()[f"_{kind}"](doc, rng)
    return Case(f"seed{seed}-{kind}: {label}", tomlkit.dumps(doc), kind, must)

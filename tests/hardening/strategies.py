"""Hypothesis strategies for project files: valid systems of our own, and damaged ones.

:func:`valid_projects` draws small gravity systems (constant-level reservoirs and vertical
tanks, junctions, open discharges and vessels, lines in a tree so every junction reaches a
fixed head), with quantities written in assorted units. :func:`damaged_projects` draws a
valid project and then damages it with a value of the wrong kind at a random key.
"""

from __future__ import annotations

import string

from hypothesis import strategies as st

LENGTH_UNITS = (("m", 1.0), ("ft", 0.3048), ("km", 1000.0))
DIAMETER_UNITS = (("mm", 1e-3), ("in", 0.0254), ("m", 1.0))

ids = st.text(alphabet=string.ascii_uppercase + string.digits + "-_", min_size=1,
              max_size=8).filter(lambda s: s[0].isalpha())


def _q(value: float, unit: str) -> str:
    return f"{value:.6g} {unit}"


@st.composite
def quantity(draw, low: float, high: float, units):
    """A quantity string whose SI value lies in [low, high]."""
    unit, factor = draw(st.sampled_from(units))
    si = draw(st.floats(low, high, allow_nan=False, allow_infinity=False))
    return _q(si / factor, unit)


@st.composite
def valid_projects(draw) -> dict:
    n_res = draw(st.integers(1, 3))
    n_junc = draw(st.integers(0, 3))
    n_rec = draw(st.integers(0, 2))
    names = draw(st.lists(ids, min_size=n_res + n_junc + n_rec + 8, max_size=20,
                          unique_by=str.upper))
    res_ids = names[:n_res]
    junc_ids = names[n_res:n_res + n_junc]
    rec_ids = names[n_res + n_junc:n_res + n_junc + n_rec]
    line_pool = names[n_res + n_junc + n_rec:]
    data: dict = {
        "schema": 1,
        "project": {"title": draw(st.text(min_size=1, max_size=40).filter(str.strip)),
                    "units": draw(st.sampled_from(("SI", "US")))},
        "fluid": {"kind": "water", "temperature": _q(draw(st.floats(5, 80)), "degC")},
        "reservoirs": {},
    }
    for rid in res_ids:
        r = {"kind": draw(st.sampled_from(("constant_level", "tank"))),
             "bottom_elevation": draw(quantity(0, 40, LENGTH_UNITS[:2])),
             "level": draw(quantity(0.2, 5, LENGTH_UNITS[:2]))}
        if r["kind"] == "tank":
            r["shape"] = "vertical_cylinder"
            r["diameter"] = draw(quantity(0.5, 6, (("m", 1.0),)))
        data["reservoirs"][rid] = r
    if junc_ids:
        data["junctions"] = {j: {"elevation": draw(quantity(0, 30, LENGTH_UNITS[:2]))}
                             for j in junc_ids}
    if rec_ids:
        data["receivers"] = {}
        for rid in rec_ids:
            kind = draw(st.sampled_from(("open_discharge", "vessel")))
            rec = {"kind": kind, "elevation": draw(quantity(0, 20, LENGTH_UNITS[:2]))}
            if kind == "vessel":
                rec["pressure"] = _q(draw(st.floats(0, 200)), "kPa")
            data["receivers"][rid] = rec
    # A tree: each junction and receiver hangs from an earlier node, starting at reservoirs.
    placed = list(res_ids)
    lines = {}
    for k, node in enumerate(junc_ids + rec_ids):
        other = draw(st.sampled_from(placed))
        lid = line_pool[k] if k < len(line_pool) else f"L{k}"
        ends = (other, node) if draw(st.booleans()) or node in rec_ids else (node, other)
        lines[lid] = _line(draw, *ends)
        placed.append(node) if node in junc_ids else None
    if not lines:  # one reservoir alone still needs a line: add a second node
        if len(res_ids) >= 2:
            lines[line_pool[0]] = _line(draw, res_ids[0], res_ids[1])
        else:
            data["receivers"] = {"OUT": {"kind": "open_discharge", "elevation": "0 m"}}
            lines[line_pool[0]] = _line(draw, res_ids[0], "OUT")
    data["lines"] = lines
    if draw(st.booleans()):
        data["simulation"] = {"duration": _q(draw(st.floats(1, 60)), "s"),
                              "initial_state": draw(st.sampled_from(("steady", "at_rest")))}
    return data


def _line(draw, a: str, b: str) -> dict:
    line = {"from": a, "to": b, "length": draw(quantity(1, 500, LENGTH_UNITS)),
            "inner_diameter": draw(quantity(0.02, 0.5, DIAMETER_UNITS)),
            "roughness": _q(draw(st.floats(0.001, 0.5)), "mm")}
    if draw(st.booleans()):
        line["fittings"] = [{"k": round(draw(st.floats(0.1, 5)), 3), "label": "strainer"}]
    if draw(st.integers(0, 4)) == 0:
        line["valve"] = {"characteristic": draw(st.sampled_from(("linear", "equal_percentage",
                                                                 "quick_opening"))),
                         "k_open": round(draw(st.floats(0.1, 10)), 3),
                         "opening": round(draw(st.floats(0, 1)), 3)}
    return line


ODD = st.one_of(
    st.none(), st.booleans(), st.integers(), st.floats(),
    st.text(max_size=30), st.lists(st.integers(), max_size=3),
    st.dictionaries(st.text(max_size=5), st.integers(), max_size=2),
    st.builds(lambda n, u: f"{n} {u}", st.floats(), st.sampled_from(
        ("m", "mm", "kPa", "degC", "s", "L/s", "kg", "", "m m", "°C", "µm", "in^2"))),
)


def _paths(data, prefix=()):
    if isinstance(data, dict):
        for k, v in data.items():
            yield (*prefix, k)
            yield from _paths(v, (*prefix, k))
    elif isinstance(data, list):
        for i, v in enumerate(data):
            yield (*prefix, i)
            yield from _paths(v, (*prefix, i))


@st.composite
def damaged_projects(draw) -> tuple[dict, str]:
    data = draw(valid_projects())
    paths = list(_paths(data))
    path = draw(st.sampled_from(paths))
    parent = data
    for p in path[:-1]:
        parent = parent[p]
    value = draw(ODD)
    if value is None:
        del parent[path[-1]]
        label = f"deleted {'.'.join(map(str, path))}"
    else:
        parent[path[-1]] = value
        label = f"{'.'.join(map(str, path))} = {value!r}"
    return data, label


def to_toml(data: dict) -> str:
    import tomlkit

    return tomlkit.dumps(data)

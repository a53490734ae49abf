"""A mutation generator for project files: the demo projects, damaged in every way we know.

Each :class:`Case` is a name and a file text. :func:`mutation_cases` draws ``n`` cases from
a seeded random generator, so a failing case is reproduced from its name (which carries the
seed and the mutation) and the budget can be raised without changing the code.

Kinds of damage (the issue's list): deleted keys, wrong types, swapped units, negative and
zero values, NaN and infinity, huge and tiny magnitudes, duplicate and dangling ids, cycles
with no fixed head, unicode in ids, very long strings, deeply nested junk, files of several
megabytes, plus text-level damage (truncation, stray bytes, conflict markers, a byte-order
mark, control characters).
"""

from __future__ import annotations

import copy
import random
import re
import tomllib
from dataclasses import dataclass
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
DEMOS = sorted((ROOT / "projects").glob("*.toml"))

#: Units of every dimension the files use, to swap one for another.
UNITS = ("m", "mm", "in", "ft", "kPa", "bar", "psi", "barg", "bara", "degC", "degF", "K",
         "s", "min", "h", "L/s", "m3/h", "gpm", "kg/m3", "mPa*s", "cP", "GPa", "deg", "m2",
         "m3", "kg", "N", "W", "Hz", "%", "")
#: Replacement values of the wrong type or out of range.
ODD_VALUES = (0, -1, 1, 1.5, -0.0, float("nan"), float("inf"), float("-inf"), True, False,
              "", " ", "abc", "12", "nan m", "inf m", "-inf m", "NaN", "1e309 m", "0x10 m",
              [], [1, 2], {}, {"a": 1}, [{"x": "1 m"}], "1e-320 m", 10**30, -(10**30),
              2**63, 1e308, 5e-324)
#: Magnitudes to put in front of a quantity's unit.
MAGNITUDES = ("0", "-0", "-1", "-1e-9", "1e-300", "1e-30", "1e-12", "1e12", "1e30", "1e300",
              "9.9e307", "0.0000001", "123456789012345678901234567890")
#: Ids that stress the id rules and the display.
ODD_IDS = ("T\u00e9\u00df\u2603", "\U0001F4A7-tank", "\u05d0\u05d1\u05d2", "a\u200bb",
           "x" * 3000, "line with spaces", "dot.ted", "quote\"d", "tab\tid", "nul\x01id",
           "\u202eRTL", "", "  ", "from", "lines", "1", "-", "ÅÄÖ" * 50)


@dataclass(frozen=True)
class Case:
    name: str
    text: str


def load_demo(path: Path) -> dict:
    return tomllib.loads(path.read_text(encoding="utf-8"))


def dumps(data: dict) -> str:
    """Plain data -> TOML text (tomlkit writes NaN, infinity and any key)."""
    import tomlkit

    return tomlkit.dumps(data)


def leaf_paths(data, prefix=()):
    """Every key path in ``data`` (dict keys and list indices), leaves and branches."""
    out = []
    if isinstance(data, dict):
        for k, v in data.items():
            out.append((*prefix, k))
            out.extend(leaf_paths(v, (*prefix, k)))
    elif isinstance(data, list):
        for i, v in enumerate(data):
            out.append((*prefix, i))
            out.extend(leaf_paths(v, (*prefix, i)))
    return out


def _get(data, path):
    for p in path:
        data = data[p]
    return data


def _set(data, path, value):
    _get(data, path[:-1])[path[-1]] = value


def _delete(data, path):
    parent = _get(data, path[:-1])
    del parent[path[-1]]


def _quantity_paths(data):
    return [p for p in leaf_paths(data)
            if isinstance(_get(data, p), str) and re.match(r"^-?[\d.]+(e-?\d+)?\s+\S", _get(data, p))]


def _element_ids(data):
    return [(section, eid) for section in ("reservoirs", "junctions", "receivers", "lines")
            for eid in data.get(section, {})]


def _rename(data, section, old, new):
    table = data[section]
    data[section] = {(new if k == old else k): v for k, v in table.items()}
    for line in data.get("lines", {}).values():
        if isinstance(line, dict):
            for end in ("from", "to"):
                if line.get(end) == old:
                    line[end] = new


# --- data mutations: each takes (data, rng) and returns a label --------------------------

def m_delete_key(data, rng):
    path = rng.choice(leaf_paths(data))
    _delete(data, path)
    return f"delete {path}"


def m_wrong_type(data, rng):
    path = rng.choice(leaf_paths(data))
    value = copy.deepcopy(rng.choice(ODD_VALUES))
    _set(data, path, value)
    return f"set {path} = {value!r:.40}"


def m_swap_unit(data, rng):
    paths = _quantity_paths(data)
    path = rng.choice(paths)
    number = _get(data, path).split()[0]
    unit = rng.choice(UNITS)
    _set(data, path, f"{number} {unit}".strip())
    return f"unit {path} -> {unit!r}"


def m_magnitude(data, rng):
    paths = _quantity_paths(data)
    path = rng.choice(paths)
    unit = _get(data, path).split(None, 1)[1]
    mag = rng.choice(MAGNITUDES)
    _set(data, path, f"{mag} {unit}")
    return f"magnitude {path} -> {mag}"


def m_number_field(data, rng):
    paths = [p for p in leaf_paths(data) if isinstance(_get(data, p), (int, float))
             and not isinstance(_get(data, p), bool)]
    if not paths:
        return m_magnitude(data, rng)
    path = rng.choice(paths)
    value = rng.choice((0, -1, -0.5, 0.0, 1e-300, 1e300, float("nan"), float("inf"),
                        float("-inf"), 10**20, 2, 1.0000001, -(2**63)))
    _set(data, path, value)
    return f"number {path} -> {value!r}"


def m_duplicate_id(data, rng):
    ids = _element_ids(data)
    section, eid = rng.choice(ids)
    other = rng.choice([s for s in ("reservoirs", "junctions", "receivers", "lines") if s != section])
    data.setdefault(other, {})[eid] = copy.deepcopy(data[section][eid])
    return f"duplicate {eid} into {other}"


def m_dangling(data, rng):
    lines = list(data.get("lines", {}))
    lid = rng.choice(lines)
    end = rng.choice(("from", "to"))
    data["lines"][lid][end] = rng.choice(("NOWHERE", "", lid, "lines", "T\u00e9"))
    return f"dangling {lid}.{end}"


def m_no_fixed_head(data, rng):
    """A loop of junctions with no reservoir or receiver anywhere on it."""
    n = rng.randint(1, 4)
    js = [f"ZJ{i}" for i in range(n)]
    data.setdefault("junctions", {}).update({j: {"elevation": "5 m"} for j in js})
    for i in range(n):
        data.setdefault("lines", {})[f"ZL{i}"] = {
            "from": js[i], "to": js[(i + 1) % n], "length": "10 m",
            "inner_diameter": "50 mm", "roughness": "0.05 mm"}
    if rng.random() < 0.5:  # and sometimes no fixed head in the whole file
        data.pop("reservoirs", None)
        data.pop("receivers", None)
        data["lines"] = {k: v for k, v in data["lines"].items() if k.startswith("ZL")}
    return f"loop of {n} junctions with no fixed head"


def m_unicode_id(data, rng):
    section, eid = rng.choice(_element_ids(data))
    new = rng.choice(ODD_IDS)
    _rename(data, section, eid, new)
    return f"rename {eid} -> {new[:20]!r}"


def m_long_string(data, rng):
    paths = [p for p in leaf_paths(data) if isinstance(_get(data, p), str)]
    path = rng.choice(paths)
    n = rng.choice((1000, 20_000, 200_000))
    _set(data, path, rng.choice(("x", "\u00e9", "1", "m ")) * n)
    return f"long string {n} at {path}"


def m_nested_junk(data, rng):
    depth = rng.choice((10, 40, 120))
    junk: object = "bottom"
    for i in range(depth):
        junk = {"k": junk} if i % 2 else [junk]
    where = rng.choice((("junk",), ("project", "junk"), ("lines", next(iter(data["lines"])), "junk"),
                        ("fluid", "temperature")))
    try:
        _set(data, where, junk)
    except (KeyError, TypeError):
        data["junk"] = junk
    return f"nested junk depth {depth} at {where}"


def m_empty_sections(data, rng):
    section = rng.choice(("reservoirs", "junctions", "receivers", "lines", "fluid", "project",
                          "simulation"))
    data[section] = rng.choice(({}, [], "none", 0))
    return f"section {section} emptied"


def m_many_lines(data, rng):
    """Several megabytes of valid-looking elements (a long chain of junctions)."""
    n = rng.choice((2000, 6000))
    res = next(iter(data.get("reservoirs", {})), None)
    prev = res
    junctions = data.setdefault("junctions", {})
    lines = data.setdefault("lines", {})
    pad = "pipe rack section " * 20
    for i in range(n):
        j = f"MJ{i}"
        junctions[j] = {"elevation": f"{10 - i * 1e-3:.4f} m", "description": pad}
        if prev is not None:
            lines[f"ML{i}"] = {"from": prev, "to": j, "length": "5 m",
                               "inner_diameter": "100 mm", "roughness": "0.045 mm",
                               "description": pad}
        prev = j
    return f"{n} extra junctions and lines"


DATA_MUTATIONS = (m_delete_key, m_wrong_type, m_swap_unit, m_magnitude, m_number_field,
                  m_duplicate_id, m_dangling, m_no_fixed_head, m_unicode_id, m_long_string,
                  m_nested_junk, m_empty_sections)
HEAVY_MUTATIONS = (m_many_lines,)


# --- text mutations: (text, rng) -> (text, label) ----------------------------------------

def t_truncate(text, rng):
    cut = rng.randrange(len(text))
    return text[:cut], f"truncated at {cut}"


def t_stray_bytes(text, rng):
    chars = list(text)
    for _ in range(rng.randint(1, 5)):
        pos = rng.randrange(len(chars))
        chars.insert(pos, rng.choice(("=", "[", "]", "\"", "'", "{", "}", ",", "\n", "#", "\x00",
                                      "\x7f", "\ufeff", "\\", "\u2028", "\r")))
    return "".join(chars), "stray characters"


def t_conflict(text, rng):
    lines = text.splitlines()
    i = rng.randrange(len(lines))
    block = ["<<<<<<< HEAD", lines[i], "=======", lines[i].replace("m", "mm", 1), ">>>>>>> branch"]
    return "\n".join(lines[:i] + block + lines[i + 1:]) + "\n", f"conflict markers at line {i + 1}"


def t_duplicate_table(text, rng):
    headers = [m.group(0) for m in re.finditer(r"^\[[^\]\n]+\]$", text, re.M)]
    header = rng.choice(headers)
    return text + f"\n{header}\nlength = \"1 m\"\n", f"table {header} twice"


def t_deep_arrays(text, rng):
    depth = rng.choice((100, 1000, 5000))
    return text + "\njunk = " + "[" * depth + "]" * depth + "\n", f"array nesting depth {depth}"


def t_megabytes(text, rng):
    size = rng.choice((2, 5))
    comment = ("# " + "filler " * 14 + "\n") * (size * 1024 * 1024 // 100)
    return comment + text, f"{size} MB of comments in front"


def t_bom_and_crlf(text, rng):
    return "\ufeff" + text.replace("\n", "\r\n"), "byte-order mark and CRLF"


TEXT_MUTATIONS = (t_truncate, t_stray_bytes, t_conflict, t_duplicate_table, t_deep_arrays,
                  t_bom_and_crlf)
HEAVY_TEXT_MUTATIONS = (t_megabytes,)


def mutate(seed: int, *, heavy: bool = False) -> Case:
    """One damaged project, reproducible from ``seed``."""
    rng = random.Random(seed)
    demo = rng.choice(DEMOS)
    data = load_demo(demo)
    labels = []
    if heavy:
        choice = rng.choice(HEAVY_MUTATIONS + HEAVY_TEXT_MUTATIONS)
        if choice in HEAVY_MUTATIONS:
            labels.append(choice(data, rng))
            text = dumps(data)
        else:
            text, label = choice(dumps(data), rng)
            labels.append(label)
    elif rng.random() < 0.25:
        text, label = rng.choice(TEXT_MUTATIONS)(demo.read_text(encoding="utf-8"), rng)
        labels.append(label)
    else:
        for _ in range(rng.choice((1, 1, 1, 2, 3))):
            mutation = rng.choice(DATA_MUTATIONS)
            try:
                labels.append(mutation(data, rng))
            except (KeyError, TypeError, IndexError, ValueError, AttributeError, StopIteration):
                labels.append(f"({mutation.__name__} did not apply)")  # earlier damage
        text = dumps(data)
    return Case(f"seed{seed}-{demo.stem}: " + "; ".join(labels), text)


def mutation_cases(n: int, *, start: int = 0, heavy: bool = False) -> list[Case]:
    return [mutate(seed, heavy=heavy) for seed in range(start, start + n)]

"""The element tables (reservoirs, junctions, receivers, lines) keyed by id: ids checked for
form and uniqueness, and the junctions and receivers, which are one table each."""

from __future__ import annotations

from workbench.core import model as m
from workbench.project.schema import ELEMENT_SECTIONS, SECTIONS
from workbench.project.validate.checker import ID_PATTERN, Checker, field_spec

__all__ = ["SECTION_WORD", "check_junction", "check_receiver", "element_tables"]

SECTION_WORD = {
    "reservoirs": "reservoir",
    "junctions": "junction",
    "receivers": "receiver",
    "lines": "line",
}


def element_tables(c: Checker, data: dict) -> dict[str, dict[str, dict]]:
    """Each element section's tables, with ids checked for form and uniqueness."""
    out: dict[str, dict[str, dict]] = {}
    seen: dict[str, str] = {}
    for section in ELEMENT_SECTIONS:
        raw = data.get(section, {})
        tables = c.table(raw, section, f"a table of {section} keyed by id") or {}
        out[section] = {}
        for element_id, table in tables.items():
            key = f"{section}.{element_id}"
            if not ID_PATTERN.match(element_id):
                c.add(key, f"id '{element_id}' is not valid: use letters, digits, '_' and '-', "
                      "starting with a letter or digit")
            if element_id in seen:
                c.add(key, f"id '{element_id}' is also used by {seen[element_id]}; ids must be "
                      "unique across reservoirs, junctions, receivers and lines")
            else:
                seen[element_id] = f"{section}.{element_id}"
            table = c.table(table, key, f"a table [{key}] of the {SECTION_WORD[section]}'s keys")
            if table is not None:
                out[section][element_id] = table
    return out



def check_junction(c: Checker, jid: str, t: dict) -> m.Junction | None:
    path = f"junctions.{jid}"
    c.known_keys(t, SECTIONS["junctions"], path)
    c.text(t, "description", path)
    elevation = c.quantity(t, "elevation", "elevation", path)
    return None if elevation is None else m.Junction(jid, elevation)


def check_receiver(c: Checker, rid: str, t: dict) -> m.Receiver | None:
    path = f"receivers.{rid}"
    c.known_keys(t, SECTIONS["receivers"], path)
    c.text(t, "description", path)
    kind = c.choice(t, field_spec("receivers", "kind"), path)
    elevation = c.quantity(t, "elevation", "elevation", path)
    pressure = c.quantity(t, "pressure", "pressure", path)
    if kind == "vessel" and "pressure" not in t:
        c.add(f"{path}.pressure", "missing required key 'pressure' for kind = \"vessel\", "
              f"e.g. pressure = \"{c.example('50 kPa', 'pressure')}\"")
        return None
    if kind == "open_discharge" and "pressure" in t:
        c.add(f"{path}.pressure", "'pressure' applies only to kind = \"vessel\" (an open "
              "discharge is at atmospheric pressure)")
        return None
    if kind is None or elevation is None or (kind == "vessel" and pressure is None):
        return None
    return m.Receiver(rid, kind, elevation, pressure if kind == "vessel" else 0.0)


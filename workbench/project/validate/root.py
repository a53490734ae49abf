"""The file's top level: the schema version, the known root tables, and ``[project]`` (title,
display units, and the site elevation that sets the atmosphere every gauge pressure is read
against)."""

from __future__ import annotations

from workbench.project.schema import ROOT_KEYS, SCHEMA_VERSION, SECTIONS
from workbench.project.validate.checker import Checker, describe, field_spec

__all__ = ["check_project", "check_root"]


def check_root(c: Checker, data: dict) -> bool:
    c.known_keys(data, ROOT_KEYS, "")
    if "schema" in data:
        version = data["schema"]
        if isinstance(version, bool) or not isinstance(version, int):
            c.add("schema", f"expected the whole number {SCHEMA_VERSION}, got {describe(version)}")
            return False
        if version != SCHEMA_VERSION:
            c.add("schema", f"schema {version} is not supported: this version of workbench "
                  f"reads schema {SCHEMA_VERSION}")
            return False
    return True


def check_project(c: Checker, data: dict) -> tuple[str, str, float]:
    section = c.table(data.get("project", {}), "project") or {}
    c.known_keys(section, SECTIONS["project"], "project")
    title = c.text(section, "title", "project", default="") or ""
    if "title" in section and isinstance(section["title"], str) and not title.strip():
        c.add("project.title", "the title must not be empty")
    c.text(section, "description", "project")
    units = c.choice(section, field_spec("project", "units"), "project") or "SI"
    site = c.quantity(section, "site_elevation", "elevation", "project")
    site = 0.0 if site is None else site
    from workbench.core.atmosphere import ELEVATION_RANGE, AtmosphereError, atmospheric_pressure

    try:
        c.atmosphere = atmospheric_pressure(site)
    except (AtmosphereError, ValueError) as exc:
        lo, hi = ELEVATION_RANGE
        words = str(exc) if not isinstance(exc, AtmosphereError) else (
            f"site elevation {section.get('site_elevation')!r} is outside the standard "
            f"atmosphere's troposphere ({c.shown(lo, 'elevation')} to "
            f"{c.shown(hi, 'elevation')} above sea level)")
        c.add("project.site_elevation", words)
    return title, units, site


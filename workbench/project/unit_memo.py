"""pint's answers kept between runs, so a command that reads and writes known quantities
starts without pint.

Importing pint and building its registry costs about 0.15 s of CPU (from pint's own cache
of its definition files; 0.3 s or more without it), a fifth of a ``workbench solve`` on a
demo, while a project holds a few dozen quantity texts that are the same from one run to
the next. The memo keeps, in one small JSON file in the user's cache folder:

* each unit pint has read for a kind whose conversion is a plain factor:
  ``(kind, unit text) -> (factor to SI, pressure reference)``, so a new number with a known
  unit (an edited value) needs no pint either: pint's conversion is ``value * factor``
  too, the same float;
* each quantity text pint has read with a unit that is not a plain factor (an offset:
  degC, degF): ``(kind, text) -> (SI value, pressure reference)``;
* each conversion factor from an SI unit to a display unit that pint found to be a plain
  factor (``Quantity(v, si).to(unit)`` is then ``v * factor`` in pint too, the same float).

Texts that were refused are not kept: their message is made afresh.

The file is valid only for the pint installation and the reading rules it was made with:
its key names pint's location and installed version and a hash of
:mod:`workbench.project.units`' source, and the file's name is a hash of the key. A file
with another key inside, or a damaged one, and the memo starts empty; entries of the wrong type are passed over. It is written once, at the end of
a run that added to it, through a temporary file and an atomic rename (two processes
writing at once lose one's additions, never the file). It stops growing at
:data:`MAX_ENTRIES` entries. ``WORKBENCH_CACHE_DIR=""`` turns it off with pint's cache.
"""

from __future__ import annotations

import atexit
import hashlib
import importlib.util
import json
import math
import os
from pathlib import Path

__all__ = ["MAX_ENTRIES", "UnitMemo", "memo_key", "memo_path"]

#: Largest number of kept texts plus factors; beyond it nothing new is kept.
MAX_ENTRIES = 4000


def memo_path(cache_folder: Path, key: str) -> Path:
    """The memo file for ``key`` in the cache folder: one per key, so two installations
    (two virtual environments, two versions) sharing a cache folder keep their own."""
    return cache_folder / f"unit-memo-{hashlib.sha256(key.encode()).hexdigest()[:16]}.json"


def memo_key(rules_source: Path) -> str:
    """What the memo's answers depend on: pint's installation (its location, the installed
    version's metadata folder, its ``__init__.py`` size and time) and the reading rules (a
    hash of ``rules_source``). Empty when pint is not installed."""
    spec = importlib.util.find_spec("pint")
    if spec is None or not spec.origin:
        return ""
    origin = Path(spec.origin)
    try:
        stat = origin.stat()
        site = origin.parent.parent
        dist = sorted(n for n in os.listdir(site)
                      if n.lower().startswith("pint-") and n.endswith(".dist-info"))
        rules = hashlib.sha256(rules_source.read_bytes()).hexdigest()[:16]
    except OSError:
        return ""
    return f"{origin}|{','.join(dist)}|{stat.st_size}|{stat.st_mtime_ns}|{rules}"


class UnitMemo:
    """The memo of one process: read from ``path`` on creation, written back at exit if
    anything was added. ``path=None`` or an empty ``key`` keeps nothing."""

    def __init__(self, path: Path | None, key: str) -> None:
        self.path = path if key else None
        self.key = key
        self._parsed: dict[str, object] = {}
        self._units: dict[str, object] = {}
        self._factors: dict[str, object] = {}
        self._dirty = False
        if self.path is not None:
            self._read()

    def _read(self) -> None:
        try:
            data = json.loads(self.path.read_text(encoding="utf-8"))
        except (OSError, ValueError):
            return
        if isinstance(data, dict) and data.get("key") == self.key and all(
                isinstance(data.get(name), dict) for name in ("parsed", "units", "factors")):
            self._parsed, self._units, self._factors = data["parsed"], data["units"], data["factors"]

    def parsed(self, kind: str, text: str) -> tuple[float, str | None] | None:
        """The kept reading of ``text`` as a ``kind``: (SI value, reference), or ``None``."""
        return _pair(self._parsed.get(f"{kind}\t{text}"))

    def unit(self, kind: str, unit_text: str) -> tuple[float, str | None] | None:
        """The kept factor to SI of ``unit_text`` as a ``kind``, and its reference."""
        return _pair(self._units.get(f"{kind}\t{unit_text}"))

    def factor(self, si_unit: str, unit: str) -> float | None:
        """The kept factor from ``si_unit`` to ``unit``, or ``None``."""
        entry = self._factors.get(f"{si_unit}\t{unit}")
        return entry if type(entry) is float and math.isfinite(entry) and entry > 0.0 else None

    def keep_parsed(self, kind: str, text: str, value: float, reference: str | None) -> None:
        self._keep(self._parsed, f"{kind}\t{text}", [float(value), reference])

    def keep_unit(self, kind: str, unit_text: str, factor: float, reference: str | None) -> None:
        self._keep(self._units, f"{kind}\t{unit_text}", [float(factor), reference])

    def keep_factor(self, si_unit: str, unit: str, factor: float) -> None:
        self._keep(self._factors, f"{si_unit}\t{unit}", float(factor))

    def _keep(self, table: dict, key: str, value) -> None:
        if self.path is None or len(self._parsed) + len(self._units) + len(self._factors) >= MAX_ENTRIES:
            return
        table[key] = value
        if not self._dirty:
            self._dirty = True
            atexit.register(self.save)

    def save(self) -> None:
        """Write the memo if it grew; a folder that cannot be written means no memo."""
        if self.path is None or not self._dirty:
            return
        self._dirty = False
        try:  # at exit a worker thread may still be adding (RuntimeError); a value that is
            # not finite (ValueError) is never written
            text = json.dumps({"key": self.key, "parsed": dict(self._parsed),
                               "units": dict(self._units), "factors": dict(self._factors)},
                              ensure_ascii=False, allow_nan=False, separators=(",", ":"))
        except (RuntimeError, ValueError):
            return
        tmp = self.path.with_name(f".{self.path.name}.{os.getpid()}.tmp")
        try:
            self.path.parent.mkdir(parents=True, exist_ok=True)
            tmp.write_text(text, encoding="utf-8")
            os.replace(tmp, self.path)
        except OSError:
            try:
                tmp.unlink()
            except OSError:
                pass


def _pair(entry) -> tuple[float, str | None] | None:
    """A kept ``[float, reference]``, or ``None`` for anything else."""
    if (isinstance(entry, list) and len(entry) == 2 and type(entry[0]) is float
            and math.isfinite(entry[0]) and entry[1] in (None, "gauge", "absolute")):
        return entry[0], entry[1]
    return None

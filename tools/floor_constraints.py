"""Print pip constraints that pin every dependency to the floor pyproject.toml declares.

``python tools/floor_constraints.py [EXTRA ...] > floors.txt`` then
``pip install -c floors.txt -e '.[EXTRA]'`` installs the lowest versions the project says it
works with; ``.ci/run`` does this in a second environment and runs the smoke tests there, so
a floor that is not true fails CI.
"""

from __future__ import annotations

import re
import sys
import tomllib
from pathlib import Path

PYPROJECT = Path(__file__).resolve().parents[1] / "pyproject.toml"
FLOOR = re.compile(r"^\s*([A-Za-z0-9_.\-]+)\s*(?:\[[^\]]*\])?\s*>=\s*([0-9][^,;\s]*)")


def floors(extras: list[str]) -> list[str]:
    """``name==version`` for each requirement with a ``>=`` floor, in declaration order."""
    project = tomllib.loads(PYPROJECT.read_text(encoding="utf-8"))["project"]
    requirements = list(project["dependencies"])
    for extra in extras:
        requirements += project["optional-dependencies"][extra]
    pins = []
    for requirement in requirements:
        match = FLOOR.match(requirement)
        if match is None:
            raise SystemExit(f"{PYPROJECT}: {requirement!r} has no '>=' floor")
        pins.append(f"{match.group(1)}=={match.group(2)}")
    return pins


if __name__ == "__main__":
    print("\n".join(floors(sys.argv[1:])))

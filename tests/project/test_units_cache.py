"""pint's registry cache in the user's cache folder: used when it can be, never in the way.

Conversion checks are exact by definition: 1 ft = 0.3048 m (international yard and pound
agreement, 1959) so 1 ft^3/s = 0.028316846592 m^3/s; 1 US gal = 231 in^3 = 3.785411784 L.
"""

from __future__ import annotations

from pathlib import Path

import pint
import pytest

from workbench.project.units import get_registry, registry_cache_folder

build_registry = get_registry.__wrapped__  # a fresh registry each call (get_registry keeps one)


def _converts(ureg) -> None:
    assert ureg.Quantity(1.0, "cfs").to("m**3/s").magnitude == pytest.approx(0.028316846592, rel=1e-12)
    assert ureg.Quantity(60.0, "gpm").to("L/s").magnitude == pytest.approx(3.785411784, rel=1e-12)


def test_the_cache_folder_is_per_pint_version_under_the_users_cache_folder(tmp_path, monkeypatch):
    monkeypatch.delenv("WORKBENCH_CACHE_DIR", raising=False)
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path))
    assert registry_cache_folder("9.8.7") == tmp_path / "gravity-workbench" / "pint-9.8.7"
    assert (tmp_path / "gravity-workbench" / "pint-9.8.7").is_dir()


def test_a_registry_built_twice_reads_pints_cache_the_second_time(tmp_path, monkeypatch):
    monkeypatch.setenv("WORKBENCH_CACHE_DIR", str(tmp_path))
    _converts(build_registry())
    folder = tmp_path / f"pint-{pint.__version__}"
    written = sorted(folder.iterdir())
    assert written, "pint wrote no cache"
    _converts(build_registry())
    assert sorted(folder.iterdir()) == written


def test_a_cache_folder_that_cannot_be_made_means_no_cache_and_a_working_registry(tmp_path, monkeypatch):
    blocker = tmp_path / "a file"
    blocker.write_text("not a folder")
    monkeypatch.setenv("WORKBENCH_CACHE_DIR", str(blocker / "cache"))
    assert registry_cache_folder(pint.__version__) is None
    _converts(build_registry())


def test_a_damaged_cache_is_passed_over(tmp_path, monkeypatch):
    monkeypatch.setenv("WORKBENCH_CACHE_DIR", str(tmp_path))
    build_registry()
    for path in Path(tmp_path, f"pint-{pint.__version__}").iterdir():
        path.write_bytes(b"\x80\x04 half a pickle")
    _converts(build_registry())


def test_an_empty_cache_setting_turns_the_cache_off(monkeypatch):
    monkeypatch.setenv("WORKBENCH_CACHE_DIR", "")
    assert registry_cache_folder(pint.__version__) is None

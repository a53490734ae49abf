"""CPU time and whole-screen layouts per key in the workbench app at 80x24.

The app is built as the app tests build it (``tests/app/conftest.py`` ``make``: forms
built on first visit, ``prebuild_forms=False``) around a copy of a demo project and driven
headless with Textual's pilot. For each action the script prints the CPU seconds of this
process (``time.process_time``: the app's thread, its solve workers and the pilot) and
the number of whole-screen layouts and of screen updates (frames drawn), counted by
wrapping the screen's methods here (the app itself is not changed). Each action waits until the app is idle
again (and, where it starts a solve, until the steady result is back).

Actions: start to the first steady result; Down in the element list onto each element
(the first element of a kind builds its form); Down through a line form; a typed
character in a field; Enter to apply a value and get the new result; the F-key views.

    .venv/bin/python tests/benchmarks/bench_app_keys.py [--runs 3] [projects/X.toml]

The machine may be shared: CPU figures are the median of ``--runs`` runs; layouts are
counts, the same on every run.
"""

from __future__ import annotations

import argparse
import asyncio
import os
import shutil
import statistics
import sys
import tempfile
import time
from collections import defaultdict
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))
#: The line whose form is walked and edited (the transfer demo's one line).
LINE = "lines:310-PW-12"


class Meter:
    """CPU seconds and layouts per named action, over several runs."""

    def __init__(self) -> None:
        self.cpu: dict[str, list[float]] = defaultdict(list)
        self.layouts: dict[str, list[int]] = defaultdict(list)
        self.frames: dict[str, list[int]] = defaultdict(list)
        self.count = 0
        self.frame_count = 0
        self._start = (0.0, 0, 0)

    def begin(self) -> None:
        self._start = (time.process_time(), self.count, self.frame_count)

    def end(self, name: str) -> None:
        cpu, count, frames = self._start
        self.cpu[name].append(time.process_time() - cpu)
        self.layouts[name].append(self.count - count)
        self.frames[name].append(self.frame_count - frames)

    def report(self) -> None:
        print(f"{'action':44} {'CPU s':>7} {'min':>7} {'layouts':>8} {'updates':>8}")
        for name, values in self.cpu.items():
            layouts = self.layouts[name]
            print(f"{name:44} {statistics.median(values):7.3f} {min(values):7.3f} "
                  f"{statistics.median(layouts):8.1f} {statistics.median(self.frames[name]):8.1f}")


def count_layouts(meter: Meter) -> None:
    """Count whole-screen layouts and screen updates (a frame drawn: a repaint of what
    changed, an animation step) by wrapping the screen's own methods."""
    from textual.screen import Screen

    real = Screen._refresh_layout
    real_update = Screen._compositor_refresh

    def counted(self, *args, **kwargs):
        meter.count += 1
        return real(self, *args, **kwargs)

    def counted_update(self, *args, **kwargs):
        meter.frame_count += 1
        return real_update(self, *args, **kwargs)

    Screen._refresh_layout = counted
    Screen._compositor_refresh = counted_update


async def idle(pilot) -> None:
    await pilot.pause()
    await pilot.app.workers.wait_for_complete()
    await pilot.pause()


async def one_run(meter: Meter, project: Path) -> None:
    from tests.app.conftest import make, settle
    from workbench.app.panes.elements import ElementList

    folder = Path(tempfile.mkdtemp())
    os.environ["WORKBENCH_STATE_DIR"] = str(folder / "state")
    path = folder / project.name
    shutil.copy(project, path)
    meter.begin()
    app = make(path)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        meter.end("start to first result")
        print(f"  widgets on screen after start: {len(list(app.screen.walk_children()))}")
        elements = app.screen.query_one(ElementList)
        elements.focus()
        await pilot.press("home")
        await idle(pilot)
        seen: set[str] = set()
        for _ in range(elements.option_count - 1):
            meter.begin()
            await pilot.press("down")
            await idle(pilot)
            entry = elements.entry
            kind = entry.section if entry else "?"
            meter.end(f"list Down to {kind}" + ("" if kind in seen else " (first)"))
            seen.add(kind)
        print(f"  widgets on screen after the list: {len(list(app.screen.walk_children()))}")
        await line_form(meter, pilot, elements)
        await views(meter, pilot)


async def line_form(meter: Meter, pilot, elements) -> None:
    """Down through the line form, type, apply with Enter (waits for the new result)."""
    from tests.app.conftest import choose_entry, field_input, settle

    await choose_entry(pilot, LINE)
    await pilot.press("enter")
    await idle(pilot)
    for _ in range(8):
        meter.begin()
        await pilot.press("down")
        await idle(pilot)
        meter.end("Down in a line form")
    for _ in range(3):  # what a key costs the pilot and the app when nothing answers it
        meter.begin()
        await pilot.press("f24")
        await idle(pilot)
        meter.end("a key nothing answers (the floor)")
    editor = field_input(pilot.app, LINE.replace(":", ".") + ".length")
    editor.focus()
    await idle(pilot)
    await pilot.press("end")
    await idle(pilot)
    original = editor.value
    for char in "0.5":
        meter.begin()
        await pilot.press(char)
        await idle(pilot)
        meter.end("typed character in a field")
    for _ in range(3):
        meter.begin()
        await pilot.press("backspace")
        await idle(pilot)
        meter.end("Backspace in a field")
    await pilot.press(*"1")
    await idle(pilot)
    meter.begin()
    await pilot.press("enter")
    await settle(pilot)
    meter.end("Enter applies a value, new result")
    editor.value = original


async def views(meter: Meter, pilot) -> None:
    from tests.app.conftest import settle

    for key, name in (("f3", "Flows"), ("f4", "Grade line"), ("f5", "Run"), ("f6", "Events"),
                      ("f10", "Surge"), ("f2", "System")):
        meter.begin()
        await pilot.press(key)
        await settle(pilot)
        meter.end(f"{key.upper()} {name} view")


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--runs", type=int, default=3)
    parser.add_argument("project", nargs="?",
                        default=str(ROOT / "projects" / "fellgate_process_water_transfer.toml"))
    args = parser.parse_args()
    meter = Meter()
    count_layouts(meter)
    for run in range(args.runs):
        print(f"run {run + 1} of {args.runs}")
        asyncio.run(one_run(meter, Path(args.project).resolve()))
    meter.report()


if __name__ == "__main__":
    main()

"""CPU time to open the calibration view (F11) in the workbench, at 80x24, headless.

For a demo project with a site test, the app is built as ``workbench open`` builds it and
left to settle (first steady result shown); then F11 is pressed several times (Esc closes
the view between). For each opening the script records the process CPU time (user +
system, every thread) from the key to the view's first field holding the focus (keys typed
from then on land in it) and to the whole view, key footer included, being drawn. The
first opening also loads the view's code and styles. The machine may be shared: CPU, not
wall time, is the figure to read.

    .venv/bin/python tests/benchmarks/bench_calibrate_open.py [--runs 5] [projects/X.toml]
"""

from __future__ import annotations

import argparse
import asyncio
import statistics
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "projects" / "fellgate_wash_tank_drain_test.toml"


async def _openings(path: Path, runs: int) -> list[tuple[float, float]]:
    from textual.widgets import Footer

    from workbench.app.factory import make_app
    from workbench.app.screens.calibrate import CalibrateScreen
    from workbench.project.document import load_project

    app = make_app(load_project(path), path=path, prebuild_forms=False)
    out = []
    async with app.run_test(size=(80, 24)) as pilot:
        while app.steady_status not in {"fresh", "failed"}:
            await pilot.pause(0.05)
        await app.workers.wait_for_complete()
        await pilot.pause(0.2)
        for _ in range(runs):
            start = time.process_time()
            await pilot.press("f11")
            ready = None
            while True:
                screen = app.screen
                if isinstance(screen, CalibrateScreen) and ready is None and \
                        getattr(app.focused, "id", None) == "calib-fit":
                    ready = time.process_time() - start
                if ready is not None and screen.query(Footer):
                    break
                await asyncio.sleep(0)
            await pilot.pause()  # until the footer's keys are drawn too
            await pilot.pause()
            out.append((ready, time.process_time() - start))
            await pilot.press("escape")
            await pilot.pause(0.2)
    return out


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("project", nargs="?", type=Path, default=DEMO)
    parser.add_argument("--runs", type=int, default=5)
    args = parser.parse_args()
    found = asyncio.run(_openings(args.project, args.runs))
    first, rest = found[0], found[1:] or found
    print(f"{args.project.name}: F11 to the view, CPU [s]")
    print(f"  first opening: field focused {first[0]:.3f}, whole view {first[1]:.3f}")
    print(f"  later (median of {len(rest)}): field focused "
          f"{statistics.median(r[0] for r in rest):.3f}, "
          f"whole view {statistics.median(r[1] for r in rest):.3f}")


if __name__ == "__main__":
    main()

"""Reading and solving the project in a second process while the app starts.

``workbench open FILE`` spends most of a second importing Textual and painting its first
frame, all on one core; reading, validating and solving the file takes about as long
again (the units, property and solver libraries load on the way). A Python thread cannot
overlap the two (both are interpreter work under one lock), so on a machine with a second
core the CLI starts this module as a child process before it imports Textual. The child
loads the project and solves it exactly as the app's workers do (:mod:`workbench.app.jobs`)
and writes both, pickled, to its stdout; the app's load worker reads them once the first
frame is up, and the first result is on screen about when ``workbench solve`` would have
printed it.

Anything that goes wrong on this path (no second core, a child that cannot start, a file
that does not load, a solve that fails, a child that dies or answers something unreadable)
makes the app do the work itself as it would without the child, so every message,
recovery-copy offer and exit status stays the app's own. The child never writes to the
terminal (stdin and stderr go to the null device).

Child side: ``python -m workbench.app.solve_ahead PROJECT`` (no Textual is imported).
"""

from __future__ import annotations

import os
import pickle
import subprocess
import sys
from pathlib import Path
from typing import Any

#: The child's answer, a pickled tuple, starts with this tag (anything else is refused).
TAG = "workbench-solve-ahead-1"

#: The modules that unpickling the answer imports: imported while the child works (the
#: app is idle then), so that reading the answer costs only the unpickling itself.
ANSWER_NEEDS = ("numpy", "workbench.core.model", "workbench.core.network",
                "workbench.core.checks", "workbench.project.load")


def second_core() -> bool:
    """True when this process may run on more than one core (else the child only competes)."""
    try:
        return len(os.sched_getaffinity(0)) > 1
    except (AttributeError, OSError):  # not on Linux
        return (os.cpu_count() or 1) > 1


class SolveAhead:
    """A child process loading and solving one project file (see the module docstring)."""

    def __init__(self, path: Path, process: subprocess.Popen) -> None:
        self.path = path
        self.process = process
        self._reading = False

    @classmethod
    def start(cls, path: Path) -> SolveAhead | None:
        """Start the child for ``path``, or ``None`` when it would not help or cannot start."""
        if not second_core():
            return None
        try:
            # -P: like the ``workbench`` script, never a package from the working folder
            process = subprocess.Popen(
                [sys.executable, "-P", "-m", "workbench.app.solve_ahead", os.fspath(path)],
                stdin=subprocess.DEVNULL, stdout=subprocess.PIPE, stderr=subprocess.DEVNULL,
            )
        except (OSError, ValueError):
            return None
        return cls(Path(path), process)

    def take(self) -> tuple[Any, Any] | None:
        """Wait for the child: ``(project, steady result or None)``, or ``None`` when the
        app must load the file itself. Blocks (call it from a worker thread)."""
        import importlib

        for name in ANSWER_NEEDS:
            try:
                importlib.import_module(name)
            except ImportError:  # only a head start: unpickling imports what it needs
                pass
        self._reading = True
        try:
            out, _ = self.process.communicate()
        except Exception:  # noqa: BLE001 - stopped meanwhile (the app is closing), or broken
            return None
        finally:
            self._reading = False
        if self.process.returncode != 0 or not out:
            return None
        try:
            tag, project, steady = pickle.loads(out)
        except Exception:  # noqa: BLE001 - an unreadable answer: load in-process instead
            return None
        if tag != TAG or Path(getattr(project, "path", "")) != self.path:
            return None
        return project, steady

    def stop(self) -> None:
        """End the child if it is still running (the app is closing); :meth:`take`, if
        waiting, then returns ``None``."""
        if self.process.poll() is None:
            self.process.kill()
        if not self._reading:  # nobody else reaps it
            try:
                self.process.communicate(timeout=5)
            except (OSError, ValueError, subprocess.TimeoutExpired):
                pass


def answer(path: Path) -> bytes:
    """The child's work: the project and its steady result, pickled (the result is
    ``None`` when the solve raises: the app's own steady worker then solves again and
    reports it; a solve that ends without a solution is a result like any other).

    Raises whatever loading raises (the parent then loads the file itself and reports it).
    """
    from workbench.app import jobs

    project = jobs.load(path)
    try:
        steady = jobs.solve(project.system)
    except Exception:  # noqa: BLE001 - reported by the app's own steady worker
        steady = None
    return pickle.dumps((TAG, project, steady), protocol=pickle.HIGHEST_PROTOCOL)


def main(argv: list[str]) -> int:
    import warnings

    warnings.simplefilter("ignore")  # nobody reads the child's stderr
    try:
        data = answer(Path(argv[0]))
    except BaseException:  # noqa: BLE001 - the parent loads the file itself and says why
        return 1
    try:
        sys.stdout.buffer.write(data)
        sys.stdout.buffer.flush()
    except (OSError, ValueError):  # the app went away
        return 1
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))

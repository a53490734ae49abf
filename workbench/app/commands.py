"""The command palette's own commands, grouped by a first word (``element:``, ``view:`` ...)."""

from __future__ import annotations

from functools import partial

from textual.command import DiscoveryHit, Hit, Hits, Provider

#: (name, what it does, action string run on the app). The first word groups them.
PALETTE: tuple[tuple[str, str, str], ...] = (
    ("file: save", "write the project file (keeps comments)", "save"),
    ("file: save as…", "write the project to another file", "save_as"),
    ("file: open…", "open another project file", "open"),
    ("file: quit", "leave the workbench", "quit"),
    ("edit: undo", "step back one edit", "undo"),
    ("edit: redo", "step forward one edit", "redo"),
    ("element: add reservoir", "a constant-level reservoir or a tank", "screen.add('reservoirs')"),
    ("element: add junction", "a point where lines meet", "screen.add('junctions')"),
    ("element: add receiver", "open discharge or a closed vessel", "screen.add('receivers')"),
    ("element: add line", "a pipe run between two nodes", "screen.add('lines')"),
    ("element: duplicate", "copy the chosen element under a new id", "screen.duplicate"),
    ("element: rename", "give the chosen element a new id", "screen.rename"),
    ("element: delete", "remove the chosen element (asks first)", "screen.delete"),
    ("view: system", "elements and their fields", "view('system')"),
    ("view: flows", "steady flows, heads and findings", "view('flows')"),
    ("view: grade line", "pipe elevation, grade line and vapour limit of a line", "view('grade')"),
    ("view: run", "simulation progress and trend plots", "view('run')"),
    ("view: events", "simulation events and the surge summary", "view('events')"),
    ("view: surge", "elastic surge envelope and valve pressure trace", "view('surge')"),
    ("view: keys", "every key and what it does", "keys"),
    ("view: cautions", "the safety cautions", "cautions"),
    ("run: simulate", "run the time simulation in the background", "simulate"),
    ("run: stop", "stop the running simulation", "stop_run"),
    ("run: sweep…", "what-if sweep: vary inputs, see the table and a plot of the results", "sweep"),
    ("run: calibrate…", "fit roughness, bore or losses to the site tests ([measurements])", "calibrate"),
    ("units: switch SI/US", "display units only; the file keeps its values", "toggle_units"),
)


class WorkbenchCommands(Provider):
    """Offers :data:`PALETTE` to the command palette."""

    def _run(self, action: str) -> None:
        self.app.call_later(self.app.run_action, action)

    async def discover(self) -> Hits:
        for name, help_text, action in PALETTE:
            yield DiscoveryHit(name, partial(self._run, action), help=help_text)

    async def search(self, query: str) -> Hits:
        matcher = self.matcher(query)
        for name, help_text, action in PALETTE:
            score = matcher.match(name)
            if score > 0:
                yield Hit(score, matcher.highlight(name), partial(self._run, action),
                          text=name, help=help_text)

"""The workbench's recovery copy of unsaved edits: kept, dropped, and offered back.

Built on :mod:`workbench.project.recovery`. The app owns one :class:`RecoveryKeeper`; it
holds this workbench's owner mark (host, process, token) so that two workbenches on the
same file each keep their own copy and never take the other's live edits for a crash:

* :meth:`~RecoveryKeeper.keep` -- after every change of the open document: while it has
  unsaved edits, their text is kept in this workbench's copy (beside the project, or in
  the user's state folder for a project never saved); once nothing is unsaved again
  (undo back to the saved state), the copy is removed;
* :meth:`~RecoveryKeeper.saved` and :meth:`~RecoveryKeeper.quitting` -- a clean save or
  quit removes it;
* :meth:`~RecoveryKeeper.offer` -- when a project is opened, copies left by workbenches
  that died are offered back, one at a time, and a workbench still running on the same
  file is named;
* :meth:`~RecoveryKeeper.offer_after_failed_load` -- the offer also stands when the
  project file itself no longer loads (a merge left conflict markers in it);
* :meth:`~RecoveryKeeper.offer_new` -- ``workbench open`` with no file offers the edits of
  a new project that was never saved.

Only this workbench's copy is removed without asking; a copy left by another is removed
only when the user drops it or takes it back (once this workbench's own copy holds the
edits).
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path
from typing import Any

from workbench.app.host import DocumentHost


class RecoveryKeeper:
    """This workbench's recovery copy and the offers of others' copies."""

    def __init__(self) -> None:
        from workbench.project.recovery import Owner

        self.owner = Owner.new()
        self.copy: Path | None = None
        """The copy this workbench has on disk now, if any."""
        self._warned = False
        self._recovered_new = False
        """A new project's kept edits were opened: keep them though nothing changed yet."""

    def close(self) -> None:
        """The workbench ends: a copy left behind is from now on offered as a dead one's."""
        self.owner.release()

    # --- this workbench's copy ---------------------------------------------------------
    def keep(self, host: DocumentHost) -> None:
        """Write (or remove) the copy to match the document's unsaved state."""
        from workbench.project.recovery import write_recovery

        project = host.project
        if project is None:
            return
        try:
            if self._unsaved(host):
                written = write_recovery(host.path, project.text, host.disk_hash, self.owner)
                if self.copy is not None and self.copy != written:
                    self._remove_copy()
                self.copy = written
            else:
                self._remove_copy()
        except Exception as error:  # noqa: BLE001 - a copy that cannot be kept must not stop editing
            if not self._warned:
                from workbench.app import jobs

                self._warned = True
                host.notify(f"unsaved edits cannot be kept in a recovery copy: "
                            f"{jobs.explain(error)}", title="Recovery copy",
                            severity="warning", timeout=8)

    def _unsaved(self, host: DocumentHost) -> bool:
        if not host.modified:
            return False
        if host.path is not None or self._recovered_new:
            return True
        # a new project: worth keeping once it differs from the starter template
        history = host.history
        return history is None or host.project.text != history.snapshots[0].text

    def _remove_copy(self) -> None:
        if self.copy is not None:
            try:
                self.copy.unlink()
            except FileNotFoundError:
                pass
            self.copy = None

    def saved(self, host: DocumentHost, old_path: Path | None) -> None:
        """After a clean save: the copy of the edits just saved is no longer needed."""
        self._remove_copy()

    def quitting(self, host: DocumentHost) -> None:
        """On a clean quit (edits saved, or discarded by the user): remove the copy."""
        self._remove_copy()

    # --- others' copies ----------------------------------------------------------------
    def offer(self, host: DocumentHost, path: Path | None) -> None:
        """Offer back the edits of workbenches that died on ``path``; name live ones."""
        from workbench.project.recovery import scan_recoveries

        if path is None:
            return
        scan = scan_recoveries(path, self.owner)
        for owner in scan.live:
            host.notify(f"{path.name} is also open in another workbench ({owner.describe()}) "
                        "with unsaved edits of its own: they stay with it. Edits made here "
                        "are kept apart, and a save asks before overwriting a file changed "
                        "on disk.", title="Open elsewhere", severity="warning", timeout=12)
        self._offer_each(host, list(scan.offers))

    def offer_new(self, host: DocumentHost, then: Callable[[], None]) -> None:
        """At ``workbench open`` with no file: offer a new project's kept edits, then ``then``."""
        from workbench.project.recovery import scan_recoveries

        offers = scan_recoveries(None, self.owner).offers
        if not offers:
            then()
            return
        self._offer_each(host, offers, otherwise=then)

    def offer_after_failed_load(self, host: DocumentHost, path: Path | None, problems: str,
                                show_problems: Callable[[], None]) -> bool:
        """When ``path`` does not load: offer its kept edits with the problems.

        Returns False when there is nothing to offer (the caller shows the problems);
        ``show_problems`` is called if the kept edits do not load either.
        """
        from workbench.project.recovery import scan_recoveries

        if path is None:
            return False
        offers = scan_recoveries(path, self.owner).offers
        if not offers:
            return False
        found = offers[0]
        from workbench.app.screens.dialogs import AskScreen

        def answered(key: Any) -> None:
            if key == "r":
                if not self._restore_as_document(host, found):
                    show_problems()
            elif key == "o":
                host.action_open()
            else:
                host.exit(1)

        host.push_screen(
            AskScreen(f"The project could not be opened:\n\n{problems}\n\nUnsaved edits of "
                      f"it were kept: {found.describe()}. Open those edits instead? (They "
                      "stay unsaved until you save, which replaces the file on disk.)",
                      [("r", "open the kept edits"), ("o", "open another file…"),
                       ("q", "quit (the copy is kept)")], title="Problems"),
            answered,
        )
        return True

    def _offer_each(self, host: DocumentHost, offers: list, otherwise=None) -> None:
        if not offers:
            if otherwise is not None:
                otherwise()
            return
        found, rest = offers[0], offers[1:]
        from workbench.app.screens.dialogs import AskScreen

        def answered(key: Any) -> None:
            if key == "r":
                if found.project_path is None:
                    self._restore_as_document(host, found)
                else:
                    self._restore(host, found)
                return  # the edits are open now: the other copies wait for the next open
            if key == "d":
                _unlink(found.path)
                host.notify(f"dropped the edits kept in {found.path.name}", timeout=4)
            self._offer_each(host, rest, otherwise)

        more = f" ({len(rest)} more after this one)" if rest else ""
        host.push_screen(
            AskScreen(f"Unsaved edits found{more}: {found.describe()}. Take them back? (They "
                      "stay unsaved until you save; undo returns to the file as saved.)",
                      [("r", "restore the unsaved edits"), ("d", "drop them (delete the copy)"),
                       ("k", "keep the copy for later; go on without it")],
                      title="Recover unsaved edits"),
            answered,
        )

    def _restore(self, host: DocumentHost, found) -> None:
        """Make the recovered edits the current state, as one undoable edit."""
        recovered = self._recovered(host, found)
        if recovered is None:
            return
        host.apply_edit(lambda _project: recovered, label="restore unsaved edits")
        # this workbench's own copy holds the edits now: the dead one's can go
        _unlink(found.path)
        host.notify(f"restored the unsaved edits from {found.path.name}", timeout=4)

    def _restore_as_document(self, host: DocumentHost, found) -> bool:
        """Open the recovered edits as the document (its file does not load, or it has none)."""
        recovered = self._recovered(host, found)
        if recovered is None:
            return False
        self._recovered_new = found.project_path is None
        host.adopt(recovered, found.project_path, saved=False, offer_recovery=False)
        if self.copy is not None:  # kept by adopt: the dead workbench's copy can go
            _unlink(found.path)
        host.notify(f"opened the unsaved edits from {found.path.name}", timeout=6)
        return True

    @staticmethod
    def _recovered(host: DocumentHost, found):
        from workbench.app import jobs
        from workbench.project.recovery import recover_project

        try:
            return recover_project(found)
        except Exception as error:  # noqa: BLE001 - shown to the user in words
            host.notify(jobs.explain(error), title="Recovery copy refused", severity="error",
                        timeout=10)
            return None


def _unlink(path: Path) -> None:
    try:
        path.unlink()
    except FileNotFoundError:
        pass

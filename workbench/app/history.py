"""Undo and redo for edits: a stack of immutable project snapshots.

Projects are frozen values (every edit returns a new one), so the history is a list of
them and a cursor. The snapshot last written to disk is remembered by identity, so
"unsaved edits" is simply "the cursor is not on the saved snapshot".
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Generic, TypeVar

T = TypeVar("T")


@dataclass
class History(Generic[T]):
    """Snapshots of a document with a cursor.

    Attributes:
        snapshots: every state reachable by undo/redo, oldest first.
        index: position of the current state in ``snapshots``.
        labels: what each edit did (``labels[i]`` made ``snapshots[i]``), for messages.
        saved: the snapshot that matches the file on disk, or ``None`` when none does.
    """

    snapshots: list[T] = field(default_factory=list)
    index: int = -1
    labels: list[str] = field(default_factory=list)
    saved: T | None = None
    limit: int = 200

    @classmethod
    def start(cls, first: T, *, saved: bool = True) -> "History[T]":
        """A history holding one state (saved when it came from a file)."""
        return cls(snapshots=[first], index=0, labels=["open"], saved=first if saved else None)

    @property
    def current(self) -> T:
        return self.snapshots[self.index]

    @property
    def can_undo(self) -> bool:
        return self.index > 0

    @property
    def can_redo(self) -> bool:
        return self.index < len(self.snapshots) - 1

    @property
    def modified(self) -> bool:
        """True when the current state differs from the one last saved."""
        return self.saved is None or self.current is not self.saved

    def push(self, state: T, label: str = "edit") -> T:
        """Record a new state after the current one; anything redoable is dropped."""
        del self.snapshots[self.index + 1 :]
        del self.labels[self.index + 1 :]
        self.snapshots.append(state)
        self.labels.append(label)
        if len(self.snapshots) > self.limit:
            drop = len(self.snapshots) - self.limit
            del self.snapshots[:drop]
            del self.labels[:drop]
        self.index = len(self.snapshots) - 1
        return state

    def undo(self) -> tuple[T, str]:
        """Step back; return the state now current and the label of the edit undone."""
        if not self.can_undo:
            raise IndexError("nothing to undo")
        label = self.labels[self.index]
        self.index -= 1
        return self.current, label

    def redo(self) -> tuple[T, str]:
        """Step forward; return the state now current and the label of the edit redone."""
        if not self.can_redo:
            raise IndexError("nothing to redo")
        self.index += 1
        return self.current, self.labels[self.index]

    def mark_saved(self) -> None:
        self.saved = self.current

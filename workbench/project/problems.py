"""What is wrong with a project file, in words: :class:`Problem` and :class:`ProjectError`."""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["Problem", "ProjectError"]


@dataclass(frozen=True)
class Problem:
    """One thing wrong with a project file.

    ``key`` is the key path (``"lines.L1.length"``; list entries count from 1:
    ``"lines.L1.fittings[2].type"``); empty for problems with the file as a whole.
    ``line`` and ``column`` (1-based) are set for TOML syntax errors, and ``line`` where the
    key could be found in the text.
    """

    file: str | None
    key: str
    message: str
    line: int | None = None
    column: int | None = None

    def __str__(self) -> str:
        """One line, with any control character from the file shown escaped."""
        from workbench.printable import printable

        return printable(self._text())

    def _text(self) -> str:
        where = self.file or "<text>"
        if not self.key and self.line is not None:
            column = f":{self.column}" if self.column is not None else ""
            return f"{where}:{self.line}{column}: {self.message}"
        if self.key:
            return f"{where}: {self.key}: {self.message}"
        return f"{where}: {self.message}"


class ProjectError(Exception):
    """A project that cannot be loaded, saved or edited; ``problems`` lists every reason."""

    def __init__(self, problems: list[Problem] | Problem):
        if isinstance(problems, Problem):
            problems = [problems]
        self.problems: list[Problem] = list(problems)
        super().__init__("\n".join(str(p) for p in self.problems))

    def __str__(self) -> str:
        return "\n".join(str(p) for p in self.problems)

"""Process exit codes, one enum for every command."""

from enum import IntEnum


class ExitCode(IntEnum):
    OK = 0
    """Success (a solution may still carry warnings)."""
    INVALID = 1
    """Invalid input, or no solution: the reason is on stderr."""
    USAGE = 2
    """Wrong command-line usage."""
    INTERNAL = 3
    """An internal consistency check failed: a bug, please report it."""
    INTERRUPTED = 130

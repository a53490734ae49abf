"""Keys typed while ``workbench open`` starts reach the workbench as typed.

For the first half second or so of ``workbench open`` (Python starting, Textual loading) the
terminal is still in its line-editing (canonical) mode, and the terminal itself acts on some
keys before any program reads them: Ctrl+U erases what was typed, Ctrl+W a word, Ctrl+R
reprints the line, Ctrl+S stops the output, and Enter arrives as a newline. A user who types
Ctrl+R (run) the moment the command starts would see nothing happen. :func:`keys_kept` turns
those off at once (and the echo, so typed keys do not scribble over the shell), the way
Textual does when it takes the terminal, and puts the terminal back as it found it when the
workbench ends, even after a crash. Ctrl+C still interrupts a start that takes too long;
Ctrl+Z is a key for the workbench (undo) rather than a stop.

The standard library's :mod:`tty` is not used for the switch: ``tty.setcbreak`` leaves Ctrl+S,
Ctrl+R and the carriage-return translation on, and ``tty.setraw`` would also stop the
output's newline translation for anything printed before the workbench draws.
"""

from __future__ import annotations

import contextlib
import os
import sys
from collections.abc import Iterator


@contextlib.contextmanager
def keys_kept(fd: int | None = None) -> Iterator[bool]:
    """Hold the terminal on ``fd`` (standard input by default) in a mode that passes every
    key through unchanged; yield whether it did (not a terminal, or no termios: False)."""
    before = _attributes(fd)
    if before is None:
        yield False
        return
    import termios

    fd_in = before[0]
    held = _held(before[1])
    try:
        termios.tcsetattr(fd_in, termios.TCSANOW, held)
    except termios.error:
        yield False
        return
    try:
        yield True
    finally:
        with contextlib.suppress(termios.error, OSError):
            termios.tcsetattr(fd_in, termios.TCSADRAIN, before[1])


def _attributes(fd: int | None) -> tuple[int, list] | None:
    """(descriptor, termios attributes) of a terminal, or None."""
    try:
        import termios
    except ImportError:  # not a POSIX terminal (Windows)
        return None
    try:
        fd_in = sys.stdin.fileno() if fd is None else fd
        if not os.isatty(fd_in):
            return None
        return fd_in, termios.tcgetattr(fd_in)
    except (AttributeError, OSError, ValueError, termios.error):  # closed or replaced stdin
        return None


def _held(attributes: list) -> list:
    """The attributes with line editing, echo, flow control and Enter translation off."""
    import termios

    held = list(attributes)
    held[6] = list(attributes[6])
    held[0] = attributes[0] & ~(termios.IXON | termios.IXOFF | termios.ICRNL | termios.INLCR
                                | termios.IGNCR)
    held[3] = attributes[3] & ~(termios.ECHO | termios.ICANON | termios.IEXTEN)
    held[6][termios.VMIN] = 1
    held[6][termios.VTIME] = 0
    # Ctrl+Z is the workbench's undo, not a stop of the half-started program (stopped now,
    # it would leave the shell's terminal without echo); Ctrl+C still interrupts
    held[6][termios.VSUSP] = b"\x00" if isinstance(attributes[6][termios.VSUSP], bytes) else 0
    return held

"""The one sanitiser for text that came from a file, before it reaches a terminal.

A project file is written by anyone: a title or an id may hold terminal control sequences
(an OSC 52 sequence sets the clipboard and window title, a backspace or carriage return
overwrites what was printed, a right-to-left override reorders it, a newline forges an extra
diagnostic line). :func:`printable` shows every such character escaped, as Python writes it
(``\\x1b``, ``\\u202e``, ``\\n``), so the user sees that it is there and the terminal never
acts on it. The CLI, the calculation record and the app pass file text through it; the file
itself keeps what the user wrote.

Escaped: the C0 controls and DEL, the C1 controls (U+0080..U+009F), the bidirectional
formatting characters (U+061C, U+200E, U+200F, U+202A..U+202E, U+2066..U+2069) and the line
and paragraph separators (U+2028, U+2029). Tabs and newlines only when not kept.
"""

from __future__ import annotations

import re

__all__ = ["printable"]

_UNSAFE = re.compile("[\x00-\x1f\x7f-\x9f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069"
                     "\u2028\u2029]")
_UNSAFE_KEEP_LINES = re.compile("[\x00-\x08\x0b-\x1f\x7f-\x9f\u061c\u200e\u200f"
                                "\u202a-\u202e\u2066-\u2069\u2028\u2029]")


def _escape(match: re.Match) -> str:
    char = match.group(0)
    code = ord(char)
    if char == "\n":
        return "\\n"
    if char == "\t":
        return "\\t"
    if char == "\r":
        return "\\r"
    return f"\\x{code:02x}" if code < 0x100 else f"\\u{code:04x}"


def printable(text: object, *, keep_lines: bool = False) -> str:
    """``text`` with every control character shown escaped.

    Parameters
    ----------
    text : object
        Text from a file (anything else is turned into text first).
    keep_lines : bool
        Keep newlines and tabs (a multi-line description in the record); every other
        control character is still escaped.

    Examples
    --------
    >>> printable("TK-1\\x1b]52;c;ZWNobyBoaQ==\\x07")
    'TK-1\\\\x1b]52;c;ZWNobyBoaQ==\\\\x07'
    >>> printable("two\\nlines")
    'two\\\\nlines'
    >>> printable("two\\nlines", keep_lines=True)
    'two\\nlines'
    """
    text = text if isinstance(text, str) else str(text)
    pattern = _UNSAFE_KEEP_LINES if keep_lines else _UNSAFE
    return pattern.sub(_escape, text)

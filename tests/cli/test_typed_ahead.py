"""Keys typed while ``workbench open`` starts: the terminal passes them on unchanged.

Terminal behaviour checked against the POSIX General Terminal Interface (IEEE Std 1003.1,
"Canonical Mode Input Processing" and "Special Characters"): in canonical mode the terminal
itself acts on KILL (Ctrl+U), WERASE (Ctrl+W), REPRINT (Ctrl+R) and STOP (Ctrl+S), and ICRNL
turns a carriage return into a newline. Each test first shows the terminal doing so on a fresh
pseudo-terminal, so a test would fail if the mode were not the cause.
"""

from __future__ import annotations

import os
import select
import sys
import time

import pytest

pytestmark = pytest.mark.skipif(sys.platform == "win32", reason="POSIX terminals only")

TYPED = b"x\x12\x15\x17\x13\r"  # x, Ctrl+R, Ctrl+U, Ctrl+W, Ctrl+S, Enter


def _read_all(fd: int) -> bytes:
    """Whatever the terminal hands a reader now (not waiting for an end of line)."""
    import termios

    attributes = termios.tcgetattr(fd)
    quick = list(attributes)
    quick[6] = list(attributes[6])
    quick[3] &= ~termios.ICANON  # read what is queued, complete line or not
    quick[6][termios.VMIN] = 0
    quick[6][termios.VTIME] = 0
    termios.tcsetattr(fd, termios.TCSANOW, quick)
    try:
        got = b""
        for _ in range(50):  # up to ~1 s for the kernel to pass the bytes through
            ready, _, _ = select.select([fd], [], [], 0.02)
            if ready:
                chunk = os.read(fd, 1024)
                if not chunk:
                    break
                got += chunk
            elif got:
                break
        return got
    finally:
        termios.tcsetattr(fd, termios.TCSANOW, attributes)


@pytest.fixture
def terminal():
    import pty

    main_end, program_end = pty.openpty()
    yield main_end, program_end
    os.close(main_end)
    os.close(program_end)


def test_a_terminal_left_in_line_mode_eats_the_control_keys_typed_ahead(terminal):
    main_end, program_end = terminal
    os.write(main_end, TYPED)
    time.sleep(0.05)  # let the line discipline take the bytes (not a limit on the test)
    got = _read_all(program_end)
    assert b"\x12" not in got and b"\x15" not in got and b"\r" not in got
    assert got == b"\n"  # "x" erased by Ctrl+U, Enter made a newline


def test_keys_typed_once_the_workbench_holds_the_terminal_arrive_as_typed(terminal):
    from workbench.cli.typed_ahead import keys_kept

    main_end, program_end = terminal
    with keys_kept(program_end) as held:
        assert held is True
        os.write(main_end, TYPED)
        assert _read_all(program_end) == TYPED


def test_the_terminal_is_put_back_as_it_was_even_when_the_workbench_fails(terminal):
    import termios

    from workbench.cli.typed_ahead import keys_kept

    _, program_end = terminal
    before = termios.tcgetattr(program_end)
    with pytest.raises(RuntimeError), keys_kept(program_end):
        assert termios.tcgetattr(program_end) != before
        raise RuntimeError("the app died")
    assert termios.tcgetattr(program_end) == before


def test_signals_stay_on_so_ctrl_c_still_stops_a_slow_start(terminal):
    import termios

    from workbench.cli.typed_ahead import keys_kept

    _, program_end = terminal
    with keys_kept(program_end):
        assert termios.tcgetattr(program_end)[3] & termios.ISIG


def test_ctrl_z_typed_during_the_start_is_a_key_for_the_workbench_not_a_stop(terminal):
    """POSIX: with ISIG on, the SUSP character (Ctrl+Z) is taken by the terminal to stop the
    program; disabled (_POSIX_VDISABLE) it is passed on like any key."""
    from workbench.cli.typed_ahead import keys_kept

    main_end, program_end = terminal
    with keys_kept(program_end):
        os.write(main_end, b"\x1a")
        assert _read_all(program_end) == b"\x1a"


def test_without_a_terminal_nothing_is_changed(tmp_path):
    from workbench.cli.typed_ahead import keys_kept

    with open(tmp_path / "not-a-terminal", "wb") as plain, keys_kept(plain.fileno()) as held:
        assert held is False

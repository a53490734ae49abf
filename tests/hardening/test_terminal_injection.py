"""No control character from a project file reaches the terminal.

A title holding an OSC 52 sequence (ESC ] 52 ; c ; base64 BEL) would set the terminal's
clipboard; a backspace, NUL, right-to-left override or newline in an id would overwrite,
reorder or forge diagnostic lines. Every command prints file text through one sanitiser
(:func:`workbench.printable.printable`), so the characters arrive escaped (``\\x1b``) and
the terminal never acts on them. Checked on the bytes a real process writes to stdout and
stderr (no colour: the output is a pipe, so rich writes no escape of its own either), on
the calculation record's file and on what the app shows.
"""

from __future__ import annotations

import subprocess

import pytest

from tests.hardening.harness import ROOT, run_batch
from workbench.printable import printable

DEMO = ROOT / "projects" / "fellgate_neutraliser_drain.toml"

#: An OSC 52 clipboard write and a window-title change, ended by BEL and by ST.
OSC52 = "\x1b]52;c;ZWNobyBwd25lZA==\x07\x1b]0;owned\x1b\\"
#: Characters a terminal acts on (ESC, BEL, BS, NUL, CR, C1 CSI, bidi overrides, separators).
FORBIDDEN = ("\x1b", "\x07", "\x08", "\x00", "\r", "\x9b", "\u202e", "\u2066", "\u2028")


def _valid_project(tmp_path):
    tmp_path.mkdir(parents=True, exist_ok=True)
    text = DEMO.read_text()
    text = text.replace('title = "', f'title = "{_toml(OSC52)} ', 1)
    text = text.replace('description = "', 'description = "clear\\u001b[2Jscreen '
                        '\\u202egnol\\u0008x\\u0000y\\u009b1m ', 1)
    path = tmp_path / "injected.toml"
    path.write_text(text)
    return path


def _toml(text: str) -> str:
    """``text`` as the inside of a TOML basic string (control characters as \\u escapes)."""
    return "".join(f"\\u{ord(c):04x}" if ord(c) < 0x20 or ord(c) == 0x7f or c in "\\\""
                   else c for c in text)


def _invalid_project(tmp_path):
    tmp_path.mkdir(parents=True, exist_ok=True)
    text = DEMO.read_text()
    bad = _toml("CH-2\x1b[31m\u202eX\x08\x00\nforged.toml: all good")
    text = text.replace('to = "CH-2"', f'to = "{bad}"', 1)
    text += f'\n[junctions."{bad}"]\nelevation = "1 m"\n'
    path = tmp_path / "injected_ids.toml"
    path.write_text(text)
    return path


TITLE_COMMANDS = [["check"], ["solve"], ["solve", "--json"], ["simulate", "--duration", "60 s"],
                  ["report"]]
ID_COMMANDS = ["check", "solve", "simulate", "format"]


@pytest.fixture(scope="module")
def runs(tmp_path_factory) -> dict:
    """Every command of the tests below on its own copy of the injected files, all in one
    real process (:func:`run_batch`: the bytes it writes to its stdout and stderr pipes,
    one start-up instead of eleven)."""
    folder = tmp_path_factory.mktemp("injected")
    argvs: dict = {}
    for command in TITLE_COMMANDS:
        path = _valid_project(folder / f"title-{'-'.join(command)}".replace(" ", "_"))
        argvs[("title", *command)] = [command[0], str(path), *command[1:]]
    record = folder / "record.md"
    argvs[("record",)] = ["report", str(_valid_project(folder / "record")), "--output", str(record)]
    for command in ID_COMMANDS:
        argvs[("ids", command)] = [command, str(_invalid_project(folder / f"ids-{command}"))]
    done = run_batch(list(argvs.values()), folder / "codes.json", limit=60.0)
    return {**dict(zip(argvs, done)), "record file": record}


def _assert_clean(done: subprocess.CompletedProcess, what: str) -> None:
    for stream, name in ((done.stdout, "stdout"), (done.stderr, "stderr")):
        text = stream.decode("utf-8", "replace")
        for char in FORBIDDEN:
            assert char not in text, f"{what}: {char!r} reached {name}:\n{text[:2000]}"


def test_the_sanitiser_escapes_what_a_terminal_acts_on_and_keeps_ordinary_text():
    shown = printable(OSC52 + " Ölkühler — TK-210 ✓")
    assert not any(c in shown for c in FORBIDDEN)
    assert "\\x1b]52;c;ZWNobyBwd25lZA==\\x07" in shown
    assert shown.endswith(" Ölkühler — TK-210 ✓")
    assert printable("a\nb") == "a\\nb" and printable("a\nb", keep_lines=True) == "a\nb"


@pytest.mark.parametrize("command", TITLE_COMMANDS)
def test_a_title_with_terminal_sequences_reaches_no_terminal(runs, command):
    done = runs[("title", *command)]
    assert done.returncode == 0, done.stderr.decode()
    _assert_clean(done, " ".join(command))
    if command != ["solve", "--json"]:
        assert b"\\x1b]52" in done.stdout + done.stderr  # shown, escaped


def test_check_quotes_the_escaped_title_once_not_escaped_twice(runs):
    """The summary once quoted the already-escaped title with ``repr``, so the user read
    ``\\x1b`` where the file has ``\x1b``; it must read as ``solve`` writes it."""
    done = runs[("title", "check")]
    assert done.returncode == 0, done.stderr.decode()
    out = done.stdout.decode()
    assert f"valid — '{printable(OSC52)} " in out
    assert "\\\\x1b" not in out


def test_the_calculation_record_holds_no_control_characters(runs):
    done = runs[("record",)]
    assert done.returncode == 0, done.stderr.decode()
    text = runs["record file"].read_text()
    assert not any(c in text for c in FORBIDDEN)
    assert "\\x1b]52" in text


@pytest.mark.parametrize("command", ID_COMMANDS)
def test_invalid_ids_are_echoed_escaped_and_forge_no_lines(runs, command):
    done = runs[("ids", command)]
    _assert_clean(done, command)
    if command != "format":
        assert done.returncode == 1
        lines = done.stderr.decode().splitlines()
        assert not any(line.startswith("forged.toml") for line in lines)


def test_a_batch_run_keeps_each_commands_output_and_exit_code_apart(tmp_path):
    """The batch process hands each run exactly what that run wrote: a valid and a
    broken file give exit 0 with a result and exit 1 with a message, in their own slots."""
    good = ROOT / "projects" / "fellgate_neutraliser_drain.toml"
    broken = tmp_path / "broken.toml"
    broken.write_text("schema = 1\n[lines.L1]\nlength = 'twelve'\n")
    ok, bad = run_batch([["check", str(good)], ["check", str(broken)]], tmp_path / "c.json")
    assert (ok.returncode, bad.returncode) == (0, 1)
    assert b"valid" in ok.stdout and ok.stderr == b""
    assert bad.stdout == b"" and bad.stderr.startswith(str(broken).encode())
    assert b"batch run" not in ok.stdout + ok.stderr + bad.stdout + bad.stderr


async def test_the_app_shows_file_text_escaped(tmp_path):
    from tests.app.conftest import SIZE, make, settle

    path = _valid_project(tmp_path)
    app = make(path)
    shown = []
    real_notify = app.notify

    def notify(message, **kw):
        real_notify(message, **kw)
        shown.append(message)

    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        assert not any(c in app.project.system.title for c in FORBIDDEN)
        app.notify(f"title is {app.project.data['project']['title']}")
        await pilot.pause()
        screen_text = "".join(str(n.message) for n in app._notifications)
        assert "\\x1b]52" in screen_text
        assert not any(c in screen_text for c in FORBIDDEN)
        from workbench.app.outline import value_text

        assert not any(c in value_text(app.project.data["project"]["description"])
                       for c in FORBIDDEN)

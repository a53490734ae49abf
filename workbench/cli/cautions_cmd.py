"""``workbench cautions``: print the safety cautions."""

from __future__ import annotations

import argparse

from workbench.cli.exit_codes import ExitCode


def add_parser(sub: argparse._SubParsersAction, name: str, help_text: str) -> None:
    sub.add_parser(name, help=help_text, description=help_text)


def run(args: argparse.Namespace) -> ExitCode:
    from workbench.cautions import cautions_text

    print(cautions_text())
    return ExitCode.OK

"""The elastic-surge part of ``workbench simulate``: ``--elastic LINE`` and its output.

Lines run by the method of characteristics are those with ``[lines.ID.surge] model =
"elastic"`` in the project plus those named with ``--elastic`` (repeatable). Each chain of
lines in series is run once. Their results are added to the simulate output: under
``surge.ID.elastic`` in the JSON (the transient keys are left as they are) and as one more
table in the summary (the JSON additions are :mod:`workbench.output.simulate_json`, shared
with the sweep runner). Heavy modules are imported only when a run is asked for.
"""

from __future__ import annotations

import argparse

ELASTIC_HELP = (
    "also run the elastic surge model (method of characteristics) on LINE and the lines in "
    "series with it; repeatable. Lines with [lines.ID.surge] model = 'elastic' are always run."
)


def add_elastic_option(parser: argparse.ArgumentParser) -> None:
    """Add ``--elastic LINE`` (repeatable) to a parser."""
    parser.add_argument("--elastic", metavar="LINE", action="append", default=[],
                        help=ELASTIC_HELP)


def check_elastic_names(args: argparse.Namespace, system) -> str | None:
    """``None`` when every ``--elastic`` name is a line of the system, else the message."""
    if not getattr(args, "elastic", None):
        return None
    from workbench.core.elastic import ElasticSetupError, elastic_line_ids

    try:
        elastic_line_ids(system, list(args.elastic))
    except ElasticSetupError as exc:
        return f"--elastic: {exc}"
    return None


def run_elastic_lines(args: argparse.Namespace, system, max_duration: float | None = None):
    """Run the elastic model on the selected lines.

    Returns
    -------
    (results, problem)
        ``results``: line id -> :class:`workbench.core.elastic.ElasticResult` (empty when
        no line is selected); ``problem``: ``None``, or the text to print on stderr when a
        named line does not exist (nothing is run then) or a chain could not be run.
    """
    from workbench.core.elastic import ElasticSetupError, elastic_line_ids, run_elastic

    try:
        ids = elastic_line_ids(system, list(getattr(args, "elastic", None) or []))
    except ElasticSetupError as exc:
        return {}, f"--elastic: {exc}"
    if not ids:
        return {}, None
    from workbench.cli.common import terminal_progress

    with terminal_progress("elastic surge") as progress:
        results = run_elastic(system, ids, max_duration=max_duration, progress=progress)
    failed = [f"{args.project}: elastic surge, line {lid}: {res.message}"
              for lid, res in results.items() if res.status == -1]
    return results, ("\n".join(failed) or None)


def print_elastic_tables(console, results: dict, system, unit_system: str) -> None:
    """Print the elastic summary table and its findings (nothing when no line ran)."""
    if not results:
        return
    from workbench.output.elastic import elastic_findings, elastic_table

    console.print(elastic_table(results, system, unit_system))
    for w in elastic_findings(results, unit_system):
        console.print(f"{w['severity'].upper()}: {w['code']} ({w['element']}): {w['message']}",
                      markup=False, highlight=False)

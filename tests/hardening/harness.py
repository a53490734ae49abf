"""Run ``workbench`` commands in-process (or in a subprocess) and judge how they ended.

A call ends well when it exits 0 with a result (for ``--json``: an object whose every number
is finite) or exits 1 with the project's own message on stderr, starting with the file name.
Anything else is a failure: another exit code, an exception escaping ``main``, the word
"Traceback" on stderr, a NaN or infinity in JSON presented as valid, or a call that runs
past its CPU-time limit (a hang).
"""

from __future__ import annotations

import contextlib
import io
import json
import math
import os
import resource
import signal
import subprocess
import sys
import time
import traceback
import warnings
from dataclasses import dataclass, field
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
PYTHON = sys.executable

#: Per-call CPU-time limits [s]; generous next to the tens of milliseconds a call takes.
TIME_LIMIT = {"check": 20.0, "solve": 20.0, "simulate": 30.0, "format": 20.0}


class Hang(BaseException):
    """Raised by the alarm when a call runs past its limit (BaseException: no handler in
    the program may swallow it)."""


@dataclass
class Outcome:
    argv: list[str]
    code: int | None
    stdout: str
    stderr: str
    seconds: float
    error: str = ""
    """Exception type and message when one escaped ``main``."""
    where: str = ""
    """Innermost frame of the program's own code for an escaped exception."""
    problems: list[str] = field(default_factory=list)

    @property
    def ok(self) -> bool:
        return not self.problems

    def signature(self) -> str:
        """A short key that groups failures with the same cause."""
        if self.error:
            return f"{self.argv[0]}: {self.error.split(':')[0]} at {self.where}"
        return f"{self.argv[0]}: " + "; ".join(p.split(":")[0] for p in self.problems)

    def report(self) -> str:
        return (f"workbench {' '.join(self.argv)} -> exit {self.code} in {self.seconds:.2f} s\n"
                f"problems: {self.problems}\n{self.error}\n--- stderr ---\n{self.stderr[-3000:]}\n"
                f"--- stdout ---\n{self.stdout[:1500]}")


@contextlib.contextmanager
def time_limit(seconds: float):
    """Raise :class:`Hang` after ``seconds`` of this process's CPU time (SIGPROF).

    CPU time, not wall time: a busy machine slows a call down but does not make it use more
    CPU, so the limit catches a runaway loop without failing on a loaded CI machine. A call
    that blocks without using CPU is caught by pytest-timeout's generous wall limit.
    """
    def on_limit(signum, frame):
        raise Hang(f"used more than {seconds} s of CPU")

    old_handler = signal.signal(signal.SIGPROF, on_limit)
    signal.setitimer(signal.ITIMER_PROF, seconds)
    try:
        yield
    finally:
        signal.setitimer(signal.ITIMER_PROF, 0)
        signal.signal(signal.SIGPROF, old_handler)


def _own_frame(tb) -> str:
    frames = [f for f in traceback.extract_tb(tb) if "/workbench/" in f.filename]
    if not frames:
        return "?"
    f = frames[-1]
    return f"{Path(f.filename).relative_to(ROOT)}:{f.lineno} ({f.name})"


def finite_json(text: str):
    """Parse JSON, refusing NaN and infinities wherever they are."""
    def refuse(token):
        raise ValueError(f"non-finite number {token} in the JSON")

    data = json.loads(text, parse_constant=refuse)

    def walk(x, path="$"):
        if isinstance(x, float) and not math.isfinite(x):
            raise ValueError(f"non-finite number at {path}")
        if isinstance(x, dict):
            for k, v in x.items():
                walk(v, f"{path}.{k}")
        elif isinstance(x, list):
            for i, v in enumerate(x):
                walk(v, f"{path}[{i}]")

    walk(data)
    return data


def judge(outcome: Outcome, project_path: str | None) -> Outcome:
    """Fill ``outcome.problems`` with every way the call did not end well."""
    p = outcome.problems
    if outcome.error:
        p.append(f"exception: {outcome.error}")
    if outcome.code not in (0, 1):
        p.append(f"exit code {outcome.code}")
    if "Traceback" in outcome.stderr:
        p.append("traceback on stderr")
    if outcome.code == 1:
        first = outcome.stderr.strip().splitlines()[:1]
        if not first:
            p.append("exit 1 with nothing on stderr")
        elif project_path and not first[0].startswith(project_path):
            p.append(f"message does not start with the file name: {first[0][:200]!r}")
    if outcome.code == 0 and "--json" in outcome.argv:
        try:
            data = finite_json(outcome.stdout)
        except ValueError as exc:
            p.append(f"bad JSON: {exc}")
        else:
            if isinstance(data, dict) and data.get("success") is False:
                p.append("exit 0 with success false in the JSON")
    return outcome


def run_cli(argv: list[str], *, project_path: str | None = None,
            limit: float | None = None) -> Outcome:
    """Run ``workbench.cli.main(argv)`` in this process with output captured and a time limit."""
    from workbench.cli import main

    limit = limit or TIME_LIMIT.get(argv[0], 20.0)
    out, err = io.StringIO(), io.StringIO()
    code, error, where = None, "", ""
    t0 = time.perf_counter()
    caught: list = []
    # The CLI turns an unexpected exception into exit 3 with "internal error"; in the fuzz
    # we want the exception itself, with the line it came from.
    debug = os.environ.get("WORKBENCH_DEBUG")
    os.environ["WORKBENCH_DEBUG"] = "1"
    try:
        with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err), \
                time_limit(limit), warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always")
            code = main(argv)
    except Hang as exc:
        error, where = f"Hang: {exc}", _own_frame(exc.__traceback__)
    except BaseException as exc:  # noqa: BLE001 - anything escaping main is the failure we look for
        error = f"{type(exc).__name__}: {str(exc)[:300]}"
        where = _own_frame(exc.__traceback__)
        if isinstance(exc, KeyboardInterrupt):
            raise
    finally:
        if debug is None:
            os.environ.pop("WORKBENCH_DEBUG", None)
        else:
            os.environ["WORKBENCH_DEBUG"] = debug
    outcome = Outcome(argv, code, out.getvalue(), err.getvalue(), time.perf_counter() - t0,
                      error, where)
    # A warning that escapes main is printed on a user's stderr ahead of the real message.
    for w in caught:
        if "/workbench/" in str(w.filename) or "scipy" in str(w.filename) or "numpy" in str(w.filename):
            outcome.problems.append(f"warning on stderr: {w.category.__name__}: {w.message} "
                                    f"({Path(w.filename).name}:{w.lineno})")
            break
    return judge(outcome, project_path)


def run_subprocess(argv: list[str], *, project_path: str | None = None,
                   limit: float = 60.0) -> Outcome:
    """The same judgement on a real ``python -m workbench`` process.

    ``limit`` is CPU time [s], enforced by the kernel (``RLIMIT_CPU``); the wall-clock
    timeout is only a net for a process that blocks, and is many times longer.
    """
    env = dict(os.environ, NO_COLOR="1", PYTHONUTF8="1")

    def cap_cpu():
        resource.setrlimit(resource.RLIMIT_CPU, (math.ceil(limit), math.ceil(limit) + 5))

    t0 = time.perf_counter()
    try:
        proc = subprocess.run([PYTHON, "-m", "workbench", *argv], capture_output=True,
                              text=True, timeout=20 * limit, cwd=ROOT, env=env,
                              preexec_fn=cap_cpu)
        outcome = Outcome(argv, proc.returncode, proc.stdout, proc.stderr,
                          time.perf_counter() - t0)
        if proc.returncode in (-signal.SIGXCPU, -signal.SIGKILL):
            outcome.error = f"Hang: used more than {limit} s of CPU"
    except subprocess.TimeoutExpired as exc:
        outcome = Outcome(argv, None, str(exc.stdout or ""), str(exc.stderr or ""),
                          time.perf_counter() - t0, f"Hang: still running after {20 * limit} s",
                          "?")
    return judge(outcome, project_path)


#: What the batch process writes on stdout and stderr ahead of each run (plain ASCII).
BATCH_MARK = "\n===== workbench batch run {} =====\n"

_BATCH = """
import json, sys
from workbench.cli import main

runs, codes = json.loads(sys.argv[1]), []
for i, argv in enumerate(runs):
    for stream in (sys.stdout, sys.stderr):
        stream.write({mark!r}.format(i))
        stream.flush()
    codes.append(main(argv))  # what ``python -m workbench`` does with its arguments
    sys.stdout.flush()
    sys.stderr.flush()
with open(sys.argv[2], "w") as out:
    json.dump(codes, out)
"""


def run_batch(runs: list[list[str]], codes_file: Path, limit: float = 60.0,
              env: dict | None = None) -> list[subprocess.CompletedProcess]:
    """Several ``workbench`` commands in one real process, one after the other.

    Each run gets the bytes the process wrote to stdout and stderr between its mark and the
    next (pipes, as in a shell redirection) and the exit code ``main`` returned, as a
    ``CompletedProcess``. One interpreter start-up and one import of the package serve all
    the runs (about 0.6 s of CPU each saved). ``limit`` is CPU time per run [s], summed over
    the runs (``RLIMIT_CPU``); ``codes_file`` is where the process writes the exit codes;
    ``env`` the process's environment (``None``: this one's).
    """
    total = math.ceil(limit * len(runs))

    def cap_cpu():
        resource.setrlimit(resource.RLIMIT_CPU, (total, total + 5))

    done = subprocess.run([PYTHON, "-c", _BATCH.format(mark=BATCH_MARK), json.dumps(runs),
                           str(codes_file)], capture_output=True, cwd=ROOT,
                          env=env,
                          timeout=20 * total, preexec_fn=cap_cpu)
    codes = json.loads(Path(codes_file).read_text()) if done.returncode == 0 else []
    marks = [BATCH_MARK.format(i).encode() for i in range(len(runs) + 1)]

    def part(data: bytes, i: int) -> bytes:
        start = data.find(marks[i])
        if start < 0:
            return b""
        start += len(marks[i])
        end = data.find(marks[i + 1], start)
        return data[start:] if end < 0 else data[start:end]

    return [subprocess.CompletedProcess(argv, codes[i] if i < len(codes) else done.returncode,
                                        part(done.stdout, i), part(done.stderr, i))
            for i, argv in enumerate(runs)]


def commands_available() -> set[str]:
    from workbench.cli import COMMANDS

    return set(COMMANDS)


def simulate_argv(path: str, duration: str = "5 s") -> list[str]:
    return ["simulate", path, "--duration", duration, "--json"]

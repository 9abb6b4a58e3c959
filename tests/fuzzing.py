"""The fuzzers' oracle, shared by tests/test_fuzz_language.py and tests/test_fuzz_grammar.py.

Every input ends in a result (rendered four ways) or an InputError/LimitError naming
line and column.  Anything else fails the test: another exception, an input that
outlives the statement time limit by far (a hard watchdog), or a statement whose peak
resident memory went past the memory ceiling by more than :data:`SLACK` (the ceiling
is sampled every 10 ms of CPU time, see ketsplit.timebudget; one C call can overshoot
it by what it allocates before it returns, and that is what this test would find).
"""

from __future__ import annotations

import json
import os
import signal
import tempfile
import traceback
from contextlib import contextmanager
from pathlib import Path

from ketsplit import InputError, Session, limits

STATEMENT_SECONDS = 3     # the limit 'seconds' while fuzzing
WATCHDOG_SECONDS = 20     # past this the limit itself failed: the test fails
SLACK = 256 << 20         # bytes a statement may pass the memory ceiling by before it is seen
STATUS = Path("/proc/self/status")
CLEAR_REFS = Path("/proc/self/clear_refs")
FUZZ_LOG = os.environ.get("KETSPLIT_FUZZ_LOG")  # a long run writes its failures here and goes on


class Hang(BaseException):
    """The watchdog fired: an input ran far past the statement time limit."""


@contextmanager
def watchdog(seconds: float, text: str):
    """Fail (not merely stop) when a run outlives ``seconds``, the statement limit included."""
    def fire(signum, frame):
        raise Hang(f"no answer after {seconds} s for {text!r}")
    previous = signal.signal(signal.SIGALRM, fire)
    signal.setitimer(signal.ITIMER_REAL, seconds)
    try:
        yield
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, previous)


def status_bytes(key: str) -> int | None:
    """A memory figure of this process from /proc/self/status (Linux), in bytes."""
    try:
        text = STATUS.read_text()
    except OSError:
        return None
    for line in text.splitlines():
        if line.startswith(key + ":"):
            return int(line.split()[1]) * 1024
    return None


@contextmanager
def peak_checked(text: str):
    """Fail when the block's peak resident memory passed the ceiling by more than SLACK.

    The peak (VmHWM) is reset to the present size first by writing 5 to
    /proc/self/clear_refs (Linux 4.0 and later); where that is refused the
    block runs unchecked (the ceiling itself still stops it)."""
    try:
        CLEAR_REFS.write_text("5")
        start = status_bytes("VmRSS")
    except OSError:
        start = None
    yield
    peak = status_bytes("VmHWM")
    if start is not None and peak is not None:
        record_peak(peak - start, text)
        ceiling = limits.current().memory << 20
        assert ceiling == 0 or peak - start < ceiling + SLACK, \
            f"{(peak - start) >> 20} MiB for {text!r}, past the ceiling of {ceiling >> 20} MiB"


_largest = [0]  # the largest peak growth of one statement in this run, in bytes


def record_peak(growth: int, text: str) -> None:
    """In a long run (KETSPLIT_FUZZ_LOG set), keep the largest peak growth of one statement
    and its input in FILE.peak, for the figure the issue asks for."""
    if FUZZ_LOG and growth > _largest[0]:
        _largest[0] = growth
        Path(FUZZ_LOG + ".peak").write_text(f"{growth >> 20} MiB {text!r}\n", encoding="utf-8")


def outcome(text: str, prelude: str = "") -> str:
    """Run ``prelude`` then ``text`` in a fresh Session; render every result four ways.

    Returns "ok" or "input error"; any other exception propagates and fails the test.
    """
    session = Session()
    with limits.limits_set(seconds=120):  # the prelude is valid: no load may make it time out
        session.run(prelude)
    with watchdog(WATCHDOG_SECONDS, text), peak_checked(text):
        try:
            results = session.run(text)
        except InputError as err:
            str(err)  # the message with its caret must itself render
            assert err.span is not None, f"no line and column for {text!r}: {err.message}"
            assert "internal error" not in err.message, err.message
            return "input error"
        # the outer watchdog fires for a result that takes long to render: never a hang
        for result in results:
            result.text()
            result.text(pretty=True)
            result.latex()
            json.dumps(result.to_json())
    return "ok"


def in_sandbox(text: str) -> bool:
    """False for a statement that might write a file outside the scratch directory (the tests
    may run as root): a path with '/', '~' or '..' anywhere near 'save', 'plot' or '--to'."""
    writes = any(word in text for word in ("save", "plot", "map", "--to", "--data"))
    return not (writes and any(mark in text for mark in ("/", "~", "..", "\\")))


@contextmanager
def scratch_directory():
    """Fuzzed 'save x' or 'plot ... --to f' write only into a scratch directory (the strategies
    leave out paths that could lead elsewhere, see in_sandbox), under the fuzzing time limit;
    the working directory and the limits come back after."""
    here = os.getcwd()
    with tempfile.TemporaryDirectory() as scratch, limits.limits_set(seconds=STATEMENT_SECONDS):
        os.chdir(scratch)
        try:
            yield Path(scratch)
        finally:
            os.chdir(here)



@contextmanager
def logged(text: str):
    """In a long run with KETSPLIT_FUZZ_LOG set, record a failure (with its traceback) in that
    file and go on, so that one run finds every failure instead of shrinking the first one,
    and add a mark per input to FILE.count; without it, a failure fails the test."""
    if not FUZZ_LOG:
        yield
        return
    try:
        yield
    except (Exception, Hang) as failure:
        with open(FUZZ_LOG, "a", encoding="utf-8") as log:
            log.write(f"=== {text!r}\n{''.join(traceback.format_exception(failure))[-3000:]}\n")
    finally:
        with open(FUZZ_LOG + ".count", "a", encoding="utf-8") as count:
            count.write(".")  # one mark per input: the run's size, whatever its outcome

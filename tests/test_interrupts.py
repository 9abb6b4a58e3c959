"""Interrupts and faults: Ctrl-C leaves the session intact; a save is all or nothing.

- Ctrl-C (a real SIGINT) during a long statement, in the Session, in the
  shell's line handler, and in a child ``ketsplit`` shell fed through a pipe:
  the names bound before are still there and the next statement works.
- A worksheet being written when the process is killed (SIGKILL at random
  moments, in a child process) is afterwards either the old file or the new
  one, byte for byte, never a mixture or a truncation.
- A read-only target, a missing directory and a full disk give a WriteError
  (an InputError) that says what went wrong and leaves the old file as it was.
"""

from __future__ import annotations

import errno
import io
import os
import random
import signal
import subprocess
import sys
import threading
import time
from contextlib import contextmanager
from pathlib import Path

import pytest

from ketsplit import InputError, Session
from ketsplit.base.files import WriteError, write_atomic

# A statement that runs for minutes: 100000 distinct powers of t summed term by term (the
# exponents stay within the limit exponent = 1000).
LONG = "y = sum(n=0..99999, t^(n/100) |0>) + |1>"


@contextmanager
def ctrl_c_after(seconds: float):
    """Send this process a real SIGINT after ``seconds``; only inside the block does it count."""
    inside = threading.Event()
    inside.set()

    def interrupt(signum, frame):
        if inside.is_set():
            raise KeyboardInterrupt
    previous = signal.signal(signal.SIGINT, interrupt)
    timer = threading.Timer(seconds, os.kill, (os.getpid(), signal.SIGINT))
    timer.start()
    try:
        yield
    finally:
        inside.clear()
        timer.cancel()
        timer.join()
        signal.signal(signal.SIGINT, previous)


def test_ctrl_c_in_a_session_leaves_its_names_and_settings():
    session = Session()
    session.run("real t in [0, pi]; x = |00> + |11>; digits 40")
    bindings, params, settings = dict(session.bindings), dict(session.params), session.settings
    started = time.monotonic()
    with pytest.raises(KeyboardInterrupt), ctrl_c_after(0.5):
        session.run(LONG)
    assert time.monotonic() - started < 10, "Ctrl-C did not stop the statement promptly"
    assert session.bindings == bindings and session.params == params
    assert session.settings == settings
    assert signal.getitimer(signal.ITIMER_REAL)[0] == 0, "the statement's time limit was left armed"
    assert session.run("rank x")[0].report.items[0].value == 2


def test_ctrl_c_in_the_shell_says_cancelled_and_keeps_the_session():
    from ketsplit.repl.loop import Shell
    out = io.StringIO()
    shell = Shell(out=out, colour=False, spinner=False)
    shell.handle("x = |00> + |11>")
    with ctrl_c_after(0.5):
        shell.handle(f"z = |0>; {LONG}")  # the line is atomic: z is not kept either
    shell.handle("rank x")
    text = out.getvalue()
    assert "cancelled" in text
    assert "rank: 2" in text
    assert "x" in shell.session.bindings and "z" not in shell.session.bindings


def read_until(stream, marker: str, seconds: float) -> str:
    """Read from a child's pipe until ``marker`` appears (or fail after ``seconds``)."""
    seen = ""
    deadline = time.monotonic() + seconds
    os.set_blocking(stream.fileno(), False)
    while marker not in seen:
        assert time.monotonic() < deadline, f"no {marker!r} from the child; it said:\n{seen[-2000:]}"
        chunk = stream.read()
        seen += chunk.decode("utf-8", "replace") if chunk else ""
        time.sleep(0.05)
    return seen


def hear_ctrl_c() -> None:
    """In the child: take SIGINT as Python does by default (a background job inherits it ignored)."""
    signal.signal(signal.SIGINT, signal.SIG_DFL)


@pytest.mark.skipif(not Path("/proc/self/stat").exists(), reason="reads CPU time from /proc")
def test_ctrl_c_in_a_child_shell_returns_to_the_prompt(tmp_path):
    child = subprocess.Popen([sys.executable, "-m", "ketsplit"], stdin=subprocess.PIPE,
                             stdout=subprocess.PIPE, stderr=subprocess.STDOUT, preexec_fn=hear_ctrl_c,
                             env=dict(os.environ, XDG_DATA_HOME=str(tmp_path)))  # history there
    try:
        child.stdin.write(b"x = |00> + |11>\n")
        child.stdin.flush()
        read_until(child.stdout, "norm", 120)
        child.stdin.write((LONG + "\n").encode())
        child.stdin.flush()
        wait_for_cpu(child.pid, 1.0)
        child.send_signal(signal.SIGINT)
        said = read_until(child.stdout, "cancelled", 30)
        child.stdin.write(b"rank x\n")
        child.stdin.close()
        said += read_until(child.stdout, "rank: 2", 30)
        assert child.wait(30) == 0
    finally:
        if child.poll() is None:
            child.kill()
            child.wait()
    assert "Traceback" not in said


def cpu_time(pid: int) -> float:
    """User plus system CPU seconds of a process, from /proc/PID/stat."""
    fields = Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()
    return (int(fields[11]) + int(fields[12])) / os.sysconf("SC_CLK_TCK")


def wait_for_cpu(pid: int, seconds: float) -> None:
    """Wait until the process has used ``seconds`` more CPU time: then it is computing."""
    target, deadline = cpu_time(pid) + seconds, time.monotonic() + 120
    while cpu_time(pid) < target:
        assert time.monotonic() < deadline, f"the child did not get {seconds} s of CPU in 2 min"
        time.sleep(0.1)


@pytest.mark.skipif(not Path("/proc/self/stat").exists(), reason="reads CPU time from /proc")
def test_ctrl_c_during_ketsplit_c_ends_it_without_a_traceback():
    child = subprocess.Popen([sys.executable, "-m", "ketsplit", "-c", f"x = |00> + |11>; {LONG}"],
                             stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True,
                             preexec_fn=hear_ctrl_c)
    wait_for_cpu(child.pid, 2.0)  # imports take well under a second of CPU: now it computes
    child.send_signal(signal.SIGINT)
    out, err = child.communicate(timeout=60)
    assert child.returncode == 130 and "cancelled" in err and "Traceback" not in err + out


# -- saving: all or nothing ----------------------------------------------------------------------

WRITER = """
import sys
from ketsplit.base.files import write_atomic
path, size = sys.argv[1], int(sys.argv[2])
texts = [f"version {m}\\n" + m * size + "\\nend\\n" for m in "AB"]
print("ready", flush=True)
k = 0
while True:
    write_atomic(path, texts[k % 2])
    k += 1
"""


def test_a_save_killed_at_random_moments_leaves_the_old_file_or_the_new(tmp_path):
    size = 4_000_000
    versions = {f"version {m}\n" + m * size + "\nend\n" for m in "AB"}
    target = tmp_path / "sheet.kss"
    write_atomic(target, next(iter(versions)))
    rng = random.Random(20261201)
    torn_chances, tries = 0, 0
    # at least 5 kills, and more (up to 40) until one lands while a new version is being
    # written: where it lands depends on the machine's load, so the count is not fixed
    while tries < 5 or (torn_chances == 0 and tries < 40):
        tries += 1
        child = subprocess.Popen([sys.executable, "-c", WRITER, str(target), str(size)],
                                 stdout=subprocess.PIPE)
        assert child.stdout.readline() == b"ready\n"
        time.sleep(rng.uniform(0.05, 0.3))
        child.kill()  # SIGKILL: no handler, no cleanup, no flush
        child.wait()
        child.stdout.close()
        assert target.read_text(encoding="utf-8") in versions
        torn_chances += any(p.name.endswith(".part") for p in tmp_path.iterdir())
        write_atomic(target, target.read_text(encoding="utf-8"))  # the next save sweeps litter
        assert [p.name for p in tmp_path.iterdir()] == [target.name]
    # at least one kill landed while a new version was being written: the test tested something
    assert torn_chances >= 1


def test_a_read_only_worksheet_is_not_replaced(tmp_path):
    target = tmp_path / "kept.kss"
    target.write_text("old\n")
    target.chmod(0o444)
    with pytest.raises(WriteError) as info:
        write_atomic(target, "new\n")
    assert "read-only" in info.value.message and "left as it was" in info.value.message
    assert isinstance(info.value, InputError) and isinstance(info.value, OSError)
    assert target.read_text() == "old\n"
    assert list(tmp_path.iterdir()) == [target]


@pytest.mark.skipif(os.geteuid() == 0, reason="root writes into read-only directories")
def test_a_read_only_directory(tmp_path):
    tmp_path.chmod(0o555)
    try:
        with pytest.raises(WriteError) as info:
            write_atomic(tmp_path / "new.kss", "text\n")
        assert "not writable" in info.value.message
    finally:
        tmp_path.chmod(0o755)


def test_a_name_with_a_nul_byte(tmp_path):
    with pytest.raises(WriteError) as info:
        write_atomic(tmp_path / "a\x00b.kss", "text\n")
    assert "NUL" in info.value.message and list(tmp_path.iterdir()) == []


def test_a_missing_directory(tmp_path):
    with pytest.raises(WriteError) as info:
        write_atomic(tmp_path / "no" / "such" / "sheet.kss", "text\n")
    assert "does not exist" in info.value.message and "nothing was written" in info.value.message


def test_a_full_disk_leaves_the_old_file_and_no_litter(tmp_path, monkeypatch):
    target = tmp_path / "sheet.kss"
    target.write_text("old\n")

    def full(fd):
        raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))
    monkeypatch.setattr(os, "fsync", full)
    with pytest.raises(WriteError) as info:
        write_atomic(target, "new\n" * 1000)
    assert "disk is full" in info.value.message
    assert info.value.errno == errno.ENOSPC and info.value.strerror.startswith("the disk is full")
    assert target.read_text() == "old\n"
    assert list(tmp_path.iterdir()) == [target]


CAPPED = """
import resource, signal, sys
from ketsplit.base.files import WriteError, write_atomic
signal.signal(signal.SIGXFSZ, signal.SIG_IGN)
resource.setrlimit(resource.RLIMIT_FSIZE, (10_000, 10_000))
try:
    write_atomic(sys.argv[1], "x" * 100_000)
except WriteError as err:
    print(err.message)
"""


def test_a_file_size_cap_is_a_clear_error(tmp_path):
    # RLIMIT_FSIZE makes the kernel refuse the write itself (EFBIG), as a full disk would (ENOSPC)
    target = tmp_path / "sheet.kss"
    target.write_text("old\n")
    done = subprocess.run([sys.executable, "-c", CAPPED, str(target)], capture_output=True,
                          text=True, timeout=120)
    assert "larger than this process may write" in done.stdout, done.stderr
    assert target.read_text() == "old\n"
    assert list(tmp_path.iterdir()) == [target]


def test_save_to_a_read_only_file_is_an_input_error_and_the_session_goes_on(tmp_path):
    target = tmp_path / "kept.kss"
    target.write_text("old\n")
    target.chmod(0o444)
    session = Session()
    session.run("x = |00> + |11>")
    with pytest.raises(InputError) as info:
        session.run(f"save {target}")
    assert "read-only" in info.value.message and info.value.line == 1
    assert target.read_text() == "old\n"
    assert "x" in session.bindings


def test_save_and_export_write_through_the_atomic_writer(tmp_path, monkeypatch):
    # the all-or-nothing test above covers write_atomic; here: 'save' and 'export -o' use it
    import ketsplit.base.files as atomic
    from ketsplit.cli import main
    written = []
    original = atomic.write_atomic
    monkeypatch.setattr(atomic, "write_atomic", lambda path, text: (written.append(Path(path).name),
                                                                     original(path, text)))
    Session().run(f"x = |00> + |11>; save {tmp_path / 'a.kss'}")
    assert main(["export", str(tmp_path / "a.kss"), "--to", "md", "-o", str(tmp_path / "a.md")]) == 0
    assert written == ["a.kss", "a.md"]

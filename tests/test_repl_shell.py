"""The shell driven through prompt_toolkit's pipe input: type, continue, complete, cancel, recover."""

from __future__ import annotations

import _thread
import threading
import time

import pytest

from ketsplit.commands.registry import COMMANDS, Command
from ketsplit.base.document import Report

from repl_driver import CTRL_C, CTRL_D, ENTER, TAB, drive, new_shell, shell_mode

def test_typed_statements_run_through_the_session():
    shell = new_shell()
    out = drive(shell, "psi = (|00> + |11>)/sqrt(2)" + ENTER + "rank psi" + ENTER)
    assert "rank: 2" in out   # a Bell pair has Schmidt rank 2 (fact of the trade)
    assert set(shell.session.bindings) == {"psi"}


def test_a_line_with_an_open_bracket_or_a_trailing_operator_goes_on():
    shell = new_shell(mode=shell_mode(pretty=False))
    out = drive(shell, "psi = (|00> +" + ENTER + "|11>" + ENTER + ")/sqrt(2)" + ENTER,
                "chi = |00> -" + ENTER + "|11>" + ENTER, "schmidt psi" + ENTER)
    assert [e.source for e in shell.session.worklog][:2] == [
        "psi = (|00> + |11> )/sqrt(2)", "chi = |00> - |11>"]
    # (|00> + |11>)/sqrt(2): both Schmidt coefficients are 1/sqrt(2) (fact of the trade)
    assert "coefficients: [sqrt(2)/2, sqrt(2)/2]" in out


def test_tab_completes_commands_and_bound_names():
    shell = new_shell()
    shell.session.run("pair = (|01> - |10>)/sqrt(2)")
    out = drive(shell, "sch", TAB, " pai", TAB, ENTER, pause=0.3)
    assert "Schmidt decomposition of pair" in out


def test_an_error_prints_its_caret_and_the_session_goes_on():
    shell = new_shell()
    out = drive(shell, "psi = |00> + |11>" + ENTER, "schmit psi" + ENTER,
                "chi = |0> + ; rank psi" + ENTER, "rank psi" + ENTER)
    assert "error: unknown command 'schmit'; did you mean 'schmidt'?" in out
    assert "  schmit psi\n  ^^^^^^" in out
    assert out.count("rank: 2") == 1
    assert set(shell.session.bindings) == {"psi"}


def test_a_line_is_atomic_an_error_later_on_it_undoes_what_came_before():
    shell = new_shell()
    drive(shell, "a = |0>; b = |1>; rank nothing 3|4" + ENTER)
    assert shell.session.bindings == {} and shell.session.worklog == []


def test_ctrl_c_at_the_prompt_drops_the_input_and_ctrl_d_leaves():
    shell = new_shell()
    out = drive(shell, "psi = |00> +", CTRL_C, "rank |00> + |11>" + ENTER, CTRL_D, CTRL_D,
                "rank |00>" + ENTER)
    assert "psi" not in shell.session.bindings
    assert "1 line of work not saved" in out  # the first Ctrl-D asks, the second leaves
    assert out.count("rank:") == 1          # nothing after Ctrl-D ran


@pytest.fixture
def lingering_command(monkeypatch):
    """A statement that binds a name and then computes until interrupted."""
    started = threading.Event()

    def linger(call) -> Report:
        call.session.bindings["half_done"] = 1
        started.set()
        deadline = time.monotonic() + 20
        while time.monotonic() < deadline:
            time.sleep(0.01)
        raise AssertionError("the interrupt never arrived")

    monkeypatch.setitem(COMMANDS, "linger", Command("linger", "linger", "test only", "linger", linger))
    return started


def test_ctrl_c_cancels_a_running_computation_and_keeps_every_binding(lingering_command):
    shell = new_shell()

    def interrupt() -> None:
        if lingering_command.wait(10):
            _thread.interrupt_main()
    threading.Thread(target=interrupt).start()
    out = drive(shell, "psi = |00> + |11>" + ENTER, "digits 40" + ENTER, "linger" + ENTER,
                "rank psi" + ENTER)
    assert "cancelled: the session is as it was before this line" in out
    assert set(shell.session.bindings) == {"psi"}
    assert shell.session.settings.digits == 40
    assert [e.source for e in shell.session.worklog] == ["psi = |00> + |11>", "digits 40",
                                                             "rank psi"]
    assert "rank: 2" in out


def test_a_spinner_shows_the_elapsed_time_on_long_computations(monkeypatch):
    def wait(call) -> Report:
        time.sleep(0.6)
        return Report("waited")
    monkeypatch.setitem(COMMANDS, "wait", Command("wait", "wait", "test only", "wait", wait))
    shell = new_shell(spinner=True, spinner_delay=0.2)
    shell.handle("wait")
    out = shell.console.stream.getvalue()
    assert "computing" in out and " s" in out and out.rstrip().endswith("waited")
    shell.handle("wait for it")                       # labelled with the statement's first word
    assert "wait …" in shell.console.stream.getvalue()
    quick = new_shell(spinner=True, spinner_delay=0.5)
    quick.handle("rank |00> + |11>")
    assert "computing" not in quick.console.stream.getvalue()


def test_long_output_is_folded_and_more_shows_it_whole():
    shell = new_shell(mode=shell_mode(pretty=False, fold=5))
    for line in ("psi = sum(n=0..11, |n,n>)", "schmidt psi", "more"):
        shell.handle(line)
    out = shell.console.stream.getvalue()
    assert "more lines folded: type 'more'" in out
    whole = shell.last_output
    assert out.endswith(whole + "\n") and whole.count("\n") > 10


def test_display_switches_between_two_d_and_linear():
    shell = new_shell()
    drive(shell, "x = |0>/sqrt(2) + |1>/sqrt(2)" + ENTER, "display linear" + ENTER, "x" + ENTER)
    out = shell.console.stream.getvalue()
    assert "√2" in out and "sqrt(2)/2 |0> + sqrt(2)/2 |1>" in out
    assert not shell.mode.pretty


def test_help_shows_the_registry_entry_and_a_worked_scenario():
    shell = new_shell()
    drive(shell, "help schmidt" + ENTER, "help kets" + ENTER, "help" + ENTER)
    out = shell.console.stream.getvalue()
    assert COMMANDS["schmidt"].example in out and "worked scenario:" in out
    assert "|0,1,10>" in out and "help keys" in out


def test_the_status_line_reports_the_session():
    shell = new_shell()
    shell.handle("space A:2 B:2\nreal t\npsi = cos(t)|00> + sin(t)|11>")
    status = shell.status().pieces()
    assert status[:5] == ["30 digits", "bits", "space A:2 B:2", "1 name", "1 parameter"]
    assert status[5] == "2-D" and status[6].startswith("last ")


def test_two_d_output_wider_than_the_terminal_is_shown_linear():
    shell = new_shell(width=30)
    shell.handle("x = (|00> + |11>)/sqrt(2)\nschmidt (|00> + |01> + |10>)/sqrt(3)")
    out = shell.console.stream.getvalue()
    assert "√2" in out                                   # narrow enough: 2-D
    assert "shown linear: the 2-D form is wider than the terminal" in out
    assert "sqrt(15)" in out                             # the wide one in linear text


def test_a_wide_two_d_text_is_folded_linear_to_the_width():
    shell = new_shell(width=20)
    shell.handle("x = 2|00> + 3|11> + 5|22>")
    out = shell.console.stream.getvalue()
    assert "shown linear" in out and "2 |00> +\n" in out
    assert all(len(line) <= 20 for line in out.splitlines() if "shown linear" not in line)

"""Help: every command's registry entry shows, and every worked scenario runs as written."""

from __future__ import annotations

import pytest

from ketsplit.commands import COMMANDS
from ketsplit.repl import helptext
from ketsplit import Session

from repl_driver import new_shell


@pytest.mark.parametrize("topic", sorted(helptext.SCENARIOS))
def test_each_scenario_runs_in_a_fresh_session(topic):
    assert topic in COMMANDS, f"a scenario for {topic!r}, which is not a command"
    results = Session().run("\n".join(helptext.SCENARIOS[topic].statements))
    assert len(results) == len(helptext.SCENARIOS[topic].statements)
    assert any(r.kind == topic for r in results)   # the scenario uses the command it explains


@pytest.mark.parametrize("name", sorted(COMMANDS))
def test_help_for_every_command_shows_usage_and_example(name):
    shell = new_shell()
    shell.handle(f"help {name}")
    out = shell.console.stream.getvalue()
    entry = COMMANDS[name]
    assert entry.example.strip() and entry.usage in out and entry.example in out


def test_language_topics_are_shown_by_the_shell():
    for topic in helptext.TOPICS:
        shell = new_shell()
        shell.handle(f"help {topic}")
        out = shell.console.stream.getvalue()
        assert out.startswith(f"help {topic}\n") and "error" not in out


def test_the_schmidt_scenario_gives_cos_and_sin_at_pi_over_eight():
    # the pair cos(t)|01> + sin(t)|10> has Schmidt coefficients cos t, sin t (fact of the trade);
    # at t = pi/8 these are sqrt(2 + sqrt(2))/2 and sqrt(2 - sqrt(2))/2 (half-angle formulas)
    import sympy
    results = Session().run("\n".join(helptext.SCENARIOS["schmidt"].statements))
    coefficients = next(item.value for item in results[-1].report.items
                        if getattr(item, "label", "") == "coefficients")
    expected = [sympy.sqrt(2 + sympy.sqrt(2)) / 2, sympy.sqrt(2 - sympy.sqrt(2)) / 2]
    from ketsplit.arith.decide import is_zero
    assert all(is_zero(c - e).value is True for c, e in zip(coefficients, expected))

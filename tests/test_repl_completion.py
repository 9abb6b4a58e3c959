"""Tab completion: commands, bound names, parameters, figure names, worksheet files."""

from __future__ import annotations

from prompt_toolkit.completion import CompleteEvent
from prompt_toolkit.document import Document

from ketsplit.commands import COMMANDS
from ketsplit.figures import NAMES as FIGURE_NAMES
from ketsplit.repl.completion import ShellCompleter
from ketsplit.sheets.format import EXTENSION
from ketsplit.repl.helptext import TOPICS
from ketsplit import Session


def offered(session: Session, text: str) -> dict[str, str]:
    completer = ShellCompleter(session, TOPICS)
    found = completer.get_completions(Document(text), CompleteEvent(completion_requested=True))
    return {c.text.rstrip(" ("): c.display_meta_text for c in found}


def session_with_names() -> Session:
    session = Session()
    session.run("real theta in [0, pi]\npositive r\n"
                "pair = cos(theta)|00> + sin(theta)|11>\npsi = |00> + r|11>")
    return session


def test_first_word_offers_commands_declarations_and_names():
    session = session_with_names()
    assert set(offered(session, "sch")) == {name for name in COMMANDS if name.startswith("sch")}
    assert offered(session, "re")["real"] == "declaration"
    assert offered(session, "pa")["pair"] == "state of 2×2"
    assert set(COMMANDS) <= set(offered(session, ""))


def test_later_words_offer_names_parameters_and_functions():
    session = session_with_names()
    got = {k: v for k, v in offered(session, "schmidt p").items() if v != "figure"}
    assert got == {"pair": "state of 2×2", "psi": "state of 2×2", "pi": "constant"}
    assert offered(session, "schmidt pair with th")["theta"] == "real parameter"
    assert offered(session, "x = r co")["cos"] == "function"
    assert offered(session, "x = 1; sch") == {n: "command" for n in COMMANDS if n.startswith("sch")}


def test_figure_names_are_offered():
    got = offered(Session(), "plot ")
    assert FIGURE_NAMES and all(got.get(name) == "figure" for name in FIGURE_NAMES)


def test_help_offers_commands_and_topics():
    got = offered(Session(), "help ")
    assert set(COMMANDS) | set(TOPICS) <= set(got)


def test_nothing_is_offered_inside_a_ket():
    assert offered(session_with_names(), "x = |0") == {}


def test_save_and_open_complete_worksheet_file_names(tmp_path, monkeypatch):
    extension = EXTENSION
    (tmp_path / f"crystal{extension}").write_text("")
    (tmp_path / "cluster").mkdir()
    (tmp_path / "notes.pdf").write_text("")
    monkeypatch.chdir(tmp_path)
    for command in ("save", "open"):
        got = set(offered(Session(), f"{command} c"))
        assert got == {f"rystal{extension}", "luster"}
        assert "otes.pdf" not in set(offered(Session(), f"{command} n"))

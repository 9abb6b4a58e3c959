"""The interactive shell: a thin prompt_toolkit layer over one Session.

Each submitted input is split into statements (lines that must go on are
joined, see :mod:`.continuation`), and each line runs through
``Session.run`` in the main thread, where Ctrl-C reaches it; the line is
atomic: on a Ctrl-C or an error the session is rolled back to what it was
before the line (:mod:`.guard`).  Everything the shell prints comes from the
Session's results; the shell adds only display choices, help scenarios and
directives of its own: ``more``, ``display pretty|linear``, ``exit`` and
``quit``.  Leaving (Ctrl-D, exit, quit) with work not saved since the last
``save`` or ``open`` asks once: it says how many lines would be lost and
leaves on the second request.  Asking was chosen over a recovery file because
it writes nothing the user did not ask for, and the answer is one keystroke.
"""

from __future__ import annotations

import contextlib
import functools
import shutil
import sys
import time
from typing import TextIO

from prompt_toolkit import PromptSession
from prompt_toolkit.auto_suggest import AutoSuggestFromHistory
from prompt_toolkit.history import History, InMemoryHistory
from prompt_toolkit.input import Input
from prompt_toolkit.lexers import PygmentsLexer
from prompt_toolkit.lexers.pygments import SyncFromStart
from prompt_toolkit.output import Output

from ..commands import COMMANDS
from ..base.errors import InputError
from ..language.statements import leading_words
from ..render.text import wrap_lines
from ..api import Session
from ..session import UNRECORDED as FILE_STATEMENTS, strip_comment
from . import helptext
from .completion import DIRECTIVES, ShellCompleter
from .continuation import logical_lines
from .display import Console, Mode, error_lines, results_text
from .guard import guarded
from .history import open_history
from .keys import shell_bindings
from .lexer import KetLexer, session_vocabulary, shell_style
from .spinner import DELAY, Spinner
from .status import Status, continuation, prompt, toolbar
from .terminal import no_echo



def words_of(code: str) -> tuple[str, ...]:
    """The first three words of a line by the statement grammar (none if it has no tokens)."""
    try:
        return tuple(word.text for word in leading_words(code, 1, 3))
    except InputError:
        return ()


def help_topic(code: str) -> str | None:
    """TOPIC of ``help TOPIC``: the shell adds its scenario to the statement's result."""
    words = words_of(code)
    return words[1] if len(words) == 2 and words[0] == "help" else None


class Shell:
    """One Session, its display mode, and what the status line reports."""

    def __init__(self, session: Session | None = None, out: TextIO | None = None,
                 mode: Mode = Mode(), colour: bool | None = None, spinner: bool | None = None,
                 spinner_delay: float = DELAY, width: int | None = None,
                 keyboard: TextIO | None = None) -> None:
        self.session = Session() if session is None else session
        self.console = Console(sys.stdout if out is None else out, colour)
        self.mode = mode
        self.spinner = self.console.stream.isatty() if spinner is None else spinner
        self.spinner_delay = spinner_delay
        self.width = width   # columns for 2-D output; None: the terminal's, if any
        self.keyboard = keyboard  # the terminal typed on, kept silent while computing
        self.elapsed: float | None = None
        self.last_output = ""
        self.saved = 0      # length of the work log at the last save or open
        self.warned = 0     # unsaved lines when leaving was last refused
        self.leaving = False

    @property
    def columns(self) -> int | None:
        return self.width or self.console.width

    # -- one input -----------------------------------------------------
    def handle(self, text: str) -> None:
        for line in logical_lines(text):
            if self.leaving:
                return
            self.handle_line(line)

    def handle_line(self, line: str) -> None:
        code = strip_comment(line).strip()
        if self.directive(code):
            return
        results = self.compute(line)
        if results is None:
            return
        if any(r.kind in FILE_STATEMENTS for r in results):
            self.saved = len(self.session.worklog)
        text = results_text(results, self.mode.pretty, self.columns)
        topic = help_topic(code)
        extra = helptext.scenario_text(topic) if topic else None
        self.show(text + (f"\n{wrap_lines(extra, self.columns)}" if extra else ""))

    def directive(self, code: str) -> bool:
        """Run ``more``, ``display pretty|linear``, ``exit`` or ``quit``; False for anything else."""
        word = code.split(" ", 1)[0]
        if word not in DIRECTIVES or word in COMMANDS or word in self.session.bindings:
            return False
        if word in ("more", "exit", "quit"):
            if code != word:
                return False
            if word == "more":
                self.show_whole()
            else:
                self.leaving = self.may_leave()
            return True
        chosen = words_of(code)[1:]
        if chosen not in (("pretty",), ("linear",)):
            self.console.lines(error_lines(InputError(
                "display: expected 'display pretty' or 'display linear'")))
            return True
        self.mode = Mode(chosen == ("pretty",), self.mode.fold)
        self.console.line(f"display {self.mode.name}")
        return True

    # -- leaving -------------------------------------------------------
    def unsaved(self) -> int:
        """Lines of work (not help) run since the last save or open."""
        return sum(1 for entry in self.session.worklog[self.saved:]
                   if any(r.kind != "help" for r in entry.results))

    def may_leave(self) -> bool:
        """True to leave now.  With unsaved work, the first request to leave only says
        so (asked once for that work: asked again only after more work)."""
        pending = self.unsaved()
        if not pending or pending == self.warned:
            return True
        self.warned = pending
        lines = "1 line" if pending == 1 else f"{pending} lines"
        self.console.line(wrap_lines(f"{lines} of work not saved ('save FILE' keeps the work); "
                                     "Ctrl-D or exit again leaves without saving", self.columns),
                          "class:error")
        return False

    def compute(self, line: str):
        """The line's results, or None after printing why there are none."""
        started = time.monotonic()
        try:
            with self.spinning(line), no_echo(self.keyboard):
                return guarded(self.session, lambda: self.session.run(line))
        except InputError as err:
            self.console.lines(error_lines(err, self.columns))
        except KeyboardInterrupt:
            self.console.line("cancelled: the session is as it was before this line", "class:error")
        except Exception as err:  # a bug in the engine: say so, keep the session
            self.console.line(f"internal error ({type(err).__name__}: {err}); the session is as "
                              "it was before this line; please report it", "class:error")
        finally:
            self.elapsed = time.monotonic() - started
        return None

    def spinning(self, line: str) -> contextlib.AbstractContextManager:
        """The spinner, labelled with what runs (``schmidt …``), when the output is a terminal."""
        if not self.spinner:
            return contextlib.nullcontext()
        words = strip_comment(line).split()
        label = f"{words[0]} …" if len(words) > 1 else "computing"
        return Spinner(self.console.stream, self.spinner_delay, label)

    # -- output --------------------------------------------------------
    def show(self, text: str) -> None:
        self.last_output = text
        self.console.folded(text, self.mode)

    def show_whole(self) -> None:
        self.console.line(self.last_output or "nothing to show yet")

    def toggle_pretty(self) -> None:
        self.mode = self.mode.toggled()

    def status(self) -> Status:
        return Status.of(self.session, self.mode.name, self.elapsed)

    # -- the prompt ----------------------------------------------------
    def prompt_session(self, history: History | None = None, input: Input | None = None,
                       output: Output | None = None) -> PromptSession:
        lexer = functools.partial(KetLexer, vocabulary=session_vocabulary(self.session))
        return PromptSession(
            message=prompt, multiline=True, prompt_continuation=continuation,
            lexer=PygmentsLexer(lexer, syntax_sync=SyncFromStart()),
            style=shell_style(), include_default_pygments_style=False,
            completer=ShellCompleter(self.session, helptext.TOPICS), complete_while_typing=False,
            history=InMemoryHistory() if history is None else history,
            auto_suggest=AutoSuggestFromHistory(),
            bottom_toolbar=lambda: toolbar(self.status()),
            key_bindings=shell_bindings(self.toggle_pretty, self.show_whole),
            input=input, output=output)

    def loop(self, prompt_session: PromptSession) -> int:
        """Read and run inputs until Ctrl-D (or the end of the input), exit or quit."""
        while not self.leaving:
            try:
                text = prompt_session.prompt()
            except KeyboardInterrupt:
                continue
            except EOFError:
                self.leaving = self.may_leave()
                continue
            try:
                self.handle(text)
            except KeyboardInterrupt:
                self.console.line("cancelled", "class:error")
        return 0


def start() -> int:
    """``ketsplit`` with no arguments."""
    from .. import __version__
    rows = shutil.get_terminal_size().lines
    shell = Shell(mode=Mode(fold=max(10, rows - 6)), keyboard=sys.stdin)
    history, warning = open_history()
    shell.console.line(wrap_lines(f"ketsplit {__version__}: type a state, a command, or 'help'; "
                                  "Tab completes, Ctrl-D or exit leaves", shell.columns))
    if warning:
        shell.console.line(warning, "class:error")
    return shell.loop(shell.prompt_session(history))

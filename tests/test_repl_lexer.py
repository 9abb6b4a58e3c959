"""The shell's lexer: token classes of the state language (DESIGN.md, 'The state language')."""

from __future__ import annotations

import pytest

from ketsplit.repl import lexer as lx
from ketsplit.repl.lexer import KetLexer, Vocabulary, default_vocabulary
from ketsplit import Session
from ketsplit.repl.lexer import session_vocabulary


def tokens(text: str, vocabulary: Vocabulary | None = None) -> list[tuple[object, str]]:
    return [(kind, piece) for _, kind, piece in KetLexer(vocabulary=vocabulary).get_tokens_unprocessed(text)
            if piece.strip()]


def kind_of(text: str, piece: str, vocabulary: Vocabulary | None = None):
    found = [kind for kind, p in tokens(text, vocabulary) if p == piece]
    assert found, f"{piece!r} not a token of {text!r}"
    return found[0]


# Each statement below is one of DESIGN.md's examples of the language.
@pytest.mark.parametrize("text, piece, kind", [
    ("psi = cos(t)|00> + exp(i phi) sin(t)|11>", "|00>", lx.KET),
    ("psi = cos(t)|00> + exp(i phi) sin(t)|11>", "cos", lx.FUNCTION),
    ("psi = cos(t)|00> + exp(i phi) sin(t)|11>", "i", lx.CONSTANT),
    ("psi = cos(t)|00> + exp(i phi) sin(t)|11>", "+", lx.OPERATOR),
    ("schmidt psi 1|2", "schmidt", lx.COMMAND),
    ("schmidt psi 1|2", "1|2", lx.CUT),
    ("rank psi 13|2", "13|2", lx.CUT),
    ("cuts psi A|BC", "A|BC", lx.CUT),
    ("reduce psi 1,3|2", "1,3|2", lx.CUT),
    ("real t, phi in [0, pi]", "real", lx.DECLARATION),
    ("real t, phi in [0, pi]", "in", lx.CLAUSE),
    ("space A:2 B:3 C:2", "space", lx.DECLARATION),
    ("schmidt psi with t=pi/6", "with", lx.CLAUSE),
    ("schmidt psi with t=pi/6", "6", lx.NUMBER),
    ("x = 0.25e-3 |0>", "0.25e-3", lx.NUMBER),
    ("psi = |0,1,10> + |+> - |->", "|0,1,10>", lx.KET),
    ("psi = |0,1,10> + |+> - |->", "|+>", lx.KET),
    ("psi = |0,1,10> + |+> - |->", "|->", lx.KET),
    ("rank |000> + |111> 1|23  # GHZ across one part", "# GHZ across one part", lx.COMMENT),
    ("psi = sum(n=0..4, tanh(r)^n |n,n>)", "sum", lx.CLAUSE),
    ("psi = sum(n=0..4, tanh(r)^n |n,n>)", "..", lx.OPERATOR),
    ("psi = |0>⊗|1>", "⊗", lx.OPERATOR),
])
def test_token_classes(text, piece, kind):
    assert kind_of(text, piece) == kind


def test_a_coefficient_before_a_ket_is_not_a_cut():
    # '2|01>' is 2 times |01>; '(|0>+|1>)|2>' is a product of kets
    assert tokens("x = 2|01>")[-2:] == [(lx.NUMBER, "2"), (lx.KET, "|01>")]
    assert (lx.CUT, "|2") not in tokens("(|0>+|1>)|2>")
    assert tokens("(|0>+|1>)|2>")[-1] == (lx.KET, "|2>")


def test_a_command_word_is_a_command_only_at_the_start_of_a_statement():
    assert kind_of("schmidt psi", "schmidt") == lx.COMMAND
    assert kind_of("x = 1; rank psi", "rank") == lx.COMMAND      # after ';' a new statement starts
    assert kind_of("x = rank", "rank") == lx.NAME
    assert kind_of("rank = 2", "rank") == lx.NAME                 # an assignment target


def test_session_words_follow_the_session():
    session = Session()
    vocabulary = session_vocabulary(session)
    assert kind_of("schmidt psi with t=1", "t", vocabulary) == lx.NAME
    session.run("real t in [0, pi]\npsi = cos(t)|00> + sin(t)|11>")
    assert kind_of("schmidt psi with t=1", "t", vocabulary) == lx.PARAMETER
    assert kind_of("schmidt psi with t=1", "psi", vocabulary) == lx.BOUND


def test_every_character_is_covered_once():
    text = "schmidt (cos(t)|00> + √2 sin(t)|1,10>)/2 1|2 with t=π/3 ; digits 40 # done\n$"
    pieces = list(KetLexer().get_tokens_unprocessed(text))
    assert "".join(p for _, _, p in pieces) == text
    assert pieces[-1][1] == lx.ERROR   # '$' is not part of the language


def test_the_palette_gives_every_class_a_colour():
    classes = [lx.KET, lx.CUT, lx.COMMAND, lx.DECLARATION, lx.CLAUSE, lx.PARAMETER, lx.BOUND,
               lx.FUNCTION, lx.CONSTANT, lx.NUMBER, lx.OPERATOR, lx.COMMENT]
    assert all("#" in lx.PALETTE[c] for c in classes)
    # no colour that vanishes on a white or a black background
    for style in lx.PALETTE.values():
        colour = style.split()[0].lstrip("#")
        level = sum(int(colour[k:k + 2], 16) for k in (0, 2, 4)) / 3
        assert 60 < level < 200, style
    lx.shell_style()  # prompt_toolkit accepts it


def test_default_vocabulary_knows_the_registered_commands():
    from ketsplit.commands import COMMANDS
    assert set(COMMANDS) <= default_vocabulary().commands()

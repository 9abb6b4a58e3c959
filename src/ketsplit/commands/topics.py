"""Help topics that are not commands: the notation of kets, cuts and parameters, and
the shell's keys.  ``help TOPIC`` shows them wherever statements run (the shell,
``-c``, a pipe, a worksheet)."""

from __future__ import annotations

from ..base.document import Note, Report

TOPICS: dict[str, tuple[str, ...]] = {
    "kets": (
        "|0>, |01> (one character a part), |0,1,10> (commas for labels above 9), |+>, |->.",
        "Tensor product by juxtaposition, |0>|1> or (|0>+|1>)(|0>-|1>)/2, or with ⊗.",
        "Finite sums: sum(n=0..3, tanh(r)^n |n,n>).",
        "Scalars: numbers, i, pi, sqrt exp sin cos tan sinh cosh tanh log conj abs, ^ for "
        "powers, and implicit multiplication: 2 cos(t)|0>."),
    "cut": (
        "A cut splits the parts in two: 1|2, 13|2, 1,3|2, or by part names after 'space': A|BC.",
        "For a two-part state the cut may be left out: schmidt psi."),
    "parameters": (
        "real t, phi in [0, pi]    real parameters with a range",
        "positive r                positive parameters",
        "complex z / integer n     (undeclared names are complex parameters)",
        "schmidt psi with t=pi/6   any command at a parameter point"),
    "operators": (
        "Bras <01|, outer products |0><1|, projectors of named states |psi><psi|, inner "
        "products <0|1> or <psi| |phi>.",
        "id is the identity of the declared space, id(d) of one part of d levels; matrices "
        "[[1, 1], [1, -1]]/sqrt(2); A ⊗ B the tensor product of operators; adj(X) the adjoint.",
        "An operator before a ket acts on it: [[0, 1], [1, 0]] |0>; on(X, B) psi or on(CNOT, 3, 1) "
        "psi acts on the parts named or numbered; products of gates act right to left.",
        "Mixtures: rho = density p |psi><psi| + (1 - p) id/4; rho = reduce psi 12 binds a reduced "
        "state. Then: ptranspose, negativity, concurrence, mixedness, fidelity, separable, "
        "opschmidt, schmidtbasis (help COMMAND for each)."),
    "keys": (
        "Enter       run (a new line instead while a bracket is open or the line ends with "
        "an operator)",
        "Alt-Enter   run the input as it stands",
        "Tab         complete the words valid at the cursor; file names after save/open",
        "Ctrl-R      search the history backwards; Up/Down walk it",
        "Ctrl-C      drop the input, or cancel a running computation (the session is kept)",
        "Ctrl-D      leave (on an empty line; with work not saved, it asks once first)",
        "exit, quit  leave, as Ctrl-D does",
        "F2          switch between 2-D and linear output ('display pretty' / 'display linear')",
        "F3          the last folded output whole (also 'more')"),
}


def topic_report(topic: str) -> Report:
    """The topic as a report: one note a paragraph (or a row of a two-column list, whose
    lines wrap under the second column)."""
    return Report(f"help {topic}", tuple(Note(line) for line in TOPICS[topic]),
                  value="\n".join(TOPICS[topic]))


def more_topics() -> str:
    return "more help: " + ", ".join(f"help {t}" for t in TOPICS) + "; help COMMAND for one command"

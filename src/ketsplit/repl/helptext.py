"""Richer help for the shell: a worked scenario per command, and topics of the language.

The registry holds each command's usage, summary and one-line example; here
each gets a short story of our own with statements to type.  Topics that are
not commands (kets, cut, parameters, keys) live in ``commands/topics.py``, so
that ``help kets`` works under ``-c`` too.  Every scenario is run by the
tests, so none can drift from the language.
"""

from __future__ import annotations

from dataclasses import dataclass

from ..commands.topics import TOPICS


@dataclass(frozen=True)
class Scenario:
    story: str
    statements: tuple[str, ...]
    remark: str = ""

    def text(self) -> str:
        lines = [f"  {self.story}"] + [f"    ks⟩ {s}" for s in self.statements]
        if self.remark:
            lines.append(f"  {self.remark}")
        return "\n".join(lines)


SCENARIOS: dict[str, Scenario] = {
    "schmidt": Scenario(
        "A photon-pair source whose crystal angle t sets the balance of the two emission paths:",
        ("real t in [0, pi/2]", "pair = cos(t)|01> + sin(t)|10>", "schmidt pair 1|2",
         "schmidt pair with t=pi/8"),
        "The coefficients are cos t and sin t; at t = pi/8 they are numbers in closed form."),
    "reduce": Scenario(
        "One excitation shared by a ring of three sites A, B, C; what does the pair AB see?",
        ("space A:2 B:2 C:2", "ring = (|100> + |010> + |001>)/sqrt(3)", "reduce ring AB",
         "reduce ring A"),
        "Parts are kept by number (1, 13) or by name (A, AB); the rest is traced out."),
    "rank": Scenario(
        "Is the ring state separable across A|BC? Its Schmidt rank says:",
        ("space A:2 B:2 C:2", "ring = (|100> + |010> + |001>)/sqrt(3)", "rank ring A|BC"),
        "For a family the rank is the generic one; it may drop at special parameter values."),
    "digits": Scenario(
        "Ask for more certified digits before a numeric result:",
        ("digits 50", "digits 30"),
        "Only digits that are certain are ever printed."),
    "figures": Scenario(
        "How entangled is the photon pair at a crystal angle of pi/8?",
        ("real t in [0, pi/2]", "pair = cos(t)|01> + sin(t)|10>", "figures pair with t=pi/8"),
        "Name figures after the state to see only those; 'units nats' switches the logarithm."),
    "cuts": Scenario(
        "A three-site chain in an even-parity superposition: can any site be split off?",
        ("space A:2 B:2 C:2", "chain = (|000> + |011> + |110> + |101>)/2", "cuts chain"),
        "Every bipartition, with its Schmidt rank and entropy."),
    "compare": Scenario(
        "A balanced pair source and one that leaks towards one path: which converts to which?",
        ("source = (|01> + |10>)/sqrt(2)", "leaky = cos(pi/8)|01> + sin(pi/8)|10>",
         "compare source, leaky"),
        "Majorization of the squared coefficients decides conversion by local operations."),
    "plot": Scenario(
        "Entropy of the photon pair across the whole range of the crystal angle:",
        ("real t in [0, pi/2]", "pair = cos(t)|01> + sin(t)|10>", "plot entropy pair over t"),
        "Add --to FILE.svg to keep the picture."),
    "check": Scenario(
        "Hand derivations about the photon pair, checked exactly or with a counterexample:",
        ("real t in [0, pi/2]", "pair = cos(t)|01> + sin(t)|10>",
         "check reduce pair 1 = [[cos(t)^2, 0], [0, sin(t)^2]]",
         "check pair ~ sin(t)|10> + cos(t)|01>"),
        "Use '~' instead of '=' to compare states up to a global phase."),
    "strata": Scenario(
        "Where does the pair stop being entangled as the crystal turns through half a circle?",
        ("real t in [0, pi]", "pair = cos(t)|01> + sin(t)|10>", "strata pair"),
        "Every point of the declared range where the Schmidt rank drops, exactly."),
    "numeric": Scenario(
        "A tiny admixture, 10^-30, that floating point would round away:",
        ("probe = |00> + 10^(-30)|11>", "numeric probe"),
        "Certified digits only: the second coefficient is proved nonzero."),
    "units": Scenario(
        "Entropies in nats rather than bits:",
        ("units nats", "figures (|00> + |11>)/sqrt(2) entropy", "units bits")),
    "help": Scenario(
        "Each command has a usage line, a worked example and, for many, a scenario like this one:",
        ("help schmidt", "help rank"),
        "Topics that are not commands: " + ", ".join(f"help {t}" for t in TOPICS) + "."),
}

def scenario_text(topic: str) -> str | None:
    found = SCENARIOS.get(topic)
    return None if found is None else "worked scenario:\n" + found.text()

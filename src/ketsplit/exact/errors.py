"""Typed ways in which the exact route declines (the planner then takes certified numbers)."""


class NoClosedForm(Exception):
    """The structure (a factor's degree, the kind of numbers) says there is no closed form here."""


class UndecidedZero(NoClosedForm):
    """A zero test the decision layer could not decide: the exact route cannot go on."""

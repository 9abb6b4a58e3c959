"""JSON for scripts (issue 12, item 3): schema 1 as the README's "JSON output" section says."""

from __future__ import annotations

import json
import re
from pathlib import Path

import mpmath
import sympy

from ketsplit.base.document import Between, Digits, machine_name
from ketsplit.render.jsonout import typed
from ketsplit.cli import main

README = Path(__file__).resolve().parents[1] / "README.md"


def objects(capsys, *argv: str) -> list[dict]:
    main(list(argv))
    return [json.loads(line) for line in capsys.readouterr().out.splitlines()]


def readme_section() -> str:
    text = README.read_text(encoding="utf-8")
    start = text.index("## JSON output")
    end = text.find("\n## ", start + 1)
    return text[start:end if end > 0 else None]


def test_readme_example_parses_and_its_rank_is_an_int(capsys):
    blocks = re.findall(r"```json\n(.*?)```", readme_section(), re.S)
    assert blocks, "the README's JSON section shows an example"
    example = json.loads(blocks[0])
    assert example["schema"] == 1
    assert isinstance(example["fields"]["rank"]["value"], int)
    # the example is what the program prints for its statement
    assert objects(capsys, "-c", example["statement"], "--json") == [example]


def test_rank_is_an_int_and_exact_numbers_carry_certified_digits(capsys):
    [data] = objects(capsys, "-c", "schmidt (sqrt(3)|00> + |11>)/2", "--json")
    assert data["schema"] == 1
    fields = data["fields"]
    assert fields["rank"]["value"] == 2 and isinstance(fields["rank"]["value"], int)
    first, second = fields["coefficients"]["value"]
    assert first["exact"] == "sqrt(3)/2" and second["exact"] == "1/2"
    with mpmath.workdps(50):  # reference digits from mpmath
        assert first["digits"] == mpmath.nstr(mpmath.sqrt(3) / 2, 30)
    assert first["certain"] == 30
    assert fields["schmidt_form"]["label"] == "schmidt form"


def test_compare_gives_verdicts_under_stable_names(capsys):
    # Nielsen 1999: the Bell pair converts to any two-qubit state by LOCC, not back
    [data] = objects(capsys, "-c", "compare |00> + |11>, sqrt(3)/2|00> + 1/2|11>", "--json")
    fields = data["fields"]
    assert fields["forward"]["value"]["holds"] is True
    assert fields["backward"]["value"]["holds"] is False
    assert fields["p_backward"]["value"]["exact"] == "1/2"  # Vidal: min over k of tail ratios


def test_verdicts_are_true_false_or_null_with_method_and_proof(capsys):
    holds, fails = objects(capsys, "-c", "real t\ncheck cos(t)^2 + sin(t)^2 = 1\ncheck cos(t)^2 = 1",
                           "--json")[1:]
    assert holds["fields"]["verdict"]["value"]["holds"] is True  # Pythagorean identity
    assert holds["fields"]["verdict"]["value"]["method"]
    assert holds["fields"]["verdict"]["value"]["proof"]
    verdict = fails["fields"]["verdict"]["value"]
    assert verdict["holds"] is False  # cos(t)^2 < 1 away from multiples of pi
    point = fails["fields"]["counterexample"]["value"]
    assert set(point) == {"t"} and "exact" in point["t"]


def test_strata_points_are_objects(capsys):
    # cos t|00> + sin t|11> on [0, pi/2]: rank 2 inside, rank 1 at both ends (fact of the trade)
    data = objects(capsys, "-c", "real t in [0, pi/2]\nstrata cos(t)|00> + sin(t)|11>", "--json")[1]
    table = data["tables"][0]
    assert table["names"] == ["rank", "where", "sample_point"]
    ranks = [row[0]["value"] for row in table["rows"]]
    samples = [row[2]["value"] for row in table["rows"]]
    assert ranks == [2, 1]
    assert all(set(sample) == {"t"} for sample in samples)
    assert samples[1]["t"] == 0  # the sample of the rank-1 stratum {0, pi/2}: its first point
    low = table["rows"][1][1]["value"]
    assert low[0] == {"t": 0} and low[1]["t"]["exact"] == "pi/2"
    assert samples[0]["t"]["exact"] == "pi/4"


def test_an_error_object_has_the_schema_too(capsys):
    _, error = objects(capsys, "-c", "psi = |00>\nschmdt psi", "--json")
    assert error["schema"] == 1 and error["kind"] == "error"


def test_machine_names_are_snake_case_and_stable():
    assert machine_name("schmidt form") == "schmidt_form"
    assert machine_name("A -> B by LOCC") == "a_to_b_by_locc"
    assert machine_name("left vector (1)") == "left_vector_1"
    assert machine_name("rank <=") == "rank_at_most"


def test_typed_cells_for_scripts():
    assert typed(Between("undecided at this precision: between 2 and 3", 2, 3)) == {
        "undecided": True, "at_least": 2, "at_most": 3}
    assert typed(Digits("0.70710678", 8)) == {"exact": None, "digits": "0.70710678", "certain": 8}
    # 1/sqrt(2) = 0.707106781186547524400844362105 (mpmath)
    value = typed(1 / sympy.sqrt(2))
    assert value["exact"] == "sqrt(2)/2" and value["certain"] == 30
    with mpmath.workdps(50):
        assert value["digits"] == mpmath.nstr(1 / mpmath.sqrt(2), 30)
    assert typed(sympy.Symbol("t", real=True) ** 2) == {"exact": "t^2"}


def test_every_object_carries_its_statements_value(capsys):
    # the "value" key describes Result.value: ranks as ints, settings as their new value,
    # exact numbers with certified digits, verdicts true/false/"undecided"
    rank, digits, verdict, undecided, budget, schmidt = objects(
        capsys, "-c", "real t in [0, pi/2]\nrank |000> + |111> 1|23\ndigits 40\n"
        "check cos(t)^2 + sin(t)^2 = 1\ncheck sin(t) = t\nbudget 0\n"
        "schmidt (sqrt(3)|00> + |11>)/2", "--json")[1:]
    assert rank["value"] == 2 and isinstance(rank["value"], int)  # GHZ across 1|23 (fact of the trade)
    assert digits["value"] == 40 and budget["value"] == 0.0
    value = schmidt["value"]
    assert value["type"] == "decomposition" and value["rank"] == 2
    first = value["coefficients"][0]  # budget 0: the certified route, 40 digits asked
    assert first["exact"] is None and first["certain"] == 40
    with mpmath.workdps(60):  # reference digits from mpmath
        assert first["digits"] == mpmath.nstr(mpmath.sqrt(3) / 2, 40)
    assert verdict["value"]["type"] == "verdict" and verdict["value"]["holds"] is True
    # sin t = t only at t = 0: refuted at a point of (0, pi/2] (fact of the trade)
    assert undecided["value"]["holds"] in (False, "undecided")


def test_strata_value_points_are_objects(capsys):
    # cos t|00> + sin t|11> on [0, pi/2]: rank 1 exactly at t = 0 and t = pi/2 (fact of the trade)
    data = objects(capsys, "-c", "real t in [0, pi/2]\nstrata cos(t)|00> + sin(t)|11>", "--json")[1]
    generic, low = data["value"]["strata"]
    assert data["value"]["type"] == "strata" and (generic["rank"], low["rank"]) == (2, 1)
    assert low["points"][0] == {"t": 0} and low["points"][1]["t"]["exact"] == "pi/2"
    assert generic["sample"]["t"]["exact"] == "pi/4"


def test_a_certified_value_has_no_exact_text_and_only_certain_digits(capsys):
    # 1/sqrt(2) twice over: the Bell pair's coefficients on the certified route
    data = objects(capsys, "-c", "numeric (|00> + |11>)/sqrt(2)", "--json")[0]
    first = data["value"]["coefficients"][0]
    assert first["exact"] is None and first["certain"] == 30
    with mpmath.workdps(50):  # mpmath reference
        assert first["digits"] == mpmath.nstr(1 / mpmath.sqrt(2), 30)


def test_plot_value_names_the_files_asked_for(capsys, tmp_path):
    target = tmp_path / "e.svg"
    data = objects(capsys, "-c", f"real t in [0, pi]\nplot entropy cos(t)|00> + sin(t)|11> "
                   f"over t --to {target}", "--json")[1]
    assert data["value"]["type"] == "drawing" and data["value"]["picture"] == str(target)
    assert data["value"]["chart"]["parameter"] == "t"
    assert data["fields"]["written"]["value"] == str(target) and target.exists()


def test_a_checks_exit_status_comes_from_its_verdict(capsys):
    # Pythagorean identity holds; cos(t)^2 = 1 fails at t = pi/2 (fact of the trade)
    assert main(["-c", "real t\ncheck cos(t)^2 + sin(t)^2 = 1"]) == 0
    assert main(["-c", "real t\ncheck cos(t)^2 = 1"]) == 1
    capsys.readouterr()

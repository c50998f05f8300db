"""Tests of the equation parser (routeplan.chemistry.equation)."""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from routeplan.chemistry import Equation, Term, parse_equation
from routeplan.errors import EquationError, RouteplanError


def test_route_format_examples():
    # the examples of ROUTE-FORMAT.md, steps.equation
    eq = parse_equation("Amine + Ac2O -> Amide + AcOH")
    assert eq.reactants == (Term(1.0, "Amine"), Term(1.0, "Ac2O"))
    assert eq.products == (Term(1.0, "Amide"), Term(1.0, "AcOH"))
    eq = parse_equation("2 ArOH + K2CO3 -> 2 ArOK + H2O + CO2")
    assert [(t.coefficient, t.key) for t in eq.reactants] == [(2.0, "ArOH"), (1.0, "K2CO3")]
    assert [(t.coefficient, t.key) for t in eq.products] == [(2.0, "ArOK"), (1.0, "H2O"),
                                                             (1.0, "CO2")]
    assert eq.species == ("ArOH", "K2CO3", "ArOK", "H2O", "CO2")
    assert eq.coefficient("ArOK") == 2.0 and eq.coefficient("K2CO3") == 1.0
    assert eq.side("ArOH") == "reactant" and eq.side("CO2") == "product"
    eq = parse_equation("0.5 X -> Y")
    assert eq.coefficient("X") == 0.5 and eq.coefficient("Y") == 1.0


def test_keys_may_hold_digits_dashes_underscores_and_dots():
    eq = parse_equation("SM-1 + cat_2 + 4-Br.PhOH -> INT.3 + 2ArOH")
    assert eq.species == ("SM-1", "cat_2", "4-Br.PhOH", "INT.3", "2ArOH")
    # a number glued to a key is part of the key, never a coefficient
    assert eq.coefficient("2ArOH") == 1.0


def test_spacing_and_the_unicode_arrow_do_not_matter():
    ref = parse_equation("2 A + B -> C")
    for text in ("2 A+B->C", "  2   A +  B  ->  C  ", "2 A + B → C", "2\tA + B\t->C",
                 "2.0 A + 1 B -> 1.0 C"):
        assert parse_equation(text) == ref
    assert str(ref) == "2 A + B -> C"


def test_missing_key_lookups_raise_key_error():
    eq = parse_equation("A -> B")
    with pytest.raises(KeyError):
        eq.coefficient("C")
    with pytest.raises(KeyError):
        eq.side("C")


def test_results_are_frozen_and_cached():
    eq = parse_equation("A + 2 B -> C")
    assert eq is parse_equation("A + 2 B -> C")
    with pytest.raises(AttributeError):
        eq.reactants = ()  # type: ignore[misc]
    with pytest.raises(AttributeError):
        eq.reactants[0].coefficient = 3.0  # type: ignore[misc]
    assert isinstance(eq, Equation) and hash(eq) == hash(parse_equation("A+2 B->C"))


# (bad equation, text the message must name)
BAD_EQUATIONS = [
    ("A + B", "no arrow '->'"),
    ("A -> B -> C", "2 arrows"),
    ("A → B -> C", "2 arrows"),
    ("-> B", "the reactant side is empty"),
    ("A ->  ", "the product side is empty"),
    ("A + + B -> C", "empty term between two '+' signs"),
    ("A + -> C", "empty term after the last '+'"),
    ("+ A -> C", "empty term before the first '+'"),
    ("A -> C +", "empty term after the last '+' on the product side"),
    ("A + A -> B", "'A' is used twice on the reactant side"),
    ("A -> B + 2 B", "'B' is used twice on the product side"),
    ("A + B -> A", "'A' is used on both sides"),
    ("0 A -> B", "coefficient '0' of 'A'"),
    ("-2 A -> B", "coefficient '-2' of 'A'"),
    ("0.0 A -> B", "coefficient '0.0' of 'A' is not positive"),
    ("0e5 A -> B", "coefficient '0e5' of 'A' is not positive"),
    # outside [1e-6, 1e6]; 1e999 overflows a float to infinity, 1e-400 underflows it to 0,
    # 1e-320 is a subnormal float: each is named as out of range, never read as inf or 0
    ("1e999 A -> B", "coefficient '1e999' of 'A' is out of range"),
    ("1e308 A -> 1e-308 P", "coefficient '1e308' of 'A' is out of range"),
    ("A -> 1e-320 P", "coefficient '1e-320' of 'P' is out of range"),
    ("1e-400 A -> B", "coefficient '1e-400' of 'A' is out of range"),
    ("1000001 A -> B", "coefficient '1000001' of 'A' is out of range: a coefficient lies between 1e-6 and 1e6"),
    ("A -> 9.99e-7 B", "coefficient '9.99e-7' of 'B' is out of range"),
    ("A + 2e6 B -> C", "coefficient '2e6' of 'B' is out of range"),
    ("A B -> C", "'A B' is not a term"),
    ("2 A B -> C", "'2 A B' is not a term"),
    ("A*B -> C", "invalid material key 'A*B'"),
    ("A -> C(s)", "invalid material key 'C(s)'"),
    ("_A -> C", "invalid material key '_A'"),
    ("A + 2 -> C", "'2' is a number without a key"),
    ("A = B", "'='"),
    ("A => B", "'=>'"),
    ("A <=> B", "'<=>'"),
    ("A <-> B", "'<->'"),
    ("A --> B", "'-->'"),
    ("A ⇌ B", "'⇌'"),
    ("", "empty"),
    ("   ", "empty"),
]


@pytest.mark.parametrize("text,named", BAD_EQUATIONS)
def test_bad_equations_are_errors_that_name_the_offending_text(text, named):
    with pytest.raises(EquationError) as info:
        parse_equation(text)
    assert isinstance(info.value, RouteplanError)
    assert named in str(info.value)
    if text.strip():
        assert f"equation '{text}'" in str(info.value)


def test_coefficients_at_the_bounds_are_accepted():
    eq = parse_equation("1e-6 A + 1000000 B -> 0.000001 C + 1e6 D")
    assert [t.coefficient for t in eq.reactants + eq.products] == [1e-6, 1e6, 1e-6, 1e6]


def test_out_of_range_coefficient_suggests_a_fix():
    with pytest.raises(EquationError) as info:
        parse_equation("1e20 A -> B")
    assert "misplaced exponent or decimal point" in info.value.hint


def test_equals_sign_suggests_the_arrow():
    with pytest.raises(EquationError) as info:
        parse_equation("2 H2 + O2 = 2 H2O")
    assert "'->'" in str(info.value) and info.value.hint


def test_non_text_is_an_equation_error():
    for bad in (None, 3, ["A -> B"]):
        with pytest.raises(EquationError):
            parse_equation(bad)  # type: ignore[arg-type]


_key = st.from_regex(r"[A-Za-z][A-Za-z0-9_.\-]{0,6}", fullmatch=True)
_coef = st.one_of(st.integers(1, 20).map(float), st.sampled_from([0.5, 0.25, 1.5, 2.5]))


@settings(max_examples=150, deadline=None)
@given(keys=st.lists(_key, min_size=2, max_size=6, unique=True), data=st.data())
def test_written_equation_reads_back_the_same(keys, data):
    cut = data.draw(st.integers(1, len(keys) - 1))
    coefs = [data.draw(_coef) for _ in keys]
    terms = [Term(c, k) for c, k in zip(coefs, keys)]
    eq = Equation(tuple(terms[:cut]), tuple(terms[cut:]))
    again = parse_equation(str(eq))
    assert again == eq
    assert again.species == tuple(keys)
    for c, k in zip(coefs, keys):
        assert again.coefficient(k) == c
        assert again.side(k) == ("reactant" if keys.index(k) < cut else "product")


@settings(max_examples=300, deadline=None)
@given(st.one_of(st.text(), st.lists(st.sampled_from(
    ["A", "B2", " ", "+", "->", "→", "=", "2", "0", "-1", "0.5", "*", "-", ">", "<", "A-B", "."]),
    max_size=12).map("".join)))
def test_parsing_raises_only_equation_errors(text):
    try:
        eq = parse_equation(text)
    except EquationError:
        return
    assert eq.reactants and eq.products
    assert len(set(eq.species)) == len(eq.species)
    assert all(1e-6 <= t.coefficient <= 1e6 for t in eq.reactants + eq.products)


@settings(max_examples=200, deadline=None)
@given(st.floats(min_value=1e-300, max_value=1e300))
def test_every_coefficient_read_is_in_range(x):
    written = repr(x).replace("e+", "e")  # '+' separates terms, so '1e+16' is written '1e16'
    try:
        eq = parse_equation(f"{written} A -> B")
    except EquationError as exc:
        assert not 1e-6 <= x <= 1e6
        assert "out of range" in str(exc)
    else:
        assert 1e-6 <= x <= 1e6 and eq.coefficient("A") == x

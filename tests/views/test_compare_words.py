"""A comparison in words: every row worded by its key, the texts beside values, why a row is
not ranked and the notes, all from the data the comparison holds (plan/compare.py words
nothing)."""

from __future__ import annotations

import pytest

from conftest import ROOT
from routeplan.plan.compare import (HIGHER, LOWER, CompareRow, Comparison, OveragesDiffer, StepsWithoutYield,
                                    TargetFromFirst, Unranked, YieldsDrawn, YieldsPlanned, compare_plans,
                                    plan_for_comparison)
from routeplan.route.load import load_route
from routeplan.views.compare_text import tradeoff_sentence
from routeplan.views.compare_words import (HEADINGS, QUALIFIER_TEXT, SHORT, heading, note_text, note_texts,
                                           shown_rows, unranked_text, value_labels)
from routeplan.vocab import UnrankedReason, ValueQualifier, YieldCase

LINEAR = ROOT / "demo_routes" / "hx17-linear.yaml"
CONVERGENT = ROOT / "demo_routes" / "hx17-convergent.yaml"
WHO_A = f"'{LINEAR}' (HX-17 route A (linear, via the ethyl ester))"
WHO_B = f"'{CONVERGENT}' (HX-17 route B (convergent, via the chloroacetamide))"


@pytest.fixture(scope="module")
def drawn():
    plans, notes = plan_for_comparison([load_route(LINEAR), load_route(CONVERGENT)], confidence=0.9, draws=500,
                                       seed=2)
    return compare_plans(plans, notes)


def _bare(names=("A", "B"), labels=None) -> Comparison:
    """A comparison without plans: enough for the words that name routes by name or label."""
    return Comparison(labels=tuple(labels or names), names=tuple(names), files=(None,) * len(names),
                      target_material="X", amount=1.0, currency=None, rows=())


def test_tradeoff_sentence_splits_wins():
    rows = [
        CompareRow("pmi", "kg/kg", "ratio", LOWER, (20.0, 30.0), best=(0,)),
        CompareRow("overall_yield", "-", "fraction", HIGHER, (0.5, 0.7), best=(1,)),
        CompareRow("batches", "-", "count", LOWER, (6, 9), best=(0,)),
        CompareRow("steps", "-", "count", LOWER, (4, 4)),
        CompareRow("cost_per_kg", "EUR/kg", "money", LOWER, (1.0, None),
                   unranked=Unranked(UnrankedReason.NO_VALUE)),
    ]
    text = tradeoff_sentence(["A", "B"], rows)
    assert text == ("A wins on PMI and batches; B wins on overall yield; the routes are equal on steps; "
                    "raw-material cost cannot be ranked.")


def test_every_row_is_worded(drawn):
    keys = [r.key for r in drawn.rows]
    assert set(keys) == set(HEADINGS) == set(SHORT)  # with --confidence every row is there
    shown = shown_rows(drawn)
    assert [r.key for r in shown] == keys
    for row, data in zip(shown, drawn.rows):
        assert row.heading == heading(data, drawn) and row.short == SHORT[data.key]
        assert (row.values, row.best, row.unit, row.better) == (data.values, data.best, data.unit, data.better)
    # the confidence target's heading names the confidence the plans were drawn for
    assert shown[keys.index("confidence_target")].heading == "target to plan for 90 % confidence, before overage"


def test_the_data_beside_values_is_worded_by_row(drawn):
    row = drawn.row("longest_linear_sequence")
    assert row.which == (("S1", "S2", "S3", "S4", "S5"), ("B2", "B3"))  # data: the step ids
    assert value_labels(row) == ("S1 → S2 → S3 → S4 → S5", "B2 → B3")
    assert value_labels(drawn.row("campaign_h")) == ("pace: S5", "pace: B3")
    assert value_labels(drawn.row("largest_raw_material")) == ("water", "water")
    assert value_labels(drawn.row("pmi")) == ()  # nothing beside a PMI
    cost = CompareRow("cost_per_kg", "EUR/kg", "money", LOWER, (1.0, 2.0),
                      qualifiers=(None, ValueQualifier.PRICED_MATERIALS_ONLY))
    assert value_labels(cost) == (None, "priced materials only")
    assert set(QUALIFIER_TEXT) == set(ValueQualifier)


@pytest.mark.parametrize("why, text", [
    (Unranked(UnrankedReason.NO_VALUE), "a route has no value"),
    (Unranked(UnrankedReason.CURRENCIES, currencies=("EUR", "USD")),
     "the routes give prices in different currencies (EUR, USD)"),
    (Unranked(UnrankedReason.CURRENCIES, currencies=(None, "EUR")),
     "the routes give prices in different currencies (EUR; a route gives none)"),
    (Unranked(UnrankedReason.NO_COST), "a route has no cost (no currency or no prices)"),
    (Unranked(UnrankedReason.NOTHING_PRICED),
     "a route has nothing priced here (no currency, prices, rates or waste prices)"),
    (Unranked(UnrankedReason.UNPRICED_MATERIALS, routes=(0, 1), items=(("KI",), ("DCM", "water"))),
     "priced raw materials only, some have no price (A: KI; B: DCM, water)"),
    (Unranked(UnrankedReason.UNPRICED_ITEMS, routes=(1,), items=(("R630",),)),
     "priced items only, some have no price (B: R630)"),
    (Unranked(UnrankedReason.NO_SCHEDULE), "a route has no schedule (a step without cycle_time)"),
    (Unranked(UnrankedReason.NO_UNCERTAINTY, routes=(1,)),
     "B carries no uncertainty (no step gives a yield range)"),
    (Unranked(UnrankedReason.NO_UNCERTAINTY, routes=(0, 1)),
     "A and B carry no uncertainty (no step gives a yield range)"),
    (Unranked(UnrankedReason.YIELDS_WITHOUT_CASE, routes=(0,), yields=YieldCase.LOW),
     "A (a.yaml) has steps without a low yield, planned at their expected yields"),
    (Unranked(UnrankedReason.YIELDS_WITHOUT_CASE, routes=(0, 1), yields=YieldCase.HIGH),
     "A (a.yaml), B (b.yaml) have steps without a high yield, planned at their expected yields"),
], ids=lambda x: x.reason if isinstance(x, Unranked) else "")
def test_every_reason_is_worded(why, text):
    # names by route name, except the yields note, which names the column labels
    cmp = _bare(labels=("A (a.yaml)", "B (b.yaml)"))
    assert unranked_text(why, cmp) == f"not ranked: {text}"


def test_every_reason_has_words():
    cmp = _bare()
    for reason in UnrankedReason:
        why = Unranked(reason, routes=(0,), items=(("KI",),), currencies=("EUR", None), yields=YieldCase.LOW)
        assert unranked_text(why, cmp).startswith("not ranked: ")
    assert unranked_text(None, cmp) is None


def test_notes_name_the_routes_by_file(drawn):
    cmp = compare_plans(drawn.plans, [
        TargetFromFirst(25.0, ((1, 30.0),)),
        OveragesDiffer((0.02, 0.05)),
        YieldsPlanned(YieldCase.LOW),
        StepsWithoutYield(0, ("S2", "S3"), YieldCase.LOW),
        StepsWithoutYield(1, ("B3",), YieldCase.LOW),
        YieldsDrawn(500, "beta-PERT", 2),
    ])
    assert note_texts(cmp) == (
        f"every route is planned for 25 kg, the target amount of the first route {WHO_A}; the others ask for "
        f"other amounts ({WHO_B} 30 kg)",
        f"the routes plan different overages ({WHO_A} 2 %, {WHO_B} 5 %), so the masses planned differ; "
        "ratios per kg of target are still comparable",
        "every route is planned at its steps' low yields",
        f"{WHO_A}: steps S2, S3 have no low yield and are planned at the expected yield; the rows that depend "
        "on yields are not ranked",
        f"{WHO_B}: step B3 has no low yield and is planned at the expected yield; the rows that depend on "
        "yields are not ranked",
        "every route's step yields are drawn 500 times (beta-PERT, seed 2)",
    )
    # the draws note made by plan_for_comparison is the same record
    assert drawn.notes == (YieldsDrawn(500, "beta-PERT", 2),)
    with pytest.raises(TypeError):
        note_text("a sentence", cmp)

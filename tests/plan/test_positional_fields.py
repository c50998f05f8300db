"""The planner builds its most numerous result objects with positional arguments (binding
15 keywords per charge line cost a third again of building it).  Those calls are right only
while each class keeps its fields in this order: a change of order must change the calls
named here, and this test says so."""

from __future__ import annotations

import dataclasses

import pytest

from routeplan.plan.campaign import Sized
from routeplan.plan.core import Contents, CoreCharge, CoreStep, WalkStep
from routeplan.plan.model import BatchPlan, ChargePlan, StepPlan

ORDER = {
    # charges.step_plans
    ChargePlan: ("order", "material", "name", "role", "basis", "basis_value", "equiv", "n_mol", "m_kg", "V_L",
                 "intermediate", "implicit", "carried_from", "batches", "leaves"),
    BatchPlan: ("batches", "step_V_L", "fill_fraction", "vessel", "limiting_n_mol", "limiting_m_kg",
                "product_n_mol", "product_m_kg", "reaction_m_kg", "transfer_V_L", "transfer_m_kg"),
    StepPlan: ("id", "name", "equation", "limiting", "limiting_n_mol", "limiting_m_kg", "product",
               "product_n_mol", "product_m_kg", "yield_", "isolated", "charges", "batch", "vessel", "notes",
               "stock_n_mol", "stock_m_kg", "not_run", "safety"),
    # campaign.size_steps
    Sized: ("V_L", "lines_V", "batches", "fill", "reaction_m_kg", "transfer_V_L", "transfer_m_kg"),
    # core.compile_route, core.walk, core.contents
    CoreCharge: ("material", "basis", "factor", "form", "intermediate", "carried_from", "leaves", "workup"),
    CoreStep: ("id", "product", "limiting", "nu_ratio", "yield_", "product_form", "limiting_form", "charges",
               "gases"),
    WalkStep: ("step", "n_product", "n_taken", "n_lim", "m_lim", "charges"),
    Contents: ("lines_V", "lines_m", "fullest_V", "transfer_V", "transfer_m", "reaction_m", "gas_m"),
}


@pytest.mark.parametrize("cls", list(ORDER), ids=[c.__name__ for c in ORDER])
def test_fields_keep_the_order_the_positional_calls_use(cls):
    assert tuple(f.name for f in dataclasses.fields(cls) if f.init) == ORDER[cls]

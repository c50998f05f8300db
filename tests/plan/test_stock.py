"""Stock on hand: which raw material limits, what to buy, three file formats, bad files."""

import math

import openpyxl
import pytest

import routeplan

from conftest import run_cli, write_route
from routeplan.errors import StockError
from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route_text
from test_campaign import ROUTE

# Needs at 20 kg of P (see test_campaign): A 10 kg, solv1 40 kg (50 L), solv2 30 kg.


@pytest.fixture(scope="module")
def route():
    return load_route_text(ROUTE, "campaign.yaml")


def _write(tmp_path, kind, rows):
    if kind == "yaml":
        p = tmp_path / "stock.yaml"
        p.write_text("".join(f"{m}: {a} {u}\n" for m, a, u in rows))
    elif kind == "csv":
        p = tmp_path / "stock.csv"
        p.write_text("material,amount,unit\n" + "".join(f"{m},{a},{u}\n" for m, a, u in rows))
    else:
        p = tmp_path / "stock.xlsx"
        wb = openpyxl.Workbook()
        ws = wb.active
        ws.append(["material", "amount", "unit"])
        for m, a, u in rows:
            ws.append([m, a, u])
        wb.save(p)
    return p


@pytest.mark.parametrize("kind", ["yaml", "csv", "xlsx"])
def test_first_material_limits(tmp_path, route, kind):
    stock = _write(tmp_path, kind, [("A", 5, "kg"), ("solv1", 100, "kg"), ("solv2", 100, "kg")])
    s = plan_route(route, stock=stock).stock
    # ratios on hand / need: A 5/10 = 0.5, solv1 100/40 = 2.5, solv2 100/30 = 3.3 -> 20 kg * 0.5
    assert s.limited_by == "A"
    assert math.isclose(s.max_target.m_as("kg"), 10.0)
    assert [(k, round(m.m_as("kg"), 9)) for k, m in s.to_buy] == [("A", 5.0)]


@pytest.mark.parametrize("kind", ["yaml", "csv", "xlsx"])
def test_second_material_limits_and_volume_units(tmp_path, route, kind):
    # solv1 given as 10 L = 8 kg at 0.8 kg/L: ratio 8/40 = 0.2 -> at most 4 kg of P
    stock = _write(tmp_path, kind, [("A", 50, "kg"), ("solv1", 10, "L")])
    s = plan_route(route, stock=stock).stock
    assert s.limited_by == "solv1"
    assert math.isclose(s.max_target.m_as("kg"), 4.0)
    buy = {k: m.m_as("kg") for k, m in s.to_buy}
    # solv1: 40 - 8 = 32 kg; solv2 is not in stock: all 30 kg
    assert buy == pytest.approx({"solv1": 32.0, "solv2": 30.0})


def test_pounds_are_pounds(tmp_path, route):
    # NIST SP 811: 1 lb = 0.45359237 kg exactly
    stock = _write(tmp_path, "yaml", [("A", 11.0231131092, "lb")])
    s = plan_route(route, stock=stock).stock
    assert math.isclose(s.max_target.m_as("kg"), 20 * 5.0 / 10.0, rel_tol=1e-9)


def test_stock_json_and_terminal(tmp_path):
    path = write_route(tmp_path, ROUTE)
    stock = _write(tmp_path, "yaml", [("A", 5, "kg")])
    result = run_cli("plan", path, "--stock", stock, "--json", "-")
    assert result.exit_code == 0, result.output
    import json

    doc = json.loads(result.stdout)
    assert doc["stock"]["limited_by"] == "A"
    assert doc["stock"]["max_target_kg"] == pytest.approx(10.0)
    assert {b["material"] for b in doc["stock"]["to_buy"]} == {"A", "solv1", "solv2"}
    text = run_cli("plan", path, "--stock", stock).stdout
    assert "limited by A" in text and "not in stock, to buy in full: solv1, solv2" in text


@pytest.mark.parametrize(
    "kind, rows, fragment",
    [
        ("yaml", [("Aa", 5, "kg")], "unknown material 'Aa'"),
        ("csv", [("solv3", 5, "kg")], "did you mean 'solv"),
        ("yaml", [("A", 5, "mol/L")], "mass such as"),
        ("csv", [("A", -5, "kg")], "negative"),
        ("xlsx", [("A", -5, "kg")], "negative"),
        ("yaml", [("I", 5, "kg")], "made in the route"),
        ("yaml", [("A", 5, "L")], "no density"),
        ("csv", [("A", '"1,5"', "kg")], "decimal comma"),
        ("csv", [("A", 5, "kg"), ("A", 6, "kg")], "listed twice"),
    ],
)
def test_bad_stock_files(tmp_path, route, kind, rows, fragment):
    stock = _write(tmp_path, kind, rows)
    with pytest.raises(StockError) as info:
        plan_route(route, stock=stock)
    assert fragment in str(info.value)
    assert stock.name in str(info.value)


def test_bad_stock_locations(tmp_path, route):
    p = tmp_path / "stock.csv"
    p.write_text("material,amount,unit\nA,5,kg\nsolv1,-2,kg\n")
    with pytest.raises(StockError) as info:
        plan_route(route, stock=p)
    assert "stock.csv:3" in str(info.value)
    q = tmp_path / "stock.yaml"
    q.write_text("A: 5 kg\n# comment\nsolvv1: 2 kg\n")
    with pytest.raises(StockError) as info:
        plan_route(route, stock=q)
    assert "stock.yaml:3:1" in str(info.value)


def test_missing_column(tmp_path, route):
    p = tmp_path / "stock.csv"
    p.write_text("material,quantity\nA,5\n")
    with pytest.raises(StockError, match="missing columns amount, unit"):
        plan_route(route, stock=p)


def test_bad_stock_on_the_command_line(tmp_path):
    path = write_route(tmp_path, ROUTE)
    p = tmp_path / "stock.csv"
    p.write_text("material,amount,unit\nA,-5,kg\n")
    result = run_cli("plan", path, "--stock", p)
    assert result.exit_code == 2
    assert "stock.csv:2" in result.stderr and "negative" in result.stderr
    assert "Traceback" not in result.output


def test_stock_json_lists_on_hand_and_missing(tmp_path, route):
    stock = _write(tmp_path, "yaml", [("A", 5, "kg"), ("solv1", 10, "L")])
    doc = routeplan.plan_to_dict(plan_route(route, stock=stock))["stock"]
    # 10 L of solv1 at 0.8 kg/L is 8 kg on hand
    assert doc["on_hand"] == [{"material": "A", "mass_kg": pytest.approx(5.0)},
                              {"material": "solv1", "mass_kg": pytest.approx(8.0)}]
    assert doc["not_in_stock"] == ["solv2"]
    assert doc["file"] == str(stock)


@pytest.mark.parametrize("kind", ["yaml", "csv"])
def test_largest_target_fed_back_needs_nothing_more(tmp_path, kind):
    # law: planning the largest target the stock allows, as --target, leaves nothing of the
    # limiting material to buy, also when the route adds an overage (here 5 %)
    text = ROUTE.replace("target: {material: P, amount: 20 kg}", "target: {material: P, amount: 20 kg, overage: 5 %}")
    route = load_route_text(text, "overage.yaml")
    stock = _write(tmp_path, kind, [("A", 5, "kg"), ("solv1", 100, "kg")])
    s = plan_route(route, stock=stock).stock
    # need of A at 20 kg * 1.05 = 10.5 kg; 5 / 10.5 of the 20 kg asked for = 9.5238 kg
    assert math.isclose(s.max_target.m_as("kg"), 20 * 5 / 10.5, rel_tol=1e-12)
    again = plan_route(route, s.max_target, stock=stock).stock
    assert "A" not in {k for k, m in again.to_buy if m.m_as("kg") > 1e-9}
    assert math.isclose(again.max_target.m_as("kg"), s.max_target.m_as("kg"), rel_tol=1e-12)


def test_stock_file_slips_are_named(tmp_path, route):
    cases = {
        "empty.yaml": ("A:\n", "'A' has no amount"),
        "semi.csv": ("material;amount;unit\nA;5;kg\n", "separated by ';'"),
        "extra.csv": ("material,amount,unit\nA,1,5,kg\n", "row 2 has 4 fields"),
    }
    for name, (text, fragment) in cases.items():
        p = tmp_path / name
        p.write_text(text)
        with pytest.raises(StockError) as info:
            plan_route(route, stock=p)
        assert fragment in str(info.value), name
        assert name in str(info.value)

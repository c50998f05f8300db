"""``routeplan explain`` on the command line: the options of ``plan``, sums of branches, bad input.

* With ``--target``, ``--yields``, ``--stock``, ``--record`` (and ``--record-yields``),
  the closing line of an explanation gives the numbers of ``plan`` run with the same
  options (its JSON), to the four significant figures printed, and the line of the
  derivation that makes each number ends on it.
* Where an intermediate is charged in two steps (tests/data/routes/shared.yaml: benzoyl
  chloride acylates in S2 and in S3), the demand on the step that makes it is a sum
  line naming both charges, each derived on an earlier line; the numbers are checked
  against a hand-worked chain with the CIAAW 2021 standard atomic weights (conventional
  values: C 12.011, H 1.008, N 14.007, O 15.999, Cl 35.45).
* Bad input: an unknown step or material, a material not charged in that step, a raw
  material that is an intermediate, a wrong number of words: exit code 2, no traceback,
  a message naming the nearest valid names.
"""

from __future__ import annotations

import json
import re

import pytest

from conftest import DATA, ROOT, run_cli

LINEAR = ROOT / "demo_routes" / "hx17-linear.yaml"
STOCK = ROOT / "demo_routes" / "stock.yaml"
RECORD = ROOT / "demo_routes" / "record.yaml"
SHARED = DATA / "routes" / "shared.yaml"
UNIT = {"mmol": 1e-3, "mol": 1.0, "kmol": 1e3, "mg": 1e-6, "g": 1e-3, "kg": 1.0, "t": 1e3,
        "mL": 1e-3, "L": 1.0, "m³": 1e3}
KEY = {"mol": "mol", "g": "mass_kg", "kg": "mass_kg", "t": "mass_kg", "mg": "mass_kg", "mmol": "mol",
       "kmol": "mol", "mL": "volume_L", "L": "volume_L", "m³": "volume_L"}


@pytest.fixture(autouse=True)
def _one_line_per_chain(monkeypatch):
    # a wide output keeps each line of a chain on one printed line (the fold to a width is
    # tested in tests/plan/test_explain.py)
    monkeypatch.setenv("COLUMNS", "1000")


def _explain(*args):
    r = run_cli("explain", *args)
    assert r.exit_code == 0, r.output
    return r.stdout.splitlines()


def _plan_json(route, *options, tmp_path):
    out = tmp_path / "plan.json"
    r = run_cli("plan", route, "--json", out, "-q", *options)
    assert r.exit_code == 0, r.output
    return json.loads(out.read_text(encoding="utf-8"))


OPTIONS = {
    "route's target": [],
    "--target": ["--target", "40 kg"],
    "--yields low": ["--yields", "low"],
    "--stock": ["--stock", str(STOCK)],
    "--record": ["--record", str(RECORD)],
    "--record actual": ["--record", str(RECORD), "--record-yields", "actual"],
}
CHARGES = [("S1", "aminophenol"), ("S2", "acetone"), ("S2", "BrCH2CO2Et"), ("S3", "NaOH50"), ("S5", "morpholine")]


@pytest.mark.parametrize("name", list(OPTIONS))
def test_explain_gives_the_numbers_of_plan_with_the_same_options(name, tmp_path):
    options = OPTIONS[name]
    data = _plan_json(LINEAR, *options, tmp_path=tmp_path)
    steps = {s["id"]: s for s in data["steps"]}
    for step, material in CHARGES:
        out = _explain(LINEAR, step, material, *options)
        assert out[-1].startswith("CAUTION")
        closing = out[-2]
        assert closing.startswith("= ") and closing.endswith(f" {material} charged to {step}, as in the plan")
        charge = next(c for c in steps[step]["charges"] if c["material"] == material)
        tail = f" {material} charged to {step}, as in the plan"
        amounts = [x.split(" ") for x in closing[2:-len(tail)].split(", ")]
        assert len(amounts) == sum(charge[k] is not None for k in ("mol", "mass_kg", "volume_L"))
        for text, unit in amounts:
            want = charge[KEY[unit]]
            assert float(text) == float(f"{want / UNIT[unit]:.4g}"), (name, step, material, text, unit, want)
            # and a line of the derivation ends on the same printed number
            assert any(line.endswith(f"= {text} {unit} {material} charged to {step}") for line in out[1:-2]), out


def test_a_record_is_cited_where_its_numbers_enter(tmp_path):
    out = _explain(LINEAR, "S2", "acetone", "--record", str(RECORD), "--record-yields", "actual")
    text = "\n".join(out)
    assert f"actual yield of S2, campaign record {RECORD}" in text
    assert f"ester on the shelf, campaign record {RECORD}" in text
    # what is in hand is subtracted from the demand on the step that makes it
    assert re.search(r"ester charged to S3 \(line \d+\) - [\d.]+ mol ester on the shelf \(line \d+\) "
                     r"= [\d.]+ mol ester to make in S2", text), text


def test_record_yields_needs_a_record():
    r = run_cli("explain", LINEAR, "S3", "NaOH50", "--record-yields", "actual")
    assert r.exit_code == 2 and "--record" in r.output and "Traceback" not in r.output


def test_two_branches_add_up_and_each_is_derived_above():
    out = _explain(SHARED, "S1", "PhCOOH")
    lines = {int(m.group(1)): m.group(2) for m in (re.match(r"(\d+)\. (.*)", x) for x in out) if m}
    total = next(k for k, x in lines.items() if x.endswith("mol BzCl to make in S1"))
    terms = re.findall(r"([\d.]+) mol BzCl charged to (S\d) \(line (\d+)\)", lines[total])
    assert sorted(t[1] for t in terms) == ["S2", "S3"] and " + " in lines[total]
    for value, step, ref in terms:
        assert int(ref) < total and lines[int(ref)].endswith(f"mol BzCl charged to {step}")
    # hand-worked: 5 kg of diester at 99 % assay, C20H15NO3 = 317.344 g/mol (CIAAW 2021);
    # S3 at 80 % charges BzCl at 1.2 equiv on the amide; S2 makes the amide at 85 % from
    # aminophenol and charges BzCl at 1.05 equiv; S1 makes BzCl at 90 % from benzoic acid
    m_diester = 20 * 12.011 + 15 * 1.008 + 14.007 + 3 * 15.999
    n_amide = 5000 * 0.99 / m_diester / 0.80
    bzcl = {"S3": 1.2 * n_amide, "S2": 1.05 * n_amide / 0.85}
    for value, step, _ref in terms:
        assert float(value) == pytest.approx(bzcl[step], rel=1e-5)  # shown to 6 figures
    assert lines[total].endswith(f"= {bzcl['S2'] + bzcl['S3']:.4g} mol BzCl to make in S1")
    m_acid = 7 * 12.011 + 6 * 1.008 + 2 * 15.999  # benzoic acid C7H6O2
    assert out[-2].startswith(f"= {(bzcl['S2'] + bzcl['S3']) / 0.9:.4g} mol, "
                              f"{(bzcl['S2'] + bzcl['S3']) / 0.9 * m_acid / 0.995 / 1000:.4g} kg PhCOOH")
    # the raw material over the campaign sums every charge of it
    raw = _explain(SHARED, "raw", "THF")
    assert re.search(r"kg THF charged to S2 \(line \d+\) \+ [\d.]+ kg THF charged to S3 \(line \d+\) = ", raw[-3]) \
        or re.search(r"kg THF charged to S3 \(line \d+\) \+ [\d.]+ kg THF charged to S2 \(line \d+\) = ", raw[-3])


@pytest.mark.parametrize("args,expect", [
    (["s3", "NaOH50"], "S3"),                      # a step id in the wrong case
    (["S7", "NaOH50"], "valid names"),              # no such step
    (["S3", "NaOH5O"], "NaOH50"),                   # a letter O for a zero
    (["S3", "caustic"], "charged in S3: ester, EtOH, NaOH50, water"),  # not in the route at all
    (["S2", "bromoester"], "charged in S2: acetamidophenol, acetone, K2CO3, BrCH2CO2Et, water"),
    (["S3", "aminophenol"], "charged there: ester, EtOH, NaOH50, water"),  # in the route, not in S3
    (["raw", "acid"], "intermediate"),              # made in the route
    (["raw", "morpholin"], "morpholine"),           # a raw material, misspelt
    (["target", "HX17"], "STEP MATERIAL"),          # too many words
    (["S3"], "STEP MATERIAL"),                      # too few
    (["raw"], "STEP MATERIAL"),
])
def test_bad_input_exit_2_with_the_nearest_names(args, expect):
    r = run_cli("explain", LINEAR, *args)
    assert r.exit_code == 2, r.output
    assert "Traceback" not in r.output
    assert expect in r.output, r.output

"""Shared pieces of the campaign-record tests: the CAMP route and its hand-worked record.

Route CAMP (invented numbers, balanced by molar mass, no vessels so each step is one
batch):

    S1: A (100 g/mol) + X (68) -> I1 (150 g/mol, isolated at 95 %) + W (18), yield 90 %
        (low 85 %, high 95 %); X 1.1 equiv
    S2: I1 + R (68) -> I2 (200 g/mol, 100 %) + W, yield 80 %; R 1.5 equiv
    S3: 2 I2 + B (36) -> P (400 g/mol, 100 %) + 2 W, yield 75 %; B 1.2 equiv
    target 40 kg of P, no overage
"""

from __future__ import annotations

CAMP = """
route: camp
target: {material: P, amount: 40 kg}
materials:
  A: {molar_mass: 100 g/mol}
  X: {molar_mass: 68 g/mol}
  I1: {molar_mass: 150 g/mol, assay: 95 %}
  R: {molar_mass: 68 g/mol}
  I2: {molar_mass: 200 g/mol}
  B: {molar_mass: 36 g/mol}
  P: {molar_mass: 400 g/mol}
  W: {molar_mass: 18 g/mol}
steps:
  - id: S1
    equation: A + X -> I1 + W
    yield: {expected: 90 %, low: 85 %, high: 95 %}
    charges:
      - {material: A}
      - {material: X, equiv: 1.1}
  - id: S2
    equation: I1 + R -> I2 + W
    yield: 80 %
    charges:
      - {material: I1}
      - {material: R, equiv: 1.5}
  - id: S3
    equation: 2 I2 + B -> P + 2 W
    yield: 75 %
    charges:
      - {material: I2}
      - {material: B, equiv: 1.2}
"""

#: Two lots of S1 at different assays, one lot of S2 (worked in test_record_worked.py).
RECORD_YAML = """\
lots:
  - {step: S1, batch: 1, charged: 20.0 kg, isolated: 27.0 kg, assay: 96 %}
  - {step: S1, batch: 2, charged: 17.0 kg, isolated: 25.0 kg, assay: 92 %}
  - {step: S2, batch: 1, charged: 30.0 kg, isolated: 30.0 kg, assay: 99 %}
"""

#: The same lots as a CSV table, units in the cells.
RECORD_CSV = """\
step,batch,charged,isolated,assay
S1,1,20.0 kg,27.0 kg,96 %
S1,2,17.0 kg,25.0 kg,92 %
S2,1,30.0 kg,30.0 kg,99 %
"""


def write_record_xlsx(path) -> None:
    """The same lots as a workbook: bare numbers, a unit column, assays as fractions."""
    import openpyxl

    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Lots"
    ws.append(["Step", "Batch", "Charged", "Isolated", "Assay", "Unit"])
    ws.append(["S1", 1, 20.0, 27.0, 0.96, "kg"])
    ws.append(["S1", 2, 17.0, 25.0, 0.92, "kg"])
    ws.append(["S2", 1, 30.0, 30.0, 0.99, "kg"])
    wb.save(path)

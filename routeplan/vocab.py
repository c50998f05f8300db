"""The closed vocabularies of routeplan, as string enums.

Each member is a :class:`enum.StrEnum`: it *is* its string (``Basis.EQUIV == "equiv"``,
``str(Basis.EQUIV) == "equiv"``, ``f"{Role.SOLVENT}" == "solvent"``), so code that compares
with the plain words of the route format keeps working, and JSON, CSV and workbook
writers write the word itself.  ``Basis("equiv")`` turns a word into its member and
raises ``ValueError`` for a word outside the vocabulary.

This module imports nothing of routeplan: every layer may use it.

Examples
--------
>>> Basis("mol_percent") is Basis.MOL_PERCENT
True
>>> Role.SOLVENT == "solvent", str(Role.SOLVENT), Severity.WARNING.value
(True, 'solvent', 'warning')
>>> import json
>>> json.dumps({"basis": Basis.EQUIV, "role": Role.REAGENT})
'{"basis": "equiv", "role": "reagent"}'
>>> [str(b) for b in GIVEN_BASES]
['equiv', 'mol_percent', 'volumes', 'mass_ratio']
"""

from __future__ import annotations

import enum

__all__ = [
    "Basis",
    "GIVEN_BASES",
    "MOLAR_BASES",
    "Role",
    "Severity",
    "YieldCase",
    "RecordYields",
    "BetterIs",
    "ValueKind",
    "ValueQualifier",
    "UnrankedReason",
]


class Basis(enum.StrEnum):
    """How a charge line gives its amount.

    The first four are written in a route file (see ROUTE-FORMAT.md); the loader gives
    ``STOICHIOMETRIC`` itself to a reactant with no line or no amount (its coefficient
    ratio nu_i / nu_limiting [-]).
    """

    EQUIV = "equiv"  #: moles per mole of limiting reagent [-]
    MOL_PERCENT = "mol_percent"  #: equiv x 100 [-]
    VOLUMES = "volumes"  #: litres per kg of limiting reagent [L/kg]
    MASS_RATIO = "mass_ratio"  #: kg per kg of limiting reagent [kg/kg]
    STOICHIOMETRIC = "stoichiometric"  #: the equation's coefficient ratio [-]


#: The bases a route file may write on a charge line, in the format's order.
GIVEN_BASES: tuple[Basis, ...] = (Basis.EQUIV, Basis.MOL_PERCENT, Basis.VOLUMES, Basis.MASS_RATIO)

#: The bases that fix a charge in moles of the limiting reagent.
MOLAR_BASES: tuple[Basis, ...] = (Basis.EQUIV, Basis.MOL_PERCENT, Basis.STOICHIOMETRIC)


class Role(enum.StrEnum):
    """What a charge does in its step."""

    REACTANT = "reactant"
    REAGENT = "reagent"
    CATALYST = "catalyst"
    SOLVENT = "solvent"
    WORKUP = "workup"


class Severity(enum.StrEnum):
    """How serious a :class:`routeplan.errors.Problem` is."""

    ERROR = "error"
    WARNING = "warning"


class YieldCase(enum.StrEnum):
    """Which step yields a plan is computed at (``--yields``)."""

    EXPECTED = "expected"
    LOW = "low"
    HIGH = "high"


class RecordYields(enum.StrEnum):
    """Which yield the remaining batches of a step with recorded lots are planned at
    (``--record-yields``): the route's, or the mean its lots actually gave."""

    EXPECTED = "expected"
    ACTUAL = "actual"


class BetterIs(enum.StrEnum):
    """Which way a comparison row is better; a row with no better side has ``None``."""

    LOWER = "lower"
    HIGHER = "higher"


class ValueKind(enum.StrEnum):
    """What a value of a comparison row is, and so how it is shown."""

    COUNT = "count"  #: a whole number [-]
    FRACTION = "fraction"  #: a share, shown as a percentage [-]
    RATIO = "ratio"  #: a ratio or a duration [kg/kg, h]
    MONEY = "money"  #: money per kg of target [currency/kg]
    MASS = "mass"  #: a mass [kg]


class ValueQualifier(enum.StrEnum):
    """What bounds one value of a comparison row (a value that is not the whole story)."""

    PRICED_MATERIALS_ONLY = "priced-materials-only"  #: a raw-material cost over the priced materials only
    PRICED_ITEMS_ONLY = "priced-items-only"  #: a cost of goods over the priced items only
    NO_UNCERTAINTY = "no-uncertainty"  #: no step gives a yield range: nothing drawn


class UnrankedReason(enum.StrEnum):
    """Why a comparison row that could be ranked is not."""

    NO_VALUE = "no-value"  #: a route has no value
    CURRENCIES = "currencies"  #: the routes price in different currencies
    NO_COST = "no-cost"  #: a route has no raw-material cost (no currency or no prices)
    NOTHING_PRICED = "nothing-priced"  #: a route has nothing priced in this part of the cost of goods
    UNPRICED_MATERIALS = "unpriced-materials"  #: some raw materials have no price
    UNPRICED_ITEMS = "unpriced-items"  #: some items of the cost of goods have no price
    NO_SCHEDULE = "no-schedule"  #: a route has no schedule (a step without a cycle time)
    NO_UNCERTAINTY = "no-uncertainty"  #: a route carries no yield uncertainty
    YIELDS_WITHOUT_CASE = "yields-without-case"  #: planned at low/high yields, a route has steps without one

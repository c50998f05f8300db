"""Pydantic models that mirror the route file, key for key (route format 1).

These models are the parse layer only: they check the shape of the document and read
every value by the format's rules (quantities through :func:`routeplan.units.parse_quantity`,
percents through :func:`routeplan.units.parse_fraction`).  Cross-references between
parts of the file are checked in :mod:`routeplan.route.checks`, and the planner works
on the frozen objects of :mod:`routeplan.route.model`, built by
:mod:`routeplan.route.load`.

Every model forbids unknown keys.  Scalar values go through our own validators, so a
message says what would be right in our words (``must be a positive number, got -1``);
a quantity is kept as a pint Quantity, a percent as a fraction [-].  An optional key
left empty in the YAML (``density:``) is an error, not "not given": leave it out instead.
"""

import difflib
import math
import re
from typing import Annotated, Any, get_args, get_origin

from pydantic import (AfterValidator, BaseModel, ConfigDict, Field, PlainValidator, ValidationError, WithJsonSchema,
                      model_validator)
from pydantic_core import PydanticCustomError

from routeplan.errors import Problem, QuantityError
from routeplan.route.model import ROLES, STREAMS
from routeplan.route.yamlpos import Positions
from routeplan.units import DIMENSIONS, parse_fraction, parse_quantity
from routeplan.vocab import GIVEN_BASES, Role, Severity

__all__ = [
    "FORMAT_VERSION",
    "MATERIAL_KEY",
    "RouteFile",
    "TargetModel",
    "MaterialModel",
    "SolutionModel",
    "VesselModel",
    "StepModel",
    "YieldModel",
    "ChargeModel",
    "ConditionsModel",
    "DosingModel",
    "ThermalModel",
    "PHASES",
    "WastePricesModel",
    "CHARGE_BASES",
    "ControlModel",
    "describe_value",
    "model_at",
    "keys_of",
    "validation_problems",
]

#: The route format version this module reads.
FORMAT_VERSION = 1

#: The rule for material keys: letters, digits, ``-``, ``_``, ``.``; starts with a letter or digit.
MATERIAL_KEY = re.compile(r"^[A-Za-z0-9][A-Za-z0-9_.\-]*$")

#: The phases a material may be said to have (``materials.<key>.phase``).
PHASES = ("solid", "liquid", "gas")

#: The bases a charge line may give (at most one).
CHARGE_BASES = GIVEN_BASES

_NUMBER_PATTERN = r"(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?"
#: JSON-schema pattern of a quantity string: a non-negative number, then a unit (no decimal comma).
QUANTITY_PATTERN = rf"^\s*\+?{_NUMBER_PATTERN}\s*[^\s\d,.].*$"
#: JSON-schema pattern of a quantity string that may be negative (an enthalpy, a temperature in degC).
SIGNED_QUANTITY_PATTERN = rf"^\s*[+-]?{_NUMBER_PATTERN}\s*[^\s\d,.].*$"
#: JSON-schema pattern of a percent string (``85 %``) or a plain fraction in a string.
PERCENT_PATTERN = rf"^\s*\+?{_NUMBER_PATTERN}\s*(?:%|percent)?\s*$"


def describe_value(value: Any) -> str:
    """Say what a YAML value is, for messages: ``-1``, ``'1,5 kg'``, ``a list``, ``nothing``."""
    if value is None:
        return "nothing (an empty value)"
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, (int, float)):
        return f"{value:g}" if isinstance(value, float) else str(value)
    if isinstance(value, str):
        shown = value if len(value) <= 60 else value[:57] + "..."
        return repr(shown)
    if isinstance(value, list):
        return "a list"
    if isinstance(value, dict):
        return "a mapping"
    return type(value).__name__  # pragma: no cover - YAML gives nothing else


def _fail(text: str, hint: str | None = None):
    ctx = {"text": text}
    if hint:
        ctx["hint"] = hint
    return PydanticCustomError("routeplan", "{text}", ctx)


# ----------------------------------------------------------------------------- scalars

def _text(value: Any) -> str:
    if isinstance(value, str):
        if not value.strip():
            raise _fail("must not be empty")
        return value
    if isinstance(value, (bool, int, float)):
        raise _fail(f"must be text, got {describe_value(value)}", f"write it in quotes: '{describe_value(value)}'")
    raise _fail(f"must be text, got {describe_value(value)}")


#: Largest plain number a route file may give for an equiv, mol %, volumes, mass ratio or
#: price: no charge line is a million times its limiting reagent (common practice, no
#: source); beyond it the number is a typo, and far beyond it the arithmetic overflows.
LARGEST_COUNT = 1e6


def _number(*, positive: bool):
    word = "a positive number" if positive else "a number of 0 or more"

    def check(value: Any) -> float:
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            hint = None
            if isinstance(value, str):
                if re.match(r"^\s*[+-]?\d+,\d+\s*$", value):
                    hint = f"write {value.strip().replace(',', '.')} with a decimal point"
                else:
                    try:
                        float(value)
                        hint = "write the number without quotes"
                    except ValueError:
                        hint = "a plain number, without a unit"
            raise _fail(f"must be {word}, got {describe_value(value)}", hint)
        if not math.isfinite(value) or value < 0 or (positive and value == 0):
            raise _fail(f"must be {word}, got {describe_value(value)}")
        if value > LARGEST_COUNT:
            raise _fail(f"{describe_value(value)} is far out of range (more than {LARGEST_COUNT:g})",
                        "check for a misplaced decimal point or exponent")
        return float(value)

    return check


def _boolean(value: Any) -> bool:
    if isinstance(value, bool):
        return value
    raise _fail(f"must be true or false, got {describe_value(value)}")


def _parsed(value: Any, dimension: str):
    """``value`` read as a quantity of ``dimension``, or the located error in our words."""
    if value is None:
        raise _fail(f"has no value; expected {dimension} such as '{DIMENSIONS[dimension][1]}'",
                    "leave the key out if it does not apply")
    try:
        return parse_quantity(value, dimension)
    except QuantityError as exc:
        raise _fail(exc.message, exc.hint) from None


def _quantity(dimension: str):
    def check(value: Any):
        q = _parsed(value, dimension)
        if not math.isfinite(q.magnitude) or q.magnitude <= 0:
            raise _fail(f"must be positive, got {describe_value(value)}")
        return q

    return check


def _signed_quantity(dimension: str):
    """A quantity of ``dimension`` that may be negative or zero (a reaction enthalpy)."""
    def check(value: Any):
        q = _parsed(value, dimension)
        if not math.isfinite(q.magnitude):
            raise _fail(f"must be a finite number, got {describe_value(value)}")
        return q

    return check


def _temperature(value: Any):
    """A temperature in degC, K or degF (a bare number is an error), above absolute zero."""
    if value is None:
        raise _fail("has no value; expected a temperature such as '25 degC'", "leave the key out if it does not apply")
    try:
        q = parse_quantity(value, "temperature")
    except QuantityError as exc:
        raise _fail(exc.message, exc.hint) from None
    if not q.to("K").magnitude > 0:
        raise _fail(f"{describe_value(value)} is at or below absolute zero", "write e.g. '25 degC' or '298.15 K'")
    return q


def _phase(value: Any) -> str:
    if isinstance(value, str) and value in PHASES:
        return value
    near = difflib.get_close_matches(str(value).lower(), PHASES, n=1, cutoff=0.6)
    hint = f"did you mean '{near[0]}'?" if near else None
    raise _fail(f"must be one of {', '.join(PHASES)}; got {describe_value(value)}", hint)


def _pack(value: Any):
    """A pack size: a mass (``25 kg``) or a volume (``2.5 L``), positive."""
    if value is None:
        raise _fail("has no value; expected a pack size such as '25 kg' or '2.5 L'",
                    "leave the key out if the material is not bought in packs")
    try:
        q = parse_quantity(value, "mass")
    except QuantityError:
        try:
            q = parse_quantity(value, "volume")
        except QuantityError as exc:
            raise _fail(f"must be a pack size, a mass such as '25 kg' or a volume such as '2.5 L'; "
                        f"got {describe_value(value)}", exc.hint) from None
    if not math.isfinite(q.magnitude) or q.magnitude <= 0:
        raise _fail(f"must be positive, got {describe_value(value)}")
    return q


def _fraction(*, allow_zero: bool, allow_above_one: bool = False):
    def check(value: Any) -> float:
        if value is None:
            raise _fail("has no value; expected a percent such as '85 %' or a fraction such as 0.85",
                        "leave the key out if it does not apply")
        try:
            return parse_fraction(value, allow_zero=allow_zero, allow_above_one=allow_above_one)
        except QuantityError as exc:
            raise _fail(exc.message, exc.hint) from None

    return check


#: Letters of other scripts that look like Latin ones, and the Latin letter each stands for
#: (Cyrillic and Greek capitals and small letters drawn alike in common fonts).
_LOOKALIKES = dict(zip(
    "АВЕКМНОРСТХаеорсухіјѕԁԛԝΑΒΕΖΗΙΚΜΝΟΡΤΥΧον",
    "ABEKMHOPCTXaeopcyxijsdqwABEZHIKMNOPTYXov"))


def lookalike_hint(text: str) -> str | None:
    """Name the characters of ``text`` that are not ASCII and suggest the key in Latin
    letters where each is a look-alike; None for plain ASCII.

    Examples
    --------
    >>> lookalike_hint("\u0410c2O")
    "the key holds 'А' (U+0410 CYRILLIC CAPITAL LETTER A), which looks like the Latin 'A': write 'Ac2O'"
    """
    import unicodedata

    odd = [ch for ch in dict.fromkeys(text) if ord(ch) > 127]
    if not odd:
        return None
    named = ", ".join(f"'{ch}' (U+{ord(ch):04X} {unicodedata.name(ch, 'unnamed character')})" for ch in odd)
    if all(ch in _LOOKALIKES for ch in odd):
        latin = "".join(_LOOKALIKES.get(ch, ch) for ch in text)
        like = ", ".join(f"'{_LOOKALIKES[ch]}'" for ch in odd)
        return f"the key holds {named}, which looks like the Latin {like}: write '{latin}'"
    return f"the key holds {named}; keys use Latin letters, digits, '-', '_' and '.'"


def _material_key(value: Any) -> str:
    if isinstance(value, str) and MATERIAL_KEY.match(value):
        return value
    hint = lookalike_hint(value) if isinstance(value, str) else None
    raise _fail(f"{describe_value(value)} is not a valid material key",
                hint or "use letters, digits, '-', '_' and '.', starting with a letter or digit, "
                "without spaces or '+'")


def _one_of(words: tuple[str, ...], make=str):
    """A validator of one word out of ``words`` (returned as ``make(word)``), suggesting the nearest on a typo."""
    def check(value: Any):
        if isinstance(value, str) and value in words:
            return make(value)
        near = difflib.get_close_matches(str(value).lower(), [str(w) for w in words], n=1, cutoff=0.6)
        hint = f"did you mean '{near[0]}'?" if near else None
        raise _fail(f"must be one of {', '.join(str(w) for w in words)}; got {describe_value(value)}", hint)

    return check


_role = _one_of(ROLES, Role)
_stream = _one_of(STREAMS)


def _currency(value: Any) -> str:
    if isinstance(value, str) and re.fullmatch(r"[A-Z]{3}", value):
        return value
    hint = None
    if isinstance(value, str) and re.fullmatch(r"\s*[A-Za-z]{3}\s*", value):
        hint = f"write '{value.strip().upper()}'"
    raise _fail(f"must be a three-letter ISO 4217 currency code in capitals such as 'EUR' or 'USD', "
                f"got {describe_value(value)}", hint)


def _format(value: Any) -> int:
    if isinstance(value, int) and not isinstance(value, bool) and value == FORMAT_VERSION:
        return value
    raise _fail(f"this routeplan reads route format {FORMAT_VERSION}, got {describe_value(value)}",
                f"write 'format: {FORMAT_VERSION}' and the keys of format {FORMAT_VERSION}")


def _nonempty(what: str):
    def check(value):
        if not value:
            raise _fail(f"needs at least one {what}")
        return value

    return check


def _quantity_schema(dimension: str, description: str) -> dict:
    example = DIMENSIONS[dimension][1]
    return {"type": "string", "pattern": QUANTITY_PATTERN, "examples": [example],
            "description": f"{description} ({dimension}: a number and a unit, e.g. '{example}')"}


def _percent_schema(description: str, *, above_one: bool = False) -> dict:
    number = {"type": "number", "minimum": 0, "maximum": 1}
    return {"anyOf": [{"type": "string", "pattern": PERCENT_PATTERN}, number],
            "examples": ["85 %", 0.85],
            "description": f"{description} ('85 %' or a fraction such as 0.85"
                           + (", may exceed 100 % when written as a percent)" if above_one else ")")}


def Text(description: str):
    """A non-empty string field type."""
    return Annotated[Any, PlainValidator(_text),
                     WithJsonSchema({"type": "string", "minLength": 1, "description": description})]


def Number(description: str, *, positive: bool = True):
    """A plain number field type (YAML int or float)."""
    limit = {"exclusiveMinimum": 0} if positive else {"minimum": 0}
    return Annotated[Any, PlainValidator(_number(positive=positive)),
                     WithJsonSchema({"type": "number", **limit, "description": description})]


def Quantity(dimension: str, description: str):
    """A quantity field type: a string with a number and a unit of ``dimension``."""
    return Annotated[Any, PlainValidator(_quantity(dimension)),
                     WithJsonSchema(_quantity_schema(dimension, description))]


def SignedQuantity(dimension: str, description: str):
    """A quantity field type that may be negative or zero (a reaction enthalpy)."""
    schema = _quantity_schema(dimension, description) | {"pattern": SIGNED_QUANTITY_PATTERN}
    return Annotated[Any, PlainValidator(_signed_quantity(dimension)), WithJsonSchema(schema)]


def Temperature(description: str):
    """A temperature field type: degC, K or degF with its unit; kept as a pint Quantity."""
    schema = _quantity_schema("temperature", description) | {"pattern": SIGNED_QUANTITY_PATTERN,
                                                              "examples": ["25 degC", "298.15 K", "77 degF"]}
    return Annotated[Any, PlainValidator(_temperature), WithJsonSchema(schema)]


def Percent(description: str, *, allow_zero: bool = False, allow_above_one: bool = False):
    """A percent field type: ``'85 %'`` or a fraction in [0, 1]; read as a fraction [-]."""
    return Annotated[Any, PlainValidator(_fraction(allow_zero=allow_zero, allow_above_one=allow_above_one)),
                     WithJsonSchema(_percent_schema(description, above_one=allow_above_one))]


Boolean = Annotated[Any, PlainValidator(_boolean), WithJsonSchema({"type": "boolean"})]
MaterialKey = Annotated[Any, PlainValidator(_material_key),
                        WithJsonSchema({"type": "string", "pattern": MATERIAL_KEY.pattern})]


class _Model(BaseModel):
    model_config = ConfigDict(extra="forbid", strict=True, frozen=True, populate_by_name=False)


# ----------------------------------------------------------------------------- models

class TargetModel(_Model):
    """``target``: what the campaign must deliver."""

    material: Text("key of the material to deliver; exactly one step must make it")
    amount: Quantity("mass", "mass to deliver, as isolated (at the material's assay)")
    overage: Percent("planning margin on top of amount, default 0 %", allow_zero=True,
                     allow_above_one=True) = 0.0


class SolutionModel(_Model):
    """``materials.<key>.solution``: a reagent supplied as a solution of the compound."""

    molarity: Quantity("molarity", "concentration of the compound in the solution") = None
    mass_fraction: Percent("mass fraction of the compound in the solution") = None
    density: Quantity("density", "density of the whole solution")


class MaterialModel(_Model):
    """``materials.<key>``: one substance the route touches."""

    name: Text("display name, defaults to the key") = None
    formula: Text("molecular formula, e.g. C8H7BrO2, CuSO4.5H2O, SO4-2 (of the solute for a solution)") = None
    smiles: Text("SMILES string, an alternative to formula (needs the 'smiles' extra)") = None
    molar_mass: Quantity("molar mass", "explicit molar mass, for a material without formula or smiles") = None
    assay: Percent("purity as supplied (mass fraction of the named compound), default 100 %") = None
    density: Quantity("density", "density of the material as supplied") = None
    solution: SolutionModel = Field(None, description="for a reagent supplied as a solution: molarity or "
                                                      "mass_fraction, and density")
    price: Number("price per kg as supplied, in the route's currency", positive=False) = None
    hazards: list[Text("a hazard note")] = Field(None, description="free-text hazard notes")
    phase: Annotated[Any, PlainValidator(_phase),
                     WithJsonSchema({"enum": list(PHASES),
                                     "description": "solid, liquid or gas; a product with phase gas is gas "
                                                    "evolved, a reactant with phase gas is gas taken up"})] = None
    notes: Text("free text") = None
    pack: Annotated[Any, PlainValidator(_pack),
                    WithJsonSchema({"type": "string", "pattern": QUANTITY_PATTERN, "examples": ["25 kg", "2.5 L"],
                                    "description": "size of one pack as sold, a mass ('25 kg') or a volume "
                                                   "('2.5 L'); the purchase list gives the packs to order"})] = None
    bought: Boolean = Field(True, description="false for a raw material that is not bought (process water from "
                                              "the site's supply): left out of the purchase list, still charged")
    starting_material: Boolean = Field(False, description="true for a bought reactant whose atoms end up in the "
                                                          "target besides the limiting reagents (an overall yield is "
                                                          "reported from it)")
    stream: Annotated[Any, PlainValidator(_stream),
                      WithJsonSchema({"enum": list(STREAMS),
                                      "description": "waste stream this material goes to when it leaves "
                                                     "a step (decides over its formula)"})] = None


class VesselModel(_Model):
    """``equipment.<key>``: one vessel."""

    volume: Quantity("volume", "nominal vessel volume")
    max_fill: Percent("largest working fraction of volume, default 80 %") = 0.8
    rate: Number("cost of the vessel's time per hour, in the route's currency", positive=False) = None


class YieldModel(_Model):
    """``steps[i].yield``: ``88 %`` or ``{expected, low, high}``."""

    expected: Percent("expected molar yield, used by the planner")
    low: Percent("lowest yield expected") = None
    high: Percent("highest yield expected") = None

    @model_validator(mode="before")
    @classmethod
    def _plain(cls, value: Any) -> Any:
        return value if isinstance(value, dict) else {"expected": value}


class ChargeModel(_Model):
    """``steps[i].charges[j]``: one charge line; at most one basis."""

    material: Text("key of the material charged")
    equiv: Number("moles per mole of limiting reagent (both assay-corrected)") = None
    mol_percent: Number("100 x equiv (catalysts)") = None
    volumes: Number("litres per kg of limiting reagent as charged (mL/g)") = None
    mass_ratio: Number("kg per kg of limiting reagent as charged") = None
    role: Annotated[Any, PlainValidator(_role),
                    WithJsonSchema({"enum": [str(r) for r in ROLES], "description": "role of the charge"})] = None
    tolerance: Percent("how far the mass weighed in may be from the mass to charge, either way, before the "
                       "charge sheet flags it; default the route's charge_tolerance") = None
    leaves: Boolean = Field(False, description="true for a work-up charge that leaves the vessel right after it "
                                               "is charged and worked (a wash layer separated and discarded, a "
                                               "filter aid filtered off): it is not carried into the next step")


class ControlModel(_Model):
    """``steps[i].controls[j]``: a point of the step where the operator records the
    temperature and the time, with an optional in-process check and its limit."""

    point: Text("where in the step, e.g. 'after dosing' or 'end of reaction'")
    check: Text("what is measured there, e.g. 'HPLC conversion'") = None
    limit: Text("the result to reach, e.g. '>= 98 %'; needs check") = None

    @model_validator(mode="after")
    def _limit_needs_check(self):
        if self.limit is not None and self.check is None:
            raise _fail("a limit needs the check it applies to",
                        "add 'check: ...' (what is measured), or drop 'limit'")
        return self


class ConditionsModel(_Model):
    """``steps[i].conditions``: the reaction's temperature and absolute pressure."""

    temperature: Temperature("reaction temperature, default 20 degC") = None
    pressure: Quantity("pressure", "absolute pressure, default 1.01325 bar") = None


class DosingModel(_Model):
    """``steps[i].dosing``: the charge that is dosed over a time (semi-batch)."""

    material: Text("key of the charge of this step that is dosed")
    time: Quantity("time", "time over which it is dosed")


class ThermalModel(_Model):
    """``steps[i].thermal``: thermal data of the step, for a screening estimate."""

    reaction_enthalpy: SignedQuantity("molar enthalpy", "heat of reaction per mole of limiting reagent "
                                                        "converted (negative: exothermic)")
    heat_capacity: Quantity("heat capacity", "specific heat capacity of the reaction mass")
    process_temperature: Temperature("Tp, default conditions.temperature") = None
    max_technical_temperature: Temperature("MTT: boiling point of the mixture at the vessel's pressure, or the "
                                           "set temperature of the relief") = None
    decomposition_temperature_24h: Temperature("TD24: temperature at which the time to maximum rate under "
                                               "adiabatic conditions is 24 h") = None
    accumulation: Percent("for a dosed step, the largest fraction of the dosed reagent present unreacted, "
                          "default 100 %", allow_zero=True) = None


class StepModel(_Model):
    """``steps[i]``: one reaction."""

    id: Text("unique step identifier")
    name: Text("display name") = None
    equation: Text("equation over material keys, e.g. 'Amine + Ac2O -> Amide + AcOH'")
    limiting: Text("the reactant that is the basis of equivalents and yield; default the first reactant") = None
    product: Text("the main product, whose yield is given; default the first product") = None
    yield_: YieldModel = Field(alias="yield", description="molar yield of product from limiting: '88 %' or "
                                                          "{expected: 88 %, low: 80 %, high: 92 %}")
    charges: list[ChargeModel] = Field(None, description="what goes into the vessel, in order of addition")
    isolated: Boolean = Field(True, description="false for a telescoped step whose product goes on in solution")
    vessel: Text("key of the equipment used") = None
    demonstrated_batch: Quantity("mass", "largest batch run so far, as mass of limiting reagent") = None
    conditions: ConditionsModel = Field(None, description="reaction temperature and absolute pressure")
    dosing: DosingModel = Field(None, description="the charge dosed over a time; without it the step is a batch")
    thermal: ThermalModel = Field(None, description="thermal data for the heat screening estimate")
    cycle_time: Quantity("time", "vessel time for one batch of the step, cleaning included") = None
    notes: Text("free text, carried onto the charge sheet") = None
    controls: list[ControlModel] = Field(None, description="points of the step where the operator records "
                                                           "temperature and time, with in-process checks")


class WastePricesModel(_Model):
    """``waste_prices``: disposal cost per kg of each waste stream, in the route's currency."""

    aqueous: Number("disposal cost per kg of aqueous waste", positive=False) = None
    organic: Number("disposal cost per kg of organic (non-halogenated) waste", positive=False) = None
    halogenated: Number("disposal cost per kg of halogenated waste", positive=False) = None


class RouteFile(_Model):
    """A whole route file (format 1)."""

    route: Text("display name of the route")
    format: Annotated[Any, PlainValidator(_format),
                      WithJsonSchema({"const": FORMAT_VERSION, "description": "route format version"})] = FORMAT_VERSION
    currency: Annotated[Any, PlainValidator(_currency),
                        WithJsonSchema({"type": "string", "pattern": "^[A-Z]{3}$",
                                        "description": "ISO 4217 code of every price, e.g. EUR"})] = None
    target: TargetModel
    materials: Annotated[dict[MaterialKey, MaterialModel], AfterValidator(_nonempty("material"))]
    equipment: dict[Text("vessel key"), VesselModel] = Field(None, description="vessels, by key")
    steps: Annotated[list[StepModel], AfterValidator(_nonempty("step"))]
    charge_tolerance: Percent("how far a weighed charge may be from its mass to charge, either way, before "
                              "the charge sheet flags it; default 1 %") = None
    waste_prices: WastePricesModel = Field(None, description="disposal cost per kg of the aqueous, organic and "
                                                             "halogenated waste streams, in the route's currency")


#: Short help for a required key that is missing: (model, key) -> what to write.
MISSING_HINTS: dict[tuple[type, str], str] = {
    (RouteFile, "route"): "the display name of the route, e.g. 'route: HX-17 route A'",
    (RouteFile, "target"): "what to deliver: '{material: <key>, amount: 25 kg}'",
    (RouteFile, "materials"): "every substance the route touches, by key",
    (RouteFile, "steps"): "the list of reactions",
    (TargetModel, "material"): "the key of the material to deliver",
    (TargetModel, "amount"): "the mass to deliver, e.g. 'amount: 25 kg'",
    (SolutionModel, "density"): "the density of the whole solution, e.g. 'density: 1.52 g/mL'; it turns "
                                "the solution's volume into its mass",
    (VesselModel, "volume"): "the nominal vessel volume, e.g. 'volume: 250 L'",
    (YieldModel, "expected"): "the expected yield, e.g. 'expected: 88 %'",
    (StepModel, "id"): "a unique step identifier, e.g. 'id: S1'",
    (StepModel, "equation"): "e.g. 'equation: Amine + Ac2O -> Amide + AcOH'",
    (StepModel, "yield"): "the molar yield of the product, e.g. 'yield: 88 %'",
    (ChargeModel, "material"): "the key of the material charged",
    (DosingModel, "material"): "the key of the charge that is dosed, e.g. 'material: Ac2O'",
    (DosingModel, "time"): "the time over which it is dosed, e.g. 'time: 2 h'",
    (ThermalModel, "reaction_enthalpy"): "the heat of reaction per mole of limiting reagent, e.g. "
                                         "'reaction_enthalpy: -150 kJ/mol'",
    (ThermalModel, "heat_capacity"): "the specific heat of the reaction mass, e.g. 'heat_capacity: "
                                     "1.9 kJ/(kg*K)'; no default is ever guessed",
    (ControlModel, "point"): "where in the step the record is taken, e.g. 'point: after dosing'",
}


# ----------------------------------------------------------------------------- messages

def _unwrap(tp: Any) -> Any:
    while get_origin(tp) is Annotated:
        tp = get_args(tp)[0]
    return tp


def model_at(path: tuple) -> type[BaseModel] | None:
    """The model class that validates the mapping at ``path``, or None.

    Examples
    --------
    >>> model_at(("steps", 0, "charges", 2)).__name__
    'ChargeModel'
    """
    tp: Any = RouteFile
    for part in path:
        tp = _unwrap(tp)
        if isinstance(tp, type) and issubclass(tp, BaseModel):
            found = [f for name, f in tp.model_fields.items() if (f.alias or name) == part]
            if not found:
                return None
            tp = found[0].annotation
        elif get_origin(tp) in (dict, list):
            tp = get_args(tp)[-1]
        else:
            return None
    tp = _unwrap(tp)
    return tp if isinstance(tp, type) and issubclass(tp, BaseModel) else None


def keys_of(model: type[BaseModel]) -> list[str]:
    """The YAML keys a model accepts, in order."""
    return [f.alias or name for name, f in model.model_fields.items()]


#: Spellings process chemists often use for a key, and the key routeplan reads.
KEY_ALIASES = {
    "eq": "equiv", "eqs": "equiv", "eq.": "equiv", "equivalents": "equiv", "equivalent": "equiv",
    "mol%": "mol_percent", "mol_%": "mol_percent", "mol_pct": "mol_percent", "molpercent": "mol_percent",
    "mol percent": "mol_percent", "mole_percent": "mol_percent",
    "vol": "volumes", "vols": "volumes", "volume": "volumes", "vol.": "volumes", "v": "volumes",
    "wt": "mass_ratio", "w/w": "mass_ratio", "weight_ratio": "mass_ratio", "ratio": "mass_ratio",
    "purity": "assay", "mw": "molar_mass", "mol_weight": "molar_mass", "molecular_weight": "molar_mass",
    "fw": "molar_mass", "rho": "density", "d": "density", "conc": "molarity", "concentration": "molarity",
    "m": "molarity", "wt%": "mass_fraction", "w%": "mass_fraction", "cost": "price",
    "reagent": "material", "reaction": "equation", "eqn": "equation",
    "expected_yield": "yield", "y": "yield", "reactor": "vessel",
    "size": "volume", "fill": "max_fill", "mass": "amount", "quantity": "amount",
}


def validation_problems(error: ValidationError, positions: Positions) -> list[Problem]:
    """Turn pydantic's errors into located problems in our words.

    Parameters
    ----------
    error : pydantic.ValidationError
        From validating the document against :class:`RouteFile`.
    positions : Positions
        Positions of the document's values and keys.

    Returns
    -------
    list of Problem
        One error per pydantic error, each with file, line, column and key path.  A
        required key reported missing is left out where an unknown key of the same
        mapping is its misspelling (``yeild`` for ``yield``): one mistake, one message.
    """
    out = []
    missing: list[tuple[tuple, str, int]] = []   # (parent, key, index in out)
    misspelt: set[tuple[tuple, str]] = set()     # (parent, the key suggested)
    for err in error.errors(include_url=False):
        loc = tuple(err["loc"])
        kind = err["type"]
        ctx = err.get("ctx") or {}
        value = err.get("input")
        hint = None
        if "[key]" in loc:
            path = loc[: loc.index("[key]")]
            where = positions.at(path, key=True)
            message, hint = ctx.get("text", err["msg"]), ctx.get("hint")
        elif kind == "missing":
            parent, key = loc[:-1], loc[-1]
            model = model_at(parent)
            where = positions.at(parent, show=loc)
            message = "is required but missing"
            hint = MISSING_HINTS.get((model, key)) if model else None
            missing.append((tuple(parent), str(key), len(out)))
        elif kind == "extra_forbidden":
            parent, key = loc[:-1], str(loc[-1])
            model = model_at(parent)
            where = positions.at(loc, key=True)
            valid = keys_of(model) if model else []
            near = [KEY_ALIASES[key.lower()]] if KEY_ALIASES.get(key.lower()) in valid else []
            near = near or difflib.get_close_matches(key, valid, n=1, cutoff=0.6) or \
                difflib.get_close_matches(key.lower(), valid, n=1, cutoff=0.6) or \
                [v for v in valid if len(key) >= 2 and v.startswith(key.lower())][:1]
            message = f"unknown key '{key}'"
            hint = f"did you mean '{near[0]}'?" if near else "valid keys here: " + ", ".join(valid)
            if near:
                misspelt.add((tuple(parent), near[0]))
            odd = lookalike_hint(key)
            if odd:
                hint = odd + ("" if near or not valid else "; valid keys here: " + ", ".join(valid))
        else:
            where = positions.at(loc, show=positions.known(loc))
            if kind == "routeplan":
                message, hint = ctx["text"], ctx.get("hint")
            elif kind in ("model_type", "model_attributes_type", "dict_type"):
                message = f"must be a mapping of keys to values, got {describe_value(value)}"
            elif kind == "list_type":
                message = f"must be a list (one '- ' line per entry), got {describe_value(value)}"
                if value is None:
                    hint = "leave the key out if there is nothing to list"
            else:  # pragma: no cover - every model field goes through the cases above
                message = f"{err['msg']}, got {describe_value(value)}"
        out.append(Problem(Severity.ERROR, message, where, hint=hint))
    drop = {i for parent, key, i in missing if (parent, key) in misspelt}
    return [p for i, p in enumerate(out) if i not in drop]

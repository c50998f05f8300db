"""One unit per kind for a whole plan: amounts, masses and volumes as people read them.

A chemist compares rows across steps, so a plan is shown in one unit of amount, one of
mass and one of volume, chosen once for the whole plan and kept in every step table, the
per-batch columns, the totals, the purchase list and every sentence that gives a charge.

Named sets (``--units``):

========  ======  ====  ======  =============================================
set       amount  mass  volume  chosen automatically when the target is
========  ======  ====  ======  =============================================
``lab``   mmol    g     mL      below 1 kg
``kilo``  mol     kg    L       from 1 kg to below 100 kg
``plant`` kmol    kg    L       100 kg or more
========  ======  ====  ======  =============================================

The target is the mass asked for, before overage (the number ``--target`` takes).  The thresholds are common practice,
no source: a lab route is weighed in grams, a kilo lab charges kilograms and litres, and
a plant keeps kilograms and litres on its batch records but counts moles in thousands.
In ``lab`` and ``kilo`` mass over amount is the molar mass in kg/mol and mass over volume
the density in kg/L, so a row reads the same at both scales.

Any other choice is written as units separated by commas, one per kind, in any order:
``g,mmol,mL``, ``kg,kmol``, ``t,m3``; a kind left out keeps the automatic choice.  The
units offered (:data:`UNITS`) are those of NIST SP 811 (2008) with decimal prefixes.
"""

from __future__ import annotations

from routeplan.frozen import frozen

from routeplan.views.numbers import sig

__all__ = ["Unit", "DisplayUnits", "UNITS", "KIND_OF_BASE", "SETS", "AUTO", "LAB_BELOW_KG", "PLANT_FROM_KG",
           "parse_units", "scale_set", "choose_units", "plan_units", "units_help"]


@frozen
class Unit:
    """A unit shown to people: its symbol and its size in the plan's base unit.

    Attributes
    ----------
    symbol : str
        As printed (``mmol``, ``kg``, ``m³``).
    kind : str
        ``"amount"``, ``"mass"`` or ``"volume"``.
    factor : float
        One of this unit in the base unit of its kind: mol, kg or L [-].
    """

    symbol: str
    kind: str
    factor: float


#: Every unit routeplan shows, by kind; factors to mol, kg and L from NIST SP 811 (2008),
#: the SI prefixes (milli 1e-3, kilo 1e3) and 1 t = 1000 kg, 1 m³ = 1000 L.
UNITS: dict[str, tuple[Unit, ...]] = {
    "amount": (Unit("mmol", "amount", 1e-3), Unit("mol", "amount", 1.0), Unit("kmol", "amount", 1e3)),
    "mass": (Unit("mg", "mass", 1e-6), Unit("g", "mass", 1e-3), Unit("kg", "mass", 1.0), Unit("t", "mass", 1e3)),
    "volume": (Unit("mL", "volume", 1e-3), Unit("L", "volume", 1.0), Unit("m³", "volume", 1e3)),
}

#: The kind of each base unit a plan keeps its numbers in (mol, kg, L).
KIND_OF_BASE: dict[str, str] = {"mol": "amount", "kg": "mass", "L": "volume"}

_BY_NAME = {u.symbol.lower(): u for units in UNITS.values() for u in units}
_BY_NAME["m3"] = _BY_NAME["m³"]


def _unit(symbol: str) -> Unit:
    return _BY_NAME[symbol.lower()]


def _typed(unit: Unit) -> str:
    """The unit as typed on a command line (``m3`` for m³)."""
    return "m3" if unit.symbol == "m³" else unit.symbol


@frozen
class DisplayUnits:
    """The units a plan is shown in: one for amounts, one for masses, one for volumes.

    Attributes
    ----------
    amount, mass, volume : Unit
        The unit of each kind.
    name : str
        ``lab``, ``kilo`` or ``plant``, or the units themselves as ``--units`` takes them
        (``mmol,g,mL``).

    Examples
    --------
    >>> u = SETS["kilo"]
    >>> u.text(0.45, "mass"), u.number(2667.4, "amount"), u.heading("m/batch", "mass")
    ('0.4500 kg', '2667', 'm/batch [kg]')
    """

    amount: Unit
    mass: Unit
    volume: Unit
    name: str

    def unit(self, kind: str) -> Unit:
        """The unit of ``kind`` (``amount``, ``mass`` or ``volume``)."""
        return getattr(self, kind)

    def number(self, value: float | None, kind: str) -> str:
        """``value`` [mol, kg or L by ``kind``] in this set's unit, 4 significant figures, no unit."""
        return sig(None if value is None else value / getattr(self, kind).factor)

    def text(self, value: float | None, kind: str) -> str:
        """``value`` [mol, kg or L by ``kind``] with this set's unit: ``'20.20 kg'`` (``'–'`` for None)."""
        if value is None:
            return "–"
        return f"{self.number(value, kind)} {getattr(self, kind).symbol}"

    def amount_text(self, mol: float | None) -> str:
        """An amount [mol] with its unit."""
        return self.text(mol, "amount")

    def mass_text(self, kg: float | None) -> str:
        """A mass [kg] with its unit."""
        return self.text(kg, "mass")

    def volume_text(self, L: float | None) -> str:
        """A volume [L] with its unit."""
        return self.text(L, "volume")

    def heading(self, label: str, kind: str) -> str:
        """A column heading with this set's unit: ``'n [mol]'``."""
        return f"{label} [{getattr(self, kind).symbol}]"

    def legend(self) -> str:
        """One line naming the units: ``'n [mol], m [kg], V [L] (--units kilo)'``."""
        return (f"n [{self.amount.symbol}], m [{self.mass.symbol}], V [{self.volume.symbol}] "
                f"(--units {self.name})")


def _set(name: str, amount: str, mass: str, volume: str) -> DisplayUnits:
    return DisplayUnits(_unit(amount), _unit(mass), _unit(volume), name)


#: The named sets of units.
SETS: dict[str, DisplayUnits] = {
    "lab": _set("lab", "mmol", "g", "mL"),
    "kilo": _set("kilo", "mol", "kg", "L"),
    "plant": _set("plant", "kmol", "kg", "L"),
}

#: The choice that follows the campaign's scale (:func:`scale_set`).
AUTO = "auto"

#: A target below this mass [kg] is shown in the ``lab`` set (common practice, no source).
LAB_BELOW_KG = 1.0

#: A target of this mass [kg] or more is shown in the ``plant`` set (common practice, no source).
PLANT_FROM_KG = 100.0


def scale_set(target_kg: float) -> DisplayUnits:
    """The named set that suits a campaign delivering ``target_kg`` [kg].

    >>> [scale_set(x).name for x in (0.05, 25.5, 510.0)]
    ['lab', 'kilo', 'plant']
    """
    if target_kg < LAB_BELOW_KG:
        return SETS["lab"]
    if target_kg < PLANT_FROM_KG:
        return SETS["kilo"]
    return SETS["plant"]


def units_help() -> str:
    """What ``--units`` takes, in one sentence (for help texts and error hints)."""
    kinds = "; ".join(f"{', '.join(_typed(u) for u in units)} ({kind})"
                      for kind, units in UNITS.items())
    return (f"{AUTO} (by the target's mass), {', '.join(SETS)}, or units separated by commas, one per kind, "
            f"from: {kinds}; e.g. g,mmol,mL")


def parse_units(text: str | None) -> tuple[str | None, dict[str, Unit]]:
    """Read a ``--units`` value: a named set, ``auto``, or units separated by commas.

    Parameters
    ----------
    text : str or None
        As typed; None is ``auto``.

    Returns
    -------
    (str or None, dict)
        The named set (None for ``auto`` or a list of units) and the units named by kind.

    Raises
    ------
    QuantityError
        An unknown name or unit, two units of one kind, or an empty value; located at
        ``--units``, with what would be right.

    Examples
    --------
    >>> parse_units("kilo")
    ('kilo', {})
    >>> sorted((k, u.symbol) for k, u in parse_units("g, mmol")[1].items())
    [('amount', 'mmol'), ('mass', 'g')]
    """
    from routeplan.errors import Location, QuantityError

    where = Location(key="--units")
    if text is None or text.strip().lower() == AUTO:
        return None, {}
    name = text.strip().lower()
    if name in SETS:
        return name, {}
    parts = [p.strip() for p in text.split(",")]
    if not any(parts):
        raise QuantityError("needs a value", text=text, location=where, hint=f"give {units_help()}")
    chosen: dict[str, Unit] = {}
    for part in parts:
        unit = _BY_NAME.get(part.lower())
        if unit is None:
            what = "an empty entry" if not part else f"'{part}' is not a set or a unit routeplan shows"
            message = what if len(parts) == 1 else f"'{text}': {what}"
            raise QuantityError(message, text=text, location=where, hint=f"give {units_help()}")
        if unit.kind in chosen:
            raise QuantityError(f"'{text}' gives two units of {unit.kind} ({chosen[unit.kind].symbol} and "
                                f"{unit.symbol})", text=text, location=where,
                                hint="give one unit of each kind, e.g. g,mmol,mL")
        chosen[unit.kind] = unit
    return None, chosen


def choose_units(target_kg: float, text: str | None = None) -> DisplayUnits:
    """The units of a plan delivering ``target_kg`` [kg], by the ``--units`` value ``text``.

    A named set is used as it is; ``auto`` (or None) takes :func:`scale_set`; a list of
    units replaces those kinds in the automatic set.

    >>> choose_units(25.5, "t, m3").legend()
    'n [mol], m [t], V [m³] (--units mol,t,m3)'
    """
    name, chosen = parse_units(text)
    if name is not None:
        return SETS[name]
    base = scale_set(target_kg)
    if not chosen:
        return base
    units = {kind: chosen.get(kind, base.unit(kind)) for kind in UNITS}
    for named in SETS.values():
        if all(named.unit(k) == units[k] for k in UNITS):
            return named
    label = ",".join(_typed(units[k]) for k in UNITS)
    return DisplayUnits(units["amount"], units["mass"], units["volume"], label)


def plan_units(plan, text: str | None = None) -> DisplayUnits:
    """The units of ``plan``: :func:`choose_units` for its target as requested (before
    overage, the mass ``--target`` takes) [kg]."""
    return choose_units(plan.asked_kg, text)

"""Shared helpers for tests that read what routeplan prints for people."""

from __future__ import annotations

import re

#: A number and the unit of amount, mass or volume after it, as routeplan prints them
#: (``20.20 kg``, ``13 190 mmol``); a rate (``L/min``) or a ratio (``kg/kg``) is not one.
QUANTITY_RE = re.compile(r"(?<![\w.])(-?(?:\d{1,3}(?: \d{3})+|\d+(?:\.\d+)?(?:e[-+]\d+)?)) "
                         r"(mmol|kmol|mol|mg|kg|g|t|mL|L|m³)(?![\w/³])")

#: Unit -> kind.
KIND = {"mmol": "amount", "mol": "amount", "kmol": "amount", "mg": "mass", "g": "mass", "kg": "mass", "t": "mass",
        "mL": "volume", "L": "volume", "m³": "volume"}


def significant_figures(text: str, figures: int) -> int:
    """Significant figures a number as written carries, read with the module's rule.

    Every digit from the first non-zero one counts, trailing zeros after a decimal point
    too.  A whole number with more digits than ``figures`` is written in full: its digits
    after the first ``figures`` must all be zeros, which only hold the place.
    """
    body = text.replace(" ", "").lstrip("-")
    if "e" in body:
        body = body.split("e")[0]
    digits = body.replace(".", "").lstrip("0")
    if "." not in body and len(digits) > figures:
        assert set(digits[figures:]) <= {"0"}, text  # nothing significant beyond the figures
        return figures
    return len(digits)

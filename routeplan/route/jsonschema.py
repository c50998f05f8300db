"""The JSON Schema of the route file, generated from the pydantic models.

Editors with YAML support (through a YAML language server) validate and complete a route
file against it.  The schema is derived from :class:`routeplan.route.schema.RouteFile`
and adjusted where YAML and pydantic see a key differently:

* ``steps[].yield`` is a percent or a mapping ``{expected, low, high}``;
* material keys must follow the key rule (no other key is accepted under ``materials``);
* an optional key has no ``null`` value (leave the key out instead), so ``default: null``
  is dropped.

The schema checks shape and spelling; units, cross-references and chemistry are checked by
``routeplan check`` only.
"""

from __future__ import annotations

from routeplan import CAUTION

import copy
import json
from typing import Any

__all__ = ["SCHEMA_ID", "route_json_schema", "route_json_schema_text"]

#: Identifier of the schema (a name, not a download address).
SCHEMA_ID = "urn:routeplan:route-file:1"


def _drop_null_defaults(node: Any) -> None:
    if isinstance(node, dict):
        if "default" in node and node["default"] is None:
            del node["default"]
        if isinstance(node.get("title"), str) and "properties" not in node:
            del node["title"]  # pydantic's per-property titles only repeat the key
        if isinstance(node.get("description"), str):
            node["description"] = node["description"].replace("``", "'")
        for value in node.values():
            _drop_null_defaults(value)
    elif isinstance(node, list):
        for value in node:
            _drop_null_defaults(value)


def route_json_schema() -> dict:
    """Return the JSON Schema (draft 2020-12) of a route file, as a dict.

    Returns
    -------
    dict
        A schema that accepts every valid route file; quantities are strings (``"25 kg"``),
        percents are a string (``"85 %"``) or a number in [0, 1].

    Examples
    --------
    >>> route_json_schema()["required"]
    ['route', 'target', 'materials', 'steps']
    """
    from routeplan.route.schema import MATERIAL_KEY, RouteFile

    schema = copy.deepcopy(RouteFile.model_json_schema(by_alias=True, mode="validation"))
    defs = schema["$defs"]
    step = defs["StepModel"]["properties"]
    yield_object = step["yield"]
    yield_object.pop("$ref", None)
    expected = defs["YieldModel"]["properties"]["expected"]
    step["yield"] = {
        "description": yield_object.get("description", "molar yield"),
        "anyOf": [{k: v for k, v in expected.items() if k != "description"}, {"$ref": "#/$defs/YieldModel"}],
    }
    materials = schema["properties"]["materials"]
    materials.pop("patternProperties", None)
    materials["additionalProperties"] = {"$ref": "#/$defs/MaterialModel"}
    materials["propertyNames"] = {"pattern": MATERIAL_KEY.pattern}
    materials["minProperties"] = 1
    schema["properties"]["steps"]["minItems"] = 1
    _drop_null_defaults(schema)
    out = {"$schema": "https://json-schema.org/draft/2020-12/schema", "$id": SCHEMA_ID,
           "title": "routeplan route file, format 1",
           "description": "One synthesis route to one target: materials, vessels and steps. "
                          "Checks shape and spelling; run 'routeplan check' for units, references and chemistry. "
                          + CAUTION}
    out.update({k: v for k, v in schema.items() if k not in ("title", "description")})
    return out


def route_json_schema_text() -> str:
    """The schema as indented JSON text, ending in a newline."""
    return json.dumps(route_json_schema(), indent=2, ensure_ascii=False) + "\n"

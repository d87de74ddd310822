"""The JSON Schema of scene format 1, generated from ``viewer.scene.spec``.

docs/scene.schema.json is this module's output (``python -m viewer.scene.schema``); a test
keeps the two equal. Editors that validate TOML against a JSON Schema can use it for
completion and early errors. The schema checks structure: key names, types, required keys,
which keys exclude each other, numeric ranges and the shape of quantity strings. What
needs arithmetic (units of the right dimension, e against the sign of a, asymptotes,
names that must exist) is left to the loader, so the schema never rejects a file that
loads.
"""

from __future__ import annotations

import json
import sys
from typing import Any

from .spec import KINDS, POPULATION_COLUMNS, TOP, Key

SCHEMA_ID = "urn:perifocal:scene-format-1"

_NUMBER = r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?"
#: A number with an optional unit: "1.52 au", "88 d", "1.327e20 m3/s2", "0.5".
QUANTITY_PATTERN = rf"^\s*{_NUMBER}\s*(?:[^\s\d+\-.][^\s]*(?:\s*/\s*\S+)?)?\s*$"
EPOCH_PATTERN = r"^\s*\d{4}-\d{2}-\d{2}"
COLOR_PATTERN = r"^\s*#(?:[0-9a-fA-F]{3}|[0-9a-fA-F]{6})\s*$"
FRAME_PATTERN = r"^\s*[A-Za-z][A-Za-z0-9_]{0,31}\s*$"

_QUANTITY = {"anyOf": [{"type": "number"}, {"type": "string", "pattern": QUANTITY_PATTERN}]}

#: Numeric ranges the loader enforces on bare numbers and whole numbers.
_RANGES: dict[str, dict[str, Any]] = {
    "body.e": {"minimum": 0, "maximum": 1000},
    "body.line_width": {"exclusiveMinimum": 0, "maximum": 100},
    "body.sweep.count": {"minimum": 1, "maximum": 1000},
    "body.sweep.opacity": {"minimum": 0, "maximum": 1},
    "timeline.fps": {"exclusiveMinimum": 0, "maximum": 1000},
    "timeline.caption.size": {"exclusiveMinimum": 0, "maximum": 400},
    "scene.format": {"enum": [1]},
    "population.point_size": {"exclusiveMinimum": 0, "maximum": 100},
    "population.generate.count": {"minimum": 1, "maximum": 5_000_000},
    "population.generate.seed": {"minimum": 0, "maximum": 2**63 - 1},
}


def _not_both(*pairs: tuple[str, str]) -> list[dict[str, Any]]:
    return [{"not": {"required": list(p)}} for p in pairs]


#: Keys a body that follows an ephemeris may not have (its orbit comes from there).
_ORBIT_KEYS = ("a", "period", "periapsis", "apoapsis", "e", "i", "raan", "argp", "M", "nu",
               "tp", "epoch")

#: Required keys and keys that exclude each other, per table (as the loader checks them).
_RULES: dict[str, dict[str, Any]] = {
    "": {"required": ["center"]},
    "center": {
        "anyOf": [{"required": ["gm"]}, {"required": ["preset"]}],
        "not": {"required": ["gm", "preset"]},
    },
    "body": {
        "required": ["name"],
        "anyOf": [{"required": ["a"]}, {"required": ["period"]}, {"required": ["periapsis"]},
                  {"required": ["ephemeris"]}, {"required": ["ephemeris_body"]}],
        "allOf": _not_both(*(("ephemeris", k) for k in _ORBIT_KEYS),
                           *(("ephemeris_body", k) for k in _ORBIT_KEYS), ("a", "period"),
                           ("a", "periapsis"), ("a", "apoapsis"),
                           ("period", "periapsis"), ("period", "apoapsis"), ("M", "nu"),
                           ("M", "tp"), ("nu", "tp"))
        + [{"not": {"required": ["periapsis", "apoapsis", "e"]}}],
        "dependentRequired": {"apoapsis": ["periapsis"]},
        "dependentSchemas": {"periapsis": {"anyOf": [{"required": ["e"]},
                                                     {"required": ["apoapsis"]}]},
                             "osculating_epoch": {"anyOf": [{"required": ["ephemeris"]},
                                                            {"required": ["ephemeris_body"]}]}},
    },
    "population": {
        "required": ["name"],
        "oneOf": [{"required": ["table"]}, {"required": ["generate"]}],
    },
    "population.generate": {"required": ["count", "a"]},
    "timeline.camera": {"required": ["at"]},
    "timeline.fade": {"required": ["body", "at", "opacity"]},
    "timeline.caption": {"required": ["text"]},
}


def _case_insensitive(word: str) -> str:
    return "".join(f"[{c.lower()}{c.upper()}]" if c.isalpha() else c for c in word)


def _value(key: Key, path: str) -> dict[str, Any]:
    kind = key.kind
    out: dict[str, Any]
    if kind in ("length", "time", "angle", "gm", "rate"):
        out = dict(_QUANTITY)
    elif kind == "show_time":
        out = dict(_QUANTITY)
    elif kind == "show_times":
        out = {"type": "array", "items": _QUANTITY, "minItems": 1}
    elif kind == "opacities":
        out = {"type": "array", "items": {"type": "number", "minimum": 0, "maximum": 1},
               "minItems": 1}
    elif kind == "time_or_epoch":
        out = {"anyOf": [{"type": "number"}, {"type": "string", "pattern": QUANTITY_PATTERN},
                         {"type": "string", "pattern": EPOCH_PATTERN}]}
    elif kind == "number":
        out = {"type": "number"}
    elif kind == "int":
        out = {"type": "integer"}
    elif kind == "bool":
        out = {"type": "boolean"}
    elif kind == "string":
        out = {"type": "string"}
    elif kind in ("name", "path"):
        out = {"type": "string", "pattern": r"\S"}
    elif kind == "epoch":
        out = {"type": "string", "pattern": EPOCH_PATTERN}
    elif kind == "color":
        out = {"type": "string", "pattern": COLOR_PATTERN}
    elif kind == "frame":
        out = {"type": "string", "pattern": FRAME_PATTERN}
    elif kind == "choice":
        if path == "center.preset":  # the loader folds the case of catalogue names
            out = {"type": "string", "pattern": "^\\s*(?:" + "|".join(
                _case_insensitive(c) for c in key.choices) + ")\\s*$"}
        else:
            out = {"type": "string", "enum": list(key.choices)}
    elif kind == "target":
        out = {"anyOf": [{"type": "string"},
                         {"type": "array", "items": _QUANTITY, "minItems": 3, "maxItems": 3}]}
    elif kind == "size":
        out = {"type": "array", "items": {"type": "integer", "minimum": 16, "maximum": 16384},
               "minItems": 2, "maxItems": 2}
    elif kind == "columns":
        out = {"type": "array", "items": {"type": "string", "enum": list(POPULATION_COLUMNS)},
               "minItems": 1}
    elif kind in ("length_range", "angle_range"):
        out = {"type": "array", "items": _QUANTITY, "minItems": 2, "maxItems": 2}
    elif kind == "number_range":
        out = {"type": "array", "items": {"type": "number"}, "minItems": 2, "maxItems": 2}
    elif kind in ("table", "tables"):
        table = _table(key, path)
        out = table if kind == "table" else {"type": "array", "items": table}
    else:  # pragma: no cover - a kind added to spec without a schema
        raise KeyError(kind)
    out.update(_RANGES.get(path, {}))
    doc = key.doc + (f" (default: {key.default})" if key.default else "")
    return {"description": f"{doc}. Written as {KINDS[kind]}.", **out}


def _table(spec: Key, path: str) -> dict[str, Any]:
    props = {k.name: _value(k, f"{path}.{k.name}" if path else k.name) for k in spec.keys}
    out: dict[str, Any] = {"type": "object", "properties": props, "additionalProperties": False}
    out.update(_RULES.get(path, {}))
    return out


def scene_schema() -> dict[str, Any]:
    """The JSON Schema (draft 2020-12) of a scene file, as a dict."""
    schema = {
        "$schema": "https://json-schema.org/draft/2020-12/schema",
        "$id": SCHEMA_ID,
        "title": "Perifocal scene file, format 1",
        "description": "A TOML scene: one central body, bodies with their orbital elements "
        "and what to draw, a camera, render settings and a timeline. See "
        "docs/scene-format.md. Quantities are strings with units (\"1.52 au\").",
    }
    schema.update(_table(TOP, ""))
    return schema


def schema_text() -> str:
    """The text of docs/scene.schema.json."""
    return json.dumps(scene_schema(), indent=2, ensure_ascii=False) + "\n"


if __name__ == "__main__":
    sys.stdout.write(schema_text())

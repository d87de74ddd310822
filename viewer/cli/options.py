"""What every command shares when it reads options and prints: numbers with their limits,
and strict JSON.

* ``quantity(text, flag, dimension, unit)``: an SI float from a flag, within the limits of
  ``viewer.units.limits`` (the same as in scene files), or one UserInputError naming the
  flag and the allowed range.
* ``NEGATIVE_NUMBER``: what the argument parser takes for a value, not a flag ("-1e3",
  "-.5", "-1.3356e7", "-inf"): ``viewer.cli`` gives it to every command's parser.
* ``write_json(obj)``: every ``--json`` goes through it. NaN and infinity become null (a
  quantity the conic does not have, DEVELOPERS.md), and the text is checked with
  ``allow_nan=False``, so the output is strict JSON (RFC 8259 has no NaN).
"""

from __future__ import annotations

import json
import math
import re
import sys
from typing import Any, TextIO

from ..errors import UserInputError

#: A negative number as a value of an option, in any notation Python's float() reads.
NEGATIVE_NUMBER = re.compile(
    r"^-(?:(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?|inf|infinity|nan)$", re.IGNORECASE)


def quantity(text: str, flag: str, dimension: str, unit: str | None) -> float:
    """An SI float from ``text`` ("7000 km", "-1e3", bare numbers in ``unit``)."""
    from ..units import QuantityError
    from ..units.limits import parse_limited

    try:
        return parse_limited(text, dimension, unit)
    except QuantityError as err:
        raise UserInputError(flag, str(err)) from None


def jsonable(obj: Any) -> Any:
    """``obj`` with every non-finite float (also in numpy scalars) replaced by None."""
    if isinstance(obj, dict):
        return {k: jsonable(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [jsonable(v) for v in obj]
    if isinstance(obj, bool) or obj is None or isinstance(obj, (int, str)):
        return obj
    try:
        x = float(obj)
    except (TypeError, ValueError):
        return obj
    return x if math.isfinite(x) else None


def write_json(obj: Any, stream: TextIO | None = None) -> None:
    """Print ``obj`` as strict JSON (indent 1, NaN and infinity as null)."""
    text = json.dumps(jsonable(obj), indent=1, allow_nan=False)
    (stream or sys.stdout).write(text + "\n")

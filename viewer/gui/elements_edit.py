"""One element edit: a new value for one of the forms users think in, with a lock.

A user changes one quantity (a, e, the period, the periapsis or apoapsis as a radius or
an altitude, an angle or the anomaly at the epoch); the lock ``hold`` says which other
shape quantity stays fixed. Shape quantities (radii in m):

    a   semi-major axis (the period 2 pi sqrt(a^3/mu) goes with it, so holding the
        period is holding a)
    e   eccentricity
    q   periapsis radius  q = a (1 - e)
    Q   apoapsis radius   Q = a (1 + e)   (closed orbits only)

Two of them fix the other two. Holding the quantity that is being changed makes no
sense, so then the natural partner is held instead: a <-> e, q <-> Q. Every edit either
returns complete new elements or raises ``EditRefused`` with the reason; nothing is
applied half-way. The body keeps its mean anomaly at its epoch through a shape edit
(so it passes periapsis at the same times when the period is held); when the orbit opens
or closes, the mean anomaly is wrapped into the new conic's range.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import UserInputError
from ..orbit import Elements, asymptote_true_anomaly, mean_from_true, true_from_mean
from ..units import QuantityError, parse_quantity
from ..units.limits import MAX_E, MAX_LENGTH_M, MIN_SIZE_M  # the one home of the limits

TWO_PI = 2.0 * math.pi

#: What a lock can hold. "period" is a name for "a" (mu is fixed).
HOLDS = ("auto", "a", "period", "e", "periapsis", "apoapsis")

#: Field name -> (dimension for parsing, label with its meaning).
FIELDS: dict[str, tuple[str, str]] = {
    "a": ("length", "semi-major axis"),
    "e": ("dimensionless", "eccentricity"),
    "i": ("angle", "inclination"),
    "raan": ("angle", "right ascension of the ascending node"),
    "argp": ("angle", "argument of periapsis"),
    "M": ("angle", "mean anomaly at the epoch"),
    "nu": ("angle", "true anomaly at the epoch"),
    "periapsis": ("length", "periapsis radius"),
    "apoapsis": ("length", "apoapsis radius"),
    "periapsis_altitude": ("length", "periapsis altitude above the central radius"),
    "apoapsis_altitude": ("length", "apoapsis altitude above the central radius"),
    "period": ("time", "orbital period"),
}

_SHAPE_OF = {"a": "a", "period": "a", "e": "e", "periapsis": "q", "periapsis_altitude": "q",
             "apoapsis": "Q", "apoapsis_altitude": "Q"}
_HOLD_SHAPE = {"a": "a", "period": "a", "e": "e", "periapsis": "q", "apoapsis": "Q"}
_PARTNER = {"a": "e", "e": "a", "q": "Q", "Q": "q"}
_NAMES = {"a": "a (and the period)", "e": "e", "q": "the periapsis", "Q": "the apoapsis"}


class EditRefused(UserInputError):
    """An edit that was not applied; ``problems[0]`` says why, in one line."""


@dataclass(frozen=True)
class Shape:
    """The size and shape of a conic: a (m; inf for a parabola), e, parabola_p (m)."""

    a: float
    e: float
    parabola_p: float | None = None


def held_quantity(field: str, hold: str) -> str:
    """The shape quantity ("a", "e", "q" or "Q") that stays fixed when ``field`` changes."""
    changed = _SHAPE_OF[field]
    held = _HOLD_SHAPE.get(hold, _PARTNER[changed])
    return _PARTNER[changed] if held == changed else held


def kept_text(field: str, hold: str) -> str:
    """What an edit of ``field`` under the lock ``hold`` keeps, in words: "a changed;
    kept e (the natural partner)". Empty for a field that is not a shape quantity."""
    if field not in _SHAPE_OF:
        return ""
    held = held_quantity(field, hold)
    changed = FIELDS[field][1]
    partner = hold == "auto" or _HOLD_SHAPE.get(hold) == _SHAPE_OF[field]
    return (f"{changed} changed; kept {_NAMES[held]}"
            + (" (the natural partner)" if partner else ""))


def parse_field(field: str, text: str, default_unit: str | None) -> float:
    """The SI value of ``text`` for ``field`` (bare numbers take ``default_unit``)."""
    dimension, label = FIELDS[field]
    try:
        return parse_quantity(text.strip(), dimension, default_unit)
    except QuantityError as err:
        raise EditRefused(field, f"{label}: {err}") from None


def _refuse(field: str, reason: str) -> EditRefused:
    return EditRefused(field, reason)


def _km(x: float) -> str:
    return f"{x / 1e3:,.6g} km"


def new_shape(el: Elements, field: str, value: float, hold: str, central_radius_m: float
              ) -> Shape:
    """The shape after setting ``field`` (a shape field) to ``value`` (SI) with ``hold``.

    Raises EditRefused for a value that is impossible or that the lock does not allow.
    """
    if field not in _SHAPE_OF:
        raise KeyError(field)
    mu = float(el.mu)
    if field == "period":
        if not value > 0:
            raise _refuse(field, "the period must be positive")
        value = (mu * value * value / (4.0 * math.pi**2)) ** (1.0 / 3.0)
    if field.endswith("_altitude"):
        value = value + central_radius_m
    changed = _SHAPE_OF[field]
    held = held_quantity(field, hold)
    e0 = float(el.e)
    a0 = float(el.a)
    q0 = float(el.periapsis)
    closed0 = e0 < 1.0
    Q0 = float(el.apoapsis) if closed0 else math.nan

    if changed in ("q", "Q"):
        what = "periapsis" if changed == "q" else "apoapsis"
        if not value >= MIN_SIZE_M:
            where = ("the centre of the central body" if not field.endswith("_altitude")
                     else f"the centre ({_km(central_radius_m)} below the surface)")
            raise _refuse(field, f"the {what} radius must be above {where}; got {_km(value)}")
    if changed == "e" and not 0.0 <= value <= MAX_E:
        raise _refuse(field, f"e must be between 0 and {MAX_E:g}; got {value:g}")
    if changed == "a" and value == 0.0:
        raise _refuse(field, "a must not be zero")
    if abs(value) > MAX_LENGTH_M and changed != "e":
        raise _refuse(field, f"{value:g} m is too large (at most {MAX_LENGTH_M:g} m)")
    if held == "Q" and not closed0:
        raise _refuse(field, "the apoapsis is held, but this orbit is open and has none; "
                      "hold the periapsis or e instead")

    if changed == "a":
        a = value
        if held == "e":
            if field == "period" and e0 >= 1.0:
                raise _refuse(field, "an open orbit (e >= 1) has no period; change e with "
                              "the periapsis held to close it first")
            if e0 < 1.0 and a < 0:
                raise _refuse(field, "a must be positive for an ellipse (e < 1)")
            if e0 > 1.0 and a > 0:
                raise _refuse(field, "this orbit is a hyperbola (e > 1): its a is negative")
            if e0 == 1.0:
                raise _refuse(field, "a parabola (e = 1) has no finite a; change the periapsis")
            return Shape(a, e0)
        if a < 0:
            raise _refuse(field, f"a negative a is a hyperbola; with {_NAMES[held]} held give "
                          "a positive a, or hold e")
        if held == "q":
            if a < q0:
                raise _refuse(field, f"with the periapsis held at {_km(q0)}, a must be at "
                              f"least the periapsis (else e < 0)")
            return Shape(a, 1.0 - q0 / a)
        if not Q0 / 2.0 < a <= Q0:
            raise _refuse(field, f"with the apoapsis held at {_km(Q0)}, a must lie between "
                          f"half the apoapsis ({_km(Q0 / 2)}, exclusive) and the apoapsis")
        return Shape(a, Q0 / a - 1.0)

    if changed == "e":
        e = value
        if held == "a":
            if closed0 and e >= 1.0:
                raise _refuse(field, f"e = {e:g} would open the orbit, which has no finite "
                              "positive a; hold the periapsis to open it")
            if e0 > 1.0 and e <= 1.0:
                raise _refuse(field, f"e = {e:g} would close a hyperbola with a held; hold "
                              "the periapsis instead")
            return Shape(a0, e)
        if held == "q":
            return _from_periapsis(field, q0, e)
        if e >= 1.0:
            raise _refuse(field, f"e = {e:g}: an open orbit has no apoapsis to hold; hold "
                          "the periapsis to open the orbit")
        return Shape(Q0 / (1.0 + e), e)

    if changed == "q":
        q = value
        if held == "Q":
            if q > Q0:
                raise _refuse(field, f"the periapsis must not be above the held apoapsis "
                              f"({_km(Q0)}); got {_km(q)}")
            return Shape((q + Q0) / 2.0, (Q0 - q) / (Q0 + q))
        if held == "e":
            return _from_periapsis(field, q, e0)
        if e0 == 1.0:
            raise _refuse(field, "a parabola has no finite a to hold; hold e instead")
        if a0 > 0 and q > a0:
            raise _refuse(field, f"with a held at {_km(a0)}, the periapsis must not be "
                          f"above a; got {_km(q)}")
        return Shape(a0, 1.0 - q / a0)

    Q = value  # changed == "Q"
    if held == "q":
        if Q < q0:
            raise _refuse(field, f"the apoapsis must not be below the held periapsis "
                          f"({_km(q0)}); got {_km(Q)}")
        return Shape((q0 + Q) / 2.0, (Q - q0) / (Q + q0))
    if held == "e":
        if e0 >= 1.0:
            raise _refuse(field, "an open orbit has no apoapsis; hold the periapsis to "
                          "close it with this apoapsis")
        return Shape(Q / (1.0 + e0), e0)
    if not closed0:
        raise _refuse(field, "an open orbit has no apoapsis; hold the periapsis instead")
    if not a0 <= Q < 2.0 * a0:
        raise _refuse(field, f"with a held at {_km(a0)}, the apoapsis must lie between a "
                      f"and 2a ({_km(2 * a0)}, exclusive); got {_km(Q)}")
    return Shape(a0, Q / a0 - 1.0)


def _from_periapsis(field: str, q: float, e: float) -> Shape:
    if e == 1.0:
        return Shape(math.inf, 1.0, 2.0 * q)
    a = q / (1.0 - e)
    if abs(a) > MAX_LENGTH_M:
        raise _refuse(field, f"e = {e!r} is too close to 1 for a finite orbit; use e = 1 (a "
                      "parabola) or move e away from 1")
    return Shape(a, e)


def reshaped(el: Elements, shape: Shape) -> Elements:
    """``el`` with a new size and shape, keeping its orientation and its mean anomaly at
    the epoch (wrapped into the new conic's range when it opens or closes)."""
    M = float(mean_from_true(el.nu, el.e))
    if shape.e < 1.0:
        M = M % TWO_PI
    elif float(el.e) < 1.0:
        M = math.remainder(M, TWO_PI)
    nu = float(true_from_mean(M, shape.e))
    return Elements(a=shape.a, e=shape.e, i=el.i, raan=el.raan, argp=el.argp, nu=nu,
                    mu=el.mu, parabola_p=shape.parabola_p)


def with_angle(el: Elements, field: str, value: float) -> Elements:
    """``el`` with one angle field set (radians): i, raan, argp, M or nu at the epoch."""
    e = float(el.e)
    if field == "i":
        if not -1e-12 <= value <= math.pi * (1 + 1e-12):
            raise _refuse(field, f"i = {math.degrees(value):.6g} deg is out of range; allowed: "
                          "0 to 180 deg (above 90 deg is retrograde)")
        return el.with_(i=min(max(value, 0.0), math.pi))
    if field in ("raan", "argp"):
        return el.with_(**{field: value % TWO_PI})
    if field == "M":
        if e < 1.0:
            return el.with_(nu=float(true_from_mean(value % TWO_PI, e)))
        if abs(value) > 1e6:
            raise _refuse(field, "this mean anomaly is too far from periapsis to draw")
        return el.with_(nu=float(true_from_mean(value, e)))
    if field == "nu":
        if e < 1.0:
            return el.with_(nu=value % TWO_PI)
        nu = math.remainder(value, TWO_PI)
        limit = float(asymptote_true_anomaly(e))
        if abs(nu) >= limit:
            raise _refuse(field, f"nu = {math.degrees(value):.6g} deg is beyond the asymptotes "
                          f"of this open orbit; allowed: |nu| < {math.degrees(limit):.6g} deg")
        return el.with_(nu=nu)
    raise KeyError(field)


def edit_elements(el: Elements, field: str, text: str, hold: str, central_radius_m: float,
                  default_unit: str | None) -> Elements:
    """New elements after typing ``text`` into ``field`` with the lock ``hold``.

    Raises EditRefused (one line: what is wrong, what is allowed); never returns
    elements that the scene loader would refuse.
    """
    if field not in FIELDS:
        raise KeyError(field)
    if hold not in HOLDS:
        raise ValueError(f"unknown lock {hold!r}; one of {', '.join(HOLDS)}")
    value = parse_field(field, text, default_unit)
    if field in _SHAPE_OF:
        new = reshaped(el, new_shape(el, field, value, hold, central_radius_m))
    else:
        new = with_angle(el, field, value)
    for name in ("a", "e", "nu"):
        if not math.isfinite(float(getattr(new, name))) and not (name == "a" and new.e == 1.0):
            raise _refuse(field, f"the edit gives no finite {name}; nothing was changed")
    return new

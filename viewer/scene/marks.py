"""The one table of a body's drawable marks.

Every place that names the marks derives the names from ``MARKS``: the ``show`` keys of
the key spec (and so the JSON Schema and the docs check), the marks a fade may change,
the per-mark opacities of a frame (``model.MarkOpacity``) and what to draw
(``model.BodyShow``; a test holds their fields to this table), and the panels'
checkboxes. To add a mark, add a row here, draw it in ``viewer/geometry``, and document
it in docs/scene-format.md (a test insists). Imports nothing.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Mark:
    """One drawable mark: its scene-file name, what it is (for the spec and the docs),
    its label in the panels, and the default of its ``show`` key."""

    name: str
    what: str
    label: str
    default: str


MARKS: tuple[Mark, ...] = (
    Mark("orbit", "the orbit curve", "orbit", "true"),
    Mark("marker", "the body's marker at the current time", "marker", "true"),
    Mark("label", "the body's name beside its marker", "label", "true"),
    Mark("foci", "both foci (occupied and empty)", "both foci", "false"),
    Mark("axes", "major and minor axes", "axes", "false"),
    Mark("apsides", "periapsis and apoapsis marks", "apsides", "false"),
    Mark("nodes", "the line of nodes", "line of nodes", "false"),
    Mark("velocity", "the velocity arrow", "velocity arrow", "false"),
    Mark("sweep", "the swept sectors", "equal-time sectors", "true when a sweep table is given"),
)

#: The marks' names, in table order.
NAMES: tuple[str, ...] = tuple(m.name for m in MARKS)

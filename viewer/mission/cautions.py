"""The cautions every front end shows beside orbit numbers and immersive renders."""

from __future__ import annotations

CAUTION = (
    "Caution: two-body, Keplerian model only. Not for operational navigation, "
    "conjunction assessment or any flight-safety decision; defer to the mission's "
    "flight-dynamics practice."
)

PHOTOSENSITIVITY = (
    "For dome and other immersive shows: rapid flashing or fast, high-contrast motion is "
    "a photosensitivity risk for some viewers; follow your venue's guidance."
)

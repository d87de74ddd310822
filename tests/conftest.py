"""Shared test setup: numpy floating-point warnings are errors, so a NaN never hides.

Every test runs under ``np.seterr(all="raise")`` (overflow, invalid, divide and underflow
raise FloatingPointError); the previous settings are restored after each test, so no
test leaks its state into another. Code that expects a special value on purpose says so
with ``np.errstate`` at the spot.
"""

from __future__ import annotations

from collections.abc import Iterator

import numpy as np
import pytest


@pytest.fixture(autouse=True)
def numpy_errors_raise() -> Iterator[None]:
    """Make every numpy floating-point warning an error for the duration of one test."""
    previous = np.seterr(all="raise")
    try:
        yield
    finally:
        np.seterr(**previous)


@pytest.fixture
def display(tmp_path):  # type: ignore[no-untyped-def]
    """A private Xvfb server for one window test (``support.xwindow.Display``)."""
    from support.xwindow import Display

    d = Display(tmp_path)
    try:
        yield d
    finally:
        d.close()


@pytest.fixture(scope="module")
def immersive() -> Iterator[object]:
    """An ImmersiveRenderer (dome masters, panoramas) on a headless context of its own."""
    from viewer.export.immersive import ImmersiveRenderer
    from viewer.render.context import headless_context
    from viewer.render.renderer import Renderer

    ctx = headless_context()
    r = Renderer(ctx)
    im = ImmersiveRenderer(r)
    yield im
    im.release()
    r.release()
    ctx.release()

"""OpenGL contexts: the headless one (EGL on Mesa llvmpipe) for tests, exports and the CLI.

The window (viewer.gui) makes its own context with pyglet and hands it to the same
Renderer; nothing here knows about windows. With no usable OpenGL at all the error is
one line that says which packages to install.
"""

from __future__ import annotations

import ctypes
import functools
import os
from typing import Any

from ..errors import UserInputError

GL_VERSION = 330

INSTALL_HINT = ("no usable OpenGL 3.3 through EGL; install libegl1 and libgl1-mesa-dri "
                "(Debian/Ubuntu: sudo apt-get install libegl1 libgl1-mesa-dri)")


class GLUnavailable(UserInputError):
    """No OpenGL 3.3 context could be made; the message names the packages to install."""

    def __init__(self, detail: str = "") -> None:
        super().__init__("OpenGL", INSTALL_HINT + (f" [{detail}]" if detail else ""))


def headless_context() -> Any:
    """A standalone OpenGL 3.3 core context through EGL (llvmpipe when there is no GPU).

    Sets LP_NUM_THREADS to the core count unless the environment already sets it, so
    llvmpipe rasterises on every core.
    """
    os.environ.setdefault("LP_NUM_THREADS", str(os.cpu_count() or 1))
    try:
        import moderngl
    except ImportError as err:  # the wheel is a hard dependency, but say it plainly
        raise GLUnavailable(f"moderngl is not importable: {err}") from err
    try:
        return moderngl.create_standalone_context(backend="egl",  # type: ignore[arg-type]
                                                 require=GL_VERSION)
    except Exception as err:  # glcontext raises bare Exceptions for a missing libEGL
        raise GLUnavailable(str(err).splitlines()[0] if str(err) else type(err).__name__) \
            from err


@functools.lru_cache(maxsize=1)
def _egl() -> Any:
    """libEGL's eglGetCurrentDisplay, eglGetCurrentContext and eglMakeCurrent, or None."""
    try:
        egl = ctypes.CDLL("libEGL.so.1")
    except OSError:
        return None
    egl.eglGetCurrentDisplay.restype = ctypes.c_void_p
    egl.eglGetCurrentContext.restype = ctypes.c_void_p
    egl.eglMakeCurrent.argtypes = [ctypes.c_void_p] * 4
    return egl


def release_context(ctx: Any) -> None:
    """Release a ``headless_context`` and leave no EGL context current on this thread.

    moderngl destroys the EGL context but leaves it current, and a context destroyed
    while current lives on until unbound: a window made afterwards in the same process
    (pyglet, GLX) then had its GL calls land in that dead context, and its offscreen
    framebuffers were incomplete there."""
    ctx.release()
    egl = _egl()
    if egl is not None and egl.eglGetCurrentContext():
        egl.eglMakeCurrent(egl.eglGetCurrentDisplay(), None, None, None)


@functools.lru_cache(maxsize=1)
def _gl_flush() -> Any:
    """glFlush from the GL dispatch library shared by EGL and GLX contexts (glvnd)."""
    for name in ("libOpenGL.so.0", "libGL.so.1"):
        try:
            return ctypes.CDLL(name).glFlush
        except (OSError, AttributeError):
            continue
    return None


def flush() -> None:
    """Hand the commands queued on the current context to the GL without waiting for
    them (glFlush; moderngl wraps only glFinish). llvmpipe then rasterises them on its
    own threads while Python goes on with work that needs no GL, such as placing labels.
    A GL without the dispatch library simply starts the work later."""
    gl_flush = _gl_flush()
    if gl_flush is not None:
        gl_flush()

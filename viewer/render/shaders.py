"""Shaders as files: ``shaders/NAME.vert`` and ``NAME.frag``, found inside the package.

``viewer/shaders`` is the top-level ``shaders/`` folder (a symlink in the checkout, a
copy in the wheel), so ``importlib.resources`` finds the same files either way. A
missing file or a compile error fails with the file's name and the compiler's message.
"""

from __future__ import annotations

from importlib import resources
from typing import Any


class ShaderError(RuntimeError):
    """A shader file that is missing or does not compile."""


def shader_source(filename: str) -> str:
    """The text of ``shaders/<filename>``."""
    path = resources.files("viewer").joinpath("shaders", filename)
    try:
        return path.read_text(encoding="utf-8")
    except (FileNotFoundError, OSError) as err:
        raise ShaderError(f"shader file shaders/{filename} not found ({err})") from err


def with_defines(source: str, defines: dict[str, int] | None) -> str:
    """``source`` with ``#define NAME value`` lines after its ``#version`` line."""
    if not defines:
        return source
    first, _, rest = source.partition("\n")
    lines = "".join(f"#define {k} {v}\n" for k, v in sorted(defines.items()))
    return f"{first}\n{lines}{rest}"


def load_program(ctx: Any, vertex: str, fragment: str | None = None,
                 varyings: tuple[str, ...] = (), defines: dict[str, int] | None = None) -> Any:
    """Compile ``shaders/<vertex>.vert`` with ``shaders/<fragment or vertex>.frag``.

    With ``varyings`` the program is a transform-feedback one: a vertex stage only,
    whose named outputs are captured into a buffer. ``defines`` are compile-time
    constants given to the fragment stage (``#define NAME value``).
    """
    vs_name = f"{vertex}.vert"
    vs = shader_source(vs_name)
    if varyings:
        try:
            return ctx.program(vertex_shader=vs, varyings=list(varyings))
        except Exception as err:
            raise ShaderError(f"shaders/{vs_name}: {err}") from err
    fs_name = f"{fragment or vertex}.frag"
    fs = with_defines(shader_source(fs_name), defines)
    try:
        return ctx.program(vertex_shader=vs, fragment_shader=fs)
    except Exception as err:  # moderngl.Error carries the compiler log
        raise ShaderError(f"shaders/{vs_name} + shaders/{fs_name}: {err}") from err

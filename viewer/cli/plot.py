"""``perifocal plot SCENE -o law.png``: the third-law plot of a scene (log T against log a
beside T^2 against a^3, with the slope 4 pi^2 / GM printed), as PNG or SVG, and the
numbers of each closed orbit on standard output."""

from __future__ import annotations

import argparse
from pathlib import Path
from typing import Any

from ..errors import UserInputError

EXAMPLES = """examples:
  perifocal plot scenes/laws.toml -o third-law.png
  perifocal plot scenes/solar-system-mean.toml -o planets.svg

Every closed orbit of the scene (e < 1) is a point: its period from its own two-body
motion about the centre, against its semi-major axis. The line is the centre's third
law, T = 2 pi sqrt(a^3 / GM): slope 3/2 on the log axes, a straight line through the
origin of slope 4 pi^2 / GM on the T^2 against a^3 axes. The standard output lists each
body's a, T and T^2 / a^3 beside that slope.
"""

FORMATS = {".png": "png", ".svg": "svg"}


def add_parser(sub: Any) -> None:
    from . import CAUTION

    p = sub.add_parser(
        "plot", help="the third-law plot: log T vs log a beside T^2 vs a^3 (PNG, SVG)",
        description="Plot the third law of a scene: every closed orbit's period against its "
        "semi-major axis on log axes, beside T^2 against a^3 with the straight line of "
        "slope 4 pi^2 / GM through the origin (its value printed with units).",
        epilog=EXAMPLES + "\n" + CAUTION, formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("scene", metavar="SCENE", help="a scene file (.toml)")
    p.add_argument("-o", "--output", required=True, metavar="OUT",
                   help="the plot: a .png or .svg file")
    p.add_argument("--force", action="store_true",
                   help="replace an existing file (the old one is kept as NAME.bak)")
    p.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from . import CAUTION

    fmt = FORMATS.get(Path(args.output).suffix.lower())
    if fmt is None:
        raise UserInputError("-o", f"{args.output!r}: the plot is written as .png or .svg")
    from ..export.law_plot import plot, slope_text
    from ..fileio import claim_output, write_output
    from ..scene import load_scene
    from ..scene.third_law import square_cube

    scene = load_scene(args.scene)
    sq = square_cube(scene)
    if not sq.names:
        raise UserInputError(args.scene, "the scene has no closed orbit (e < 1): the third "
                             "law needs a period; add a body on an ellipse")
    target = claim_output(args.output, force=args.force, inputs=[args.scene])
    data = plot(scene, fmt, CAUTION)
    write_output(target, data)
    from ..units.format import format_sig

    L, T = sq.length_unit, sq.time_unit
    print(f"third law about {scene.center.name}: {slope_text(scene)}")
    print(f"  {'body':<20} {'a^3 (' + L + '^3)':>16} {'T^2 (' + T + '^2)':>16} "
          f"{'T^2/a^3':>12}")
    for name, a3, t2 in zip(sq.names, sq.a3, sq.t2, strict=True):
        print(f"  {name:<20} {format_sig(a3, 6):>16} {format_sig(t2, 6):>16} "
              f"{format_sig(t2 / a3, 6):>12}")
    print(f"wrote {args.output}")
    print(CAUTION)
    return 0

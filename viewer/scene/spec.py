"""The keys of scene format 1, as data: one table read by the loader (unknown keys and
"did you mean" hints), the JSON Schema generator (``viewer.scene.schema``) and the test
that every key is documented in docs/scene-format.md.

A ``Key`` says its name, its kind (how a value is written, see ``KINDS``), its default
as the docs state it, and, for tables, the keys inside. Units and meanings are in
docs/scene-format.md; the loader (``viewer.scene.loader``) gives each kind its parser.
"""

from __future__ import annotations

from dataclasses import dataclass

from ..ephemeris import EPHEMERIDES, ORIGINS, TARGETS
from ..orbit.constants import CATALOGUE
from .marks import MARKS
from .marks import NAMES as MARK_NAMES

#: How a value of each kind is written in TOML (used in messages and in the docs test).
KINDS: dict[str, str] = {
    "string": "text in quotes",
    "name": "non-empty text in quotes",
    "bool": "true or false",
    "int": "a whole number",
    "number": "a bare number",
    "length": 'a length such as "1.52 au" or "7000 km"',
    "time": 'a time such as "88 d" or "90 min"',
    "angle": 'an angle such as "12 deg"',
    "gm": 'a gravitational parameter such as "3.986004418e14 m3/s2"',
    "rate": 'scene time per second of show, such as "5 d/s"',
    "epoch": 'an ISO 8601 epoch in quotes, such as "2030-01-01T00:00:00 TDB"',
    "time_or_epoch": 'an offset from the scene epoch ("90 d", "-15 d") or an epoch',
    "color": 'a hex colour such as "#7fd0ff"',
    "show_time": 'a time into the show such as "8 s" (a bare number is in seconds)',
    "show_times": 'a list of times into the show, such as ["0 s", "2 s", "8 s"]',
    "opacities": "a list of bare numbers from 0 to 1, one per time",
    "choice": "one of the listed words, in quotes",
    "target": '"center", a body\'s name, or [x, y, z] in the length unit',
    "size": "[width, height] in pixels",
    "frame": 'a frame name such as "ECLIPJ2000" or "EME2000"',
    "path": "a file path in quotes, relative to the scene file",
    "columns": 'a list of column names such as ["a", "e", "i", "raan", "argp", "M"]',
    "length_range": 'two lengths [low, high], such as ["2.1 au", "3.3 au"]',
    "number_range": "two bare numbers [low, high]",
    "angle_range": 'two angles [low, high], such as ["0 deg", "20 deg"]',
    "table": "a table",
    "tables": "an array of tables",
}


@dataclass(frozen=True)
class Key:
    """One key of the format: name, kind (a key of KINDS), default and nested keys."""

    name: str
    kind: str
    doc: str
    default: str | None = None
    choices: tuple[str, ...] = ()
    keys: tuple[Key, ...] = ()
    required: bool = False

    def key(self, name: str) -> Key | None:
        for k in self.keys:
            if k.name == name:
                return k
        return None

    @property
    def names(self) -> tuple[str, ...]:
        return tuple(k.name for k in self.keys)


#: Frames commonly written in CCSDS messages and SPICE kernels; any other token is allowed.
KNOWN_FRAMES = ("ECLIPJ2000", "EME2000", "ICRF", "GCRF", "J2000", "ITRF")

#: Columns a population table may hold (angles in the angle unit, lengths in the length unit).
POPULATION_COLUMNS = ("a", "e", "i", "raan", "argp", "M", "nu", "periapsis")

UNITS = Key("units", "table", "units of bare numbers in this file", keys=(
    Key("length", "choice", "unit of bare lengths", "au", ("m", "km", "Mm", "Gm", "au")),
    Key("time", "choice", "unit of bare times", "d", ("s", "min", "h", "d", "yr")),
    Key("angle", "choice", "unit of bare angles", "deg", ("rad", "deg", "arcmin", "arcsec")),
))

SCENE = Key("scene", "table", "title, epoch, frame and units of the file", keys=(
    Key("format", "int", "the format version this file is written for", "1"),
    Key("title", "string", "shown in the window title and printed by check",
        "the file name"),
    Key("description", "string", "free text for people; Perifocal ignores it", '""'),
    Key("epoch", "epoch", "t = 0 of the scene", "2000-01-01T12:00:00 TDB"),
    Key("frame", "frame", "the inertial frame the elements refer to", "ECLIPJ2000"),
    UNITS,
))

CENTER = Key("center", "table", "the central body at the occupied focus", required=True,
             keys=(
    Key("name", "string", "label of the central body", "the preset's name, else \"Center\""),
    Key("preset", "choice", "a catalogue body: sets gm and radius", None, tuple(CATALOGUE)),
    Key("gm", "gm", "gravitational parameter GM (bare number: m3/s2)",
        "required unless preset"),
    Key("radius", "length", "radius of the central body", "the preset's, else 0"),
    Key("atmosphere", "length", "height of the top of the atmosphere above the radius",
        "none"),
    Key("soi_radius", "length", "radius of the sphere of influence", "none"),
    Key("origin", "choice", "bodies that follow an ephemeris: positions from the centre "
        "body or from the solar-system barycentre", "body", ORIGINS),
    Key("color", "color", "colour of the disc", "#ffd27f"),
    Key("show", "table", "what to draw", keys=(
        Key("body", "bool", "the central body's disc", "true"),
        Key("label", "bool", "its label", "true"),
    )),
))

SHOW = Key("show", "table", "what to draw for the body (merged with the defaults)", keys=tuple(
    Key(m.name, "bool", m.what, m.default) for m in MARKS))

#: How the camera moves through a keyframe: "eased" comes to rest at the key (the ease
#: of each leg), "smooth" passes through it on a curve through the neighbouring keys.
CAMERA_PATHS = ("eased", "smooth")
#: How a sweep's sectors appear: "all" at once, or "swept" one by one as the body sweeps.
REVEALS = ("all", "swept")

SWEEP = Key("sweep", "table", "equal-time sectors from the occupied focus", keys=(
    Key("start", "time_or_epoch", "scene time of the first sector's first edge", "0 d"),
    Key("interval", "time", "duration of each sector",
        "one period / count (closed orbits; required for open ones)"),
    Key("count", "int", "number of sectors (1 to 1000)", "6"),
    Key("color", "color", "fill colour", "the body's colour"),
    Key("opacity", "number", "fill opacity, 0 to 1", "0.45"),
    Key("show_area", "bool", "print each sector's area beside it", "false"),
    Key("reveal", "choice", "all: every sector at every time; swept: each sector appears "
        "once the body has swept it whole, one by one as the show runs", "all", REVEALS),
))

FLIGHT = Key("flight", "table", "a trajectory flown only between two times", keys=(
    Key("start", "time_or_epoch", "the departure", required=True),
    Key("end", "time_or_epoch", "the arrival, after the departure", required=True),
))

SIZE_KEYS = ("a", "period", "periapsis", "apoapsis")
ANOMALY_KEYS = ("M", "nu", "tp")

BODY = Key("body", "tables", "one orbiting body per [[body]] table", keys=(
    Key("name", "name", "the body's name, unique in the file", required=True),
    Key("a", "length", "semi-major axis (negative for a hyperbola)", "one size is required"),
    Key("period", "time", "orbital period (the third law gives a)", "one size is required"),
    Key("periapsis", "length", "periapsis radius, from the centre of the central body",
        "one size is required"),
    Key("apoapsis", "length", "apoapsis radius (with periapsis)", "one size is required"),
    Key("e", "number", "eccentricity", "0 (a circle)"),
    Key("i", "angle", "inclination, 0 to 180 deg", "0 deg"),
    Key("raan", "angle", "right ascension (longitude) of the ascending node", "0 deg"),
    Key("argp", "angle", "argument of periapsis", "0 deg"),
    Key("M", "angle", "mean anomaly at the body's epoch", "0 deg"),
    Key("nu", "angle", "true anomaly at the body's epoch", "from M"),
    Key("tp", "time_or_epoch", "time of periapsis passage", "from M"),
    Key("epoch", "epoch", "the epoch of these elements", "the scene epoch"),
    Key("limit_radius", "length", "open conics: draw the branch out to this distance",
        "5 periapsis radii (farther if the body is farther)"),
    Key("radius", "length", "the body's own radius (for its marker when zoomed in)", "none"),
    Key("color", "color", "colour of every mark of the body", "from a palette"),
    Key("line_width", "number", "line width in pixels at 1080 px image height", "2"),
    Key("gm", "gm", "the body's own GM: its two-body motion uses GM_centre + gm",
        "0, or the ephemeris' value for a body that follows one"),
    Key("mass", "number", "the body's mass in kg, instead of gm (gm = G mass)", "none"),
    Key("ephemeris", "choice", "the body follows this ephemeris (then it has no orbit keys)",
        "none", EPHEMERIDES),
    Key("ephemeris_body", "choice", "which body of the ephemeris it is",
        "the body's name in lower case", TARGETS),
    Key("osculating_epoch", "time_or_epoch", "a body that follows an ephemeris: draw the "
        "osculating conic of this time", "the displayed time"),
    SHOW,
    SWEEP,
    FLIGHT,
))

CAMERA = Key("camera", "table", "how the scene is looked at", keys=(
    Key("projection", "choice", "the projection", "orthographic",
        ("orthographic", "perspective")),
    Key("look", "choice", "direction: top (+Z), edge (-Y) or angles (elevation, azimuth)",
        "top, or angles when elevation or azimuth is given", ("top", "edge", "angles")),
    Key("elevation", "angle", "eye direction above the reference plane, -90 to 90 deg",
        "90 deg"),
    Key("azimuth", "angle", "eye direction from +X toward +Y", "0 deg"),
    Key("target", "target", "what the camera looks at", "center"),
    Key("width", "length", "orthographic: the full image width spans this",
        "fits every orbit"),
    Key("distance", "length", "perspective, dome and panorama: eye distance from the target",
        "fits every orbit"),
    Key("fov", "angle", "perspective: vertical field of view, above 0 and below 180 deg",
        "45 deg"),
    Key("dome_distance", "length", "dome and panorama: eye distance from the target",
        "distance"),
    Key("dome_elevation", "angle", "dome: the target's elevation above the audience's "
        "horizon, straight ahead at the front, 0 to 90 deg", "90 deg (the zenith)"),
    Key("dome_tilt", "angle", "dome: the dome's tilt toward the front, 0 to 45 deg",
        "0 deg"),
))

DOME = Key("dome", "table", "sizes on dome masters and panoramas, as angles on the sky",
           keys=(
    Key("line_width", "angle", "width of a line of line_width 2 (every line and marker "
        "scales with it), above 0 and at most 5 deg", "0.3 deg"),
    Key("label_size", "angle", "text height of labels, above 0 and at most 20 deg",
        "2.5 deg"),
    Key("caption_size", "angle", "text height of a caption of size 30 (others in "
        "proportion), above 0 and at most 20 deg", "4 deg"),
    Key("line_scale", "number", "multiplies every line width and marker, 0.1 to 10", "1"),
    Key("label_scale", "number", "multiplies every label and caption, 0.1 to 10", "1"),
    Key("grid", "bool", "the dome grid: elevation rings, azimuth spokes, labelled, the "
        "front marked", "false"),
))

RENDER = Key("render", "table", "image settings", keys=(
    Key("size", "size", "image size in pixels, 16 to 16384 each", "[1920, 1080]"),
    Key("background", "color", "background colour", "#000000"),
    Key("stars", "bool", "a procedural, deterministic starfield", "true"),
    Key("grid", "bool", "the reference-plane grid", "false"),
    Key("labels", "bool", "all labels", "true"),
))

#: Ways a keyframed value moves from one key to the next.
EASES = ("in-out", "linear", "in", "out")
#: The marks of a body whose opacity a fade can change.
FADE_MARKS = ("all", *MARK_NAMES)
CAPTION_POSITIONS = ("bottom", "top", "center", "bottom-left", "bottom-right", "top-left",
                     "top-right")

CAMERA_KEY = Key("camera", "tables", "camera keyframes: at a time of the show, the camera "
                 "keys that change there; values ease from one keyframe to the next", keys=(
    Key("at", "show_time", "the time into the show of this keyframe", required=True),
    Key("ease", "choice", "how values move from the previous keyframe to this one",
        "in-out", EASES),
    Key("path", "choice", "eased: the camera comes to rest at this keyframe; smooth: it "
        "passes through it without stopping, on a curve through the neighbouring keyframes",
        "eased", CAMERA_PATHS),
    *(k for k in CAMERA.keys),
))

PACE = Key("pace", "tables", "time-rate keys: the show's pace (scene time per second of "
           "show) changes along the show, eased from one key to the next", keys=(
    Key("at", "show_time", "the time into the show where the pace is this key's rate",
        required=True),
    Key("rate", "rate", "scene time per second of show here: nonzero, of the sign of the "
        "timeline's rate", required=True),
    Key("ease", "choice", "how the rate moves from the one before (the timeline's rate at "
        "0 s, before the first key) to this one", "in-out", EASES),
))

FADE = Key("fade", "tables", "the opacity of a body's marks over the show", keys=(
    Key("body", "name", 'the body\'s name, or "*" for every body', required=True),
    Key("mark", "choice", "which marks fade", "all", FADE_MARKS),
    Key("at", "show_times", "times into the show, increasing", required=True),
    Key("opacity", "opacities", "the opacity at each time (0 hidden, 1 as drawn)",
        required=True),
    Key("ease", "choice", "how the opacity moves between the times", "in-out", EASES),
))

CAPTION = Key("caption", "tables", "text on the picture for part of the show", keys=(
    Key("text", "name", "the caption's text", required=True),
    Key("start", "show_time", "when it appears", "0 s"),
    Key("end", "show_time", "when it is gone", "the end of the show"),
    Key("fade", "show_time", "fade-in and fade-out time", "0.5 s"),
    Key("position", "choice", "where on the picture", "bottom", CAPTION_POSITIONS),
    Key("size", "number", "text height in pixels at 1080 px image height", "30"),
    Key("color", "color", "the text's colour", "#f2f2f2"),
))

TIMELINE = Key("timeline", "table", "scene time of the show", keys=(
    Key("start", "time_or_epoch", "scene time of frame 0", "0 d"),
    Key("rate", "rate", "scene time per second of show (negative runs backwards)",
        "5 d/s"),
    Key("fps", "number", "frames per second of show, above 0 and at most 1000", "30"),
    Key("duration", "time", "length of the show (bare number: seconds)", "20 s"),
    Key("clock", "choice", "an on-screen clock: the scene date, or days since the start",
        "none", ("none", "date", "elapsed")),
    CAMERA_KEY,
    PACE,
    FADE,
    CAPTION,
))

GENERATE = Key("generate", "table", "a deterministic random belt instead of a table file",
               keys=(
    Key("count", "int", "number of bodies (1 to 5,000,000)", required=True),
    Key("seed", "int", "seed of the random stream (0 to 2**63 - 1)", "0"),
    Key("a", "length_range", "semi-major axes, uniform in [low, high]", required=True),
    Key("e", "number_range", "eccentricities, uniform in [low, high]", "[0, 0]"),
    Key("i", "angle_range", "inclinations, uniform in [low, high]", '["0 deg", "0 deg"]'),
))

POPULATION = Key("population", "tables", "many small bodies from a table file, as points",
                 keys=(
    Key("name", "name", "the population's name", required=True),
    Key("table", "path", "a .csv or .npy file of elements, one body per row",
        "table or generate is required"),
    Key("columns", "columns", ".npy tables: the meaning of each column",
        '["a", "e", "i", "raan", "argp", "M"]'),
    UNITS,
    GENERATE,
    Key("epoch", "epoch", "the epoch of the elements", "the scene epoch"),
    Key("color", "color", "colour of the points", "#b0b0b0"),
    Key("point_size", "number", "point diameter in pixels at 1080 px image height", "1.5"),
))

TOP = Key("", "table", "a scene file", keys=(
    SCENE, CENTER, BODY, CAMERA, RENDER, TIMELINE, POPULATION, DOME,
))

#: Names people write for a key of the format, and the key they mean (for hints).
ALIASES: dict[str, str] = {
    "sma": "a", "semi_major_axis": "a", "semimajor_axis": "a", "semimajor": "a",
    "ecc": "e", "eccentricity": "e", "inc": "i", "incl": "i", "inclination": "i",
    "omega": "argp", "w": "argp", "arg_periapsis": "argp", "argument_of_periapsis": "argp",
    "aop": "argp", "Omega": "raan", "node": "raan", "lan": "raan",
    "longitude_of_node": "raan", "ta": "nu", "true_anomaly": "nu", "f": "nu",
    "theta": "nu", "ma": "M", "mean_anomaly": "M", "m": "M", "time_of_periapsis": "tp",
    "perigee": "periapsis", "perihelion": "periapsis", "pericenter": "periapsis",
    "periapse": "periapsis", "rp": "periapsis", "q": "periapsis", "apogee": "apoapsis",
    "aphelion": "apoapsis", "apocenter": "apoapsis", "apoapse": "apoapsis",
    "ra": "apoapsis", "Q": "apoapsis", "T": "period", "orbital_period": "period",
    "mu": "gm", "GM": "gm", "colour": "color", "bodies": "body", "planet": "body",
    "planets": "body", "centre": "center", "central_body": "center",
    "populations": "population", "name_": "name", "linewidth": "line_width",
    "width_px": "line_width", "background_color": "background", "frame_rate": "fps",
    "speed": "rate", "fov_deg": "fov", "eye_distance": "distance",
}

"""Large populations (asteroid belts, debris): element tables read in one vectorised pass.

A population is one ``[[population]]`` table of the scene with either

* ``table = "belt.csv"`` -- a CSV file with a header row of column names, optionally with
  a unit in brackets (``a [au], e, i [deg], raan [deg], argp [deg], M [deg]``), ``#``
  comment lines allowed; or a ``.npy`` file of a 2-D float array whose columns are named by
  the scene key ``columns``; or
* ``generate = { count, seed, a, e, i }`` -- a deterministic random belt, so that a
  100,000-body scene needs no 4.8 MB file in git. The stream is PCG64 raw 64-bit words
  turned into doubles by hand (the top 53 bits), which is fixed by the algorithm, not by
  the numpy version's sampling code.

Every row is validated; each problem names the file and the row's line (CSV) or row
index (.npy). ``python -m viewer.scene.population`` writes a generated belt as a table.
"""

from __future__ import annotations

import argparse
import math
import os
import sys
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

import numpy as np
from numpy.typing import NDArray

from ..errors import UserInputError
from ..orbit import Elements, true_from_mean
from ..units import QuantityError, unit_factor
from .spec import POPULATION_COLUMNS

Floats = NDArray[np.float64]

#: Table files larger than this are refused before reading.
MAX_TABLE_BYTES = 256 * 1024 * 1024
#: At most this many bodies in one population.
MAX_ROWS = 5_000_000
#: At most this many row problems are listed; the rest are counted.
MAX_ROW_PROBLEMS = 20
#: The columns of a .npy table when the scene gives no ``columns`` key.
DEFAULT_COLUMNS = ("a", "e", "i", "raan", "argp", "M")

_DIMENSION = {"a": "length", "periapsis": "length", "e": "dimensionless", "i": "angle",
              "raan": "angle", "argp": "angle", "M": "angle", "nu": "angle"}


class TableError(Exception):
    """Problems with a table file: one line each, already naming the file and row."""

    def __init__(self, problems: list[str]) -> None:
        self.problems = problems
        super().__init__("; ".join(problems))


@dataclass(frozen=True)
class Columns:
    """Element columns in SI units and radians, shape (N,), and how to name a row."""

    values: dict[str, Floats]
    row_label: str  # "line" (CSV, 1-based file line) or "row" (.npy, 0-based index)
    row_numbers: NDArray[np.int64] | None = None  # CSV: file line of each data row

    def where(self, index: int) -> str:
        if self.row_numbers is not None:
            return f"line {int(self.row_numbers[index])}"
        return f"row {index}"


# --- reading tables ----------------------------------------------------------------


def _check_size(path: Path, label: str) -> None:
    try:
        size = path.stat().st_size
    except FileNotFoundError:
        raise TableError([f"{label}: no such file ({path})"]) from None
    except OSError as err:
        raise TableError([f"{label}: cannot read {path}: {err.strerror}"]) from None
    if not path.is_file():
        raise TableError([f"{label}: {path} is not a file"])
    if size > MAX_TABLE_BYTES:
        raise TableError([f"{label}: the file is {size / 2**20:.1f} MiB; a table may be at "
                          f"most {MAX_TABLE_BYTES // 2**20} MiB"])


def _unit_factors(names: Sequence[str], units: Sequence[str | None], label: str,
                  default_units: dict[str, str]) -> list[float]:
    factors, problems = [], []
    for name, unit in zip(names, units, strict=True):
        dim = _DIMENSION[name]
        if dim == "dimensionless":
            if unit:
                problems.append(f"{label}: column {name} is a bare number and takes no unit "
                                f"(got [{unit}])")
            factors.append(1.0)
            continue
        try:
            factors.append(unit_factor(unit or default_units[dim], dim))
        except QuantityError as err:
            problems.append(f"{label}: column {name}: {err}")
            factors.append(1.0)
    if problems:
        raise TableError(problems)
    return factors


def _check_names(names: Sequence[str], label: str) -> None:
    problems = []
    for n in names:
        if n not in POPULATION_COLUMNS:
            from .values import suggest

            problems.append(f"{label}: unknown column \"{n}\"{suggest(n, POPULATION_COLUMNS)}; "
                            f"allowed: {', '.join(POPULATION_COLUMNS)}")
    dupes = sorted({n for n in names if list(names).count(n) > 1})
    if dupes:
        problems.append(f"{label}: column {', '.join(dupes)} given twice")
    if problems:
        raise TableError(problems)


def read_csv(path: Path, label: str, default_units: dict[str, str]) -> Columns:
    """A CSV table: header of column names (units in brackets allowed), one body per row."""
    _check_size(path, label)
    raw = path.read_bytes()
    if b"\x00" in raw:
        raise TableError([f"{label}: not a text file (it holds zero bytes); a CSV table is "
                          "UTF-8 text"])
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as err:
        raise TableError([f"{label}: not UTF-8 text (byte {err.start})"]) from None
    lines = text.splitlines()
    header_at = next((k for k, ln in enumerate(lines)
                      if ln.strip() and not ln.lstrip().startswith("#")), None)
    if header_at is None:
        raise TableError([f"{label}: the file is empty; the first line must name the columns, "
                          f"e.g. \"a [au], e, i [deg], raan [deg], argp [deg], M [deg]\""])
    names, units = [], []
    for cell in lines[header_at].split(","):
        cell = cell.strip()
        unit = None
        if cell.endswith("]") and "[" in cell:
            cell, unit = cell[:-1].split("[", 1)
            cell, unit = cell.strip(), unit.strip()
        names.append(cell)
        units.append(unit)
    where = f"{label} line {header_at + 1}"
    _check_names(names, where)
    factors = _unit_factors(names, units, where, default_units)
    body = lines[header_at + 1:]
    numbers = np.array([k for k, ln in enumerate(body, start=header_at + 2)
                        if ln.strip() and not ln.lstrip().startswith("#")], dtype=np.int64)
    if numbers.size > MAX_ROWS:
        raise TableError([f"{label}: {numbers.size} rows; a population may have at most "
                          f"{MAX_ROWS}"])
    data = _parse_rows(body, numbers, len(names), label)
    return Columns(_scaled(data, names, factors), "line", numbers)


def _parse_rows(body: list[str], numbers: NDArray[np.int64], width: int,
                label: str) -> Floats:
    """Rows as floats: the fast C parser first, a cell-by-cell pass to name bad cells."""
    rows = [ln for ln in body if ln.strip() and not ln.lstrip().startswith("#")]
    if not rows:
        return np.empty((0, width))
    try:
        data = np.loadtxt(rows, delimiter=",", dtype=np.float64, ndmin=2)
        if data.shape[1] == width:
            return data
    except ValueError:
        pass
    problems: list[str] = []
    extra = 0
    for line_no, row in zip(numbers, rows, strict=True):
        cells = row.split(",")
        msg = None
        if len(cells) != width:
            msg = f"{len(cells)} cells, the header names {width}"
        else:
            for k, c in enumerate(cells):
                try:
                    float(c)
                except ValueError:
                    msg = f"cell {k + 1} {c.strip()!r} is not a number"
                    break
        if msg:
            if len(problems) < MAX_ROW_PROBLEMS:
                problems.append(f"{label} line {line_no}: {msg}")
            else:
                extra += 1
    if extra:
        problems.append(f"{label}: ... and {extra} more rows with problems")
    if not problems:  # loadtxt refused something float() takes; say so plainly
        problems.append(f"{label}: the rows could not be read as {width} numbers each")
    raise TableError(problems)


def read_npy(path: Path, label: str, columns: Sequence[str],
             default_units: dict[str, str]) -> Columns:
    """A .npy table: a 2-D float array (N, len(columns)) in the population's units."""
    _check_size(path, label)
    _check_names(columns, label)
    factors = _unit_factors(columns, [None] * len(columns), label, default_units)
    try:
        data = np.load(path, allow_pickle=False)
    except (ValueError, OSError, EOFError) as err:
        raise TableError([f"{label}: not a readable .npy array ({err})"]) from None
    if not isinstance(data, np.ndarray) or data.dtype.kind not in "fiu" or data.ndim != 2:
        shape = getattr(data, "shape", "?")
        dtype = getattr(data, "dtype", "?")
        raise TableError([f"{label}: expected a 2-D array of numbers with {len(columns)} "
                          f"columns ({', '.join(columns)}), got shape {shape} of {dtype}"])
    if data.shape[1] != len(columns):
        raise TableError([f"{label}: the array has {data.shape[1]} columns but columns names "
                          f"{len(columns)} ({', '.join(columns)})"])
    if data.shape[0] > MAX_ROWS:
        raise TableError([f"{label}: {data.shape[0]} rows; at most {MAX_ROWS}"])
    return Columns(_scaled(data.astype(np.float64, copy=False), columns, factors), "row")


def _scaled(data: Floats, names: Sequence[str], factors: Sequence[float]) -> dict[str, Floats]:
    """Columns times their unit factors; overflow becomes inf (caught by validation) and
    magnitudes below 1e-150 become 0, so no later product underflows."""
    out = {}
    with np.errstate(over="ignore", invalid="ignore", under="ignore"):
        for k, (n, f) in enumerate(zip(names, factors, strict=True)):
            col = data[:, k] * f
            out[n] = np.where(np.abs(col) < 1e-150, 0.0, col)
    return out


# --- a generated belt ------------------------------------------------------------


def uniform_stream(seed: int, count: int) -> Floats:
    """``count`` doubles in [0, 1) from PCG64(seed): top 53 bits of each raw 64-bit word.

    Fixed by PCG64 itself (numpy's bit generator, stable across versions), not by the
    version-dependent sampling methods of ``numpy.random.Generator``.
    """
    words = np.random.PCG64(seed).random_raw(count)
    return (words >> np.uint64(11)).astype(np.float64) * (1.0 / 9007199254740992.0)


def generate_belt(count: int, seed: int, a_m: tuple[float, float],
                  e: tuple[float, float] = (0.0, 0.0),
                  i_rad: tuple[float, float] = (0.0, 0.0)) -> Columns:
    """A deterministic belt: a, e, i uniform in their ranges; raan, argp, M uniform on 2 pi.

    The same (count, seed, ranges) give the same bodies on every machine.
    """
    u = uniform_stream(seed, 6 * count).reshape(count, 6)
    two_pi = 2.0 * math.pi
    values = {
        "a": a_m[0] + (a_m[1] - a_m[0]) * u[:, 0],
        "e": e[0] + (e[1] - e[0]) * u[:, 1],
        "i": i_rad[0] + (i_rad[1] - i_rad[0]) * u[:, 2],
        "raan": two_pi * u[:, 3],
        "argp": two_pi * u[:, 4],
        "M": two_pi * u[:, 5],
    }
    return Columns(values, "row")


# --- validation ----------------------------------------------------------------------


def to_elements(cols: Columns, mu: float, label: str) -> Elements:
    """Validated elliptic elements from the columns, vectorised; TableError naming rows.

    Size: ``a`` or ``periapsis`` (with e); anomaly: ``M`` or ``nu`` (default M = 0).
    Populations hold closed orbits: 0 <= e < 1, a > 0, 0 <= i <= 180 deg.
    """
    v = cols.values
    problems: list[str] = []
    for one, other in (("a", "periapsis"), ("M", "nu")):
        if one in v and other in v:
            problems.append(f"{label}: columns {one} and {other} both given; give one")
    if "a" not in v and "periapsis" not in v:
        problems.append(f"{label}: no size column; give a column a (or periapsis)")
    if "e" not in v and "periapsis" in v:
        problems.append(f"{label}: a periapsis column needs an e column")
    if problems:
        raise TableError(problems)
    n = next(iter(v.values())).size
    zeros = np.zeros(n)
    e = v.get("e", zeros)
    i = v.get("i", zeros)
    finite = np.ones(n, dtype=bool)
    for col in v.values():
        finite &= np.isfinite(col)
    checks: list[tuple[NDArray[np.bool_], str]] = [
        (~finite, "a value is NaN or infinite"),
        (finite & ((e < 0) | (e >= 1)), "e must satisfy 0 <= e < 1 (a population holds "
         "closed orbits; put open ones in [[body]] tables)"),
        (finite & ((i < 0) | (i > math.pi * (1 + 1e-12))), "i must be 0 to 180 deg"),
    ]
    size = v.get("a", v.get("periapsis", zeros))
    checks.append((finite & ((size < 1e-3) | (size > 1e21)),
                   "the size (a or periapsis) must be 1 mm to 1e21 m"))
    bad_any = np.zeros(n, dtype=bool)
    listed = 0
    for mask, msg in checks:
        for k in np.flatnonzero(mask & ~bad_any)[: MAX_ROW_PROBLEMS - listed]:
            problems.append(f"{label} {cols.where(int(k))}: {msg}{_row_text(v, int(k))}")
            listed += 1
        bad_any |= mask
    if problems:
        total = int(bad_any.sum())
        if total > listed:
            problems.append(f"{label}: ... and {total - listed} more rows with problems "
                            f"({total} in all)")
        raise TableError(problems)
    a = v["a"] if "a" in v else v["periapsis"] / (1.0 - e)
    two_pi = 2.0 * math.pi
    if "nu" in v:
        nu = np.mod(v["nu"], two_pi)
    else:
        nu = np.mod(np.asarray(true_from_mean(np.mod(v.get("M", zeros), two_pi), e)), two_pi)
    return Elements(a=a, e=e, i=np.clip(i, 0.0, math.pi), raan=np.mod(v.get("raan", zeros),
                    two_pi), argp=np.mod(v.get("argp", zeros), two_pi), nu=nu, mu=mu)


def _row_text(v: dict[str, Floats], k: int) -> str:
    return " (" + ", ".join(f"{n} = {float(c[k]):.6g}" for n, c in v.items()) + " in SI)"


# --- command line: write a generated belt as a table file -----------------------------


def write_table(cols: Columns, path: Path, units: dict[str, str]) -> None:
    """Write columns as .npy (float64, DEFAULT_COLUMNS order) or CSV with units in the header."""
    names = [n for n in DEFAULT_COLUMNS if n in cols.values]
    factors = [1.0 / unit_factor(units[_DIMENSION[n]], _DIMENSION[n])
               if _DIMENSION[n] != "dimensionless" else 1.0 for n in names]
    data = np.column_stack([cols.values[n] * f for n, f in zip(names, factors, strict=True)])
    tmp = path.with_name(f".{path.name}.{os.getpid()}.tmp")
    if path.suffix == ".npy":
        with open(tmp, "wb") as fh:
            np.save(fh, data)
    else:
        header = ", ".join(n if _DIMENSION[n] == "dimensionless"
                           else f"{n} [{units[_DIMENSION[n]]}]" for n in names)
        np.savetxt(tmp, data, delimiter=",", header=header, comments="", fmt="%.17g")
    os.replace(tmp, path)


def main(argv: Sequence[str] | None = None) -> int:
    p = argparse.ArgumentParser(
        prog="python -m viewer.scene.population",
        description="Write a generated belt (the scene key population.generate) as a .csv "
        "or .npy table, e.g. to edit it or load it elsewhere.",
        epilog='example: python -m viewer.scene.population --count 100000 --seed 2030 '
        '--a "2.1 au" "3.3 au" --e 0 0.25 --i "0 deg" "20 deg" -o belt.npy')
    p.add_argument("--count", type=int, required=True)
    p.add_argument("--seed", type=int, default=0)
    p.add_argument("--a", nargs=2, required=True, metavar=("LOW", "HIGH"))
    p.add_argument("--e", nargs=2, type=float, default=(0.0, 0.0), metavar=("LOW", "HIGH"))
    p.add_argument("--i", nargs=2, default=("0 deg", "0 deg"), metavar=("LOW", "HIGH"))
    p.add_argument("-o", "--output", type=Path, required=True, help="FILE.csv or FILE.npy")
    args = p.parse_args(argv)
    from ..units import parse_quantity

    try:
        if not 1 <= args.count <= MAX_ROWS:
            raise UserInputError("--count", f"allowed: 1 to {MAX_ROWS}")
        a = tuple(parse_quantity(x, "length", "au") for x in args.a)
        i = tuple(parse_quantity(x, "angle", "deg") for x in args.i)
        cols = generate_belt(args.count, args.seed, a, tuple(args.e), i)  # type: ignore[arg-type]
        write_table(cols, args.output, {"length": "au", "angle": "deg"})
    except (QuantityError, UserInputError) as err:
        sys.stderr.write(f"error: {err}\n")
        return 2
    print(f"wrote {args.count} bodies to {args.output}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())

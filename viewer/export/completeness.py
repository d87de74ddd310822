"""Is a show's folder complete? Which frames are missing or broken, as ranges to render again.

A frame counts as whole when its file (``frame_000040.png``, named as in
``viewer.export.frames``) is there and decodes completely: the same test ``--resume``
uses (``viewer.export.encode.image_is_complete``). Files are read on a few threads
(decoding releases the GIL). Works on any folder, however its frames were made: one
machine, a job array, GNU parallel or a Dask cluster.
"""

from __future__ import annotations

import concurrent.futures
from collections.abc import Iterable, Sequence
from pathlib import Path

from .encode import image_is_complete
from .frames import frame_path
from .progress import Progress


def missing_frames(folder: Path, frames: Iterable[int], fmt: str = "png",
                   threads: int = 4, progress: Progress | None = None) -> list[int]:
    """The frame numbers of ``frames`` whose files in ``folder`` are absent or not whole;
    ``progress`` (if given) advances once per frame checked."""
    numbers = list(frames)
    missing = []
    with concurrent.futures.ThreadPoolExecutor(max_workers=max(1, threads)) as pool:
        whole = pool.map(lambda k: image_is_complete(frame_path(folder, k, fmt)), numbers)
        for k, ok in zip(numbers, whole, strict=True):
            if not ok:
                missing.append(k)
            if progress is not None:
                progress.advance()
    return missing


def frame_ranges(numbers: Sequence[int]) -> list[range]:
    """Sorted frame numbers gathered into half-open runs: [3, 4, 5, 9] -> [3:6, 9:10]."""
    runs: list[range] = []
    for k in sorted(numbers):
        if runs and runs[-1].stop == k:
            runs[-1] = range(runs[-1].start, k + 1)
        else:
            runs.append(range(k, k + 1))
    return runs


def ranges_text(runs: Sequence[range]) -> str:
    """Runs written as ``--frames`` arguments: "40:45 120:121"."""
    return " ".join(f"{r.start}:{r.stop}" for r in runs)

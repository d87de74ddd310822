"""Rendering a show on a Dask cluster (``dask.distributed``; ``pip install 'perifocal[cluster]'``).

The client (``perifocal render ... --scheduler tcp://HOST:PORT``) cuts the show's frames
into chunks and submits one task per chunk. Each worker process keeps one headless GL
context and one loaded show in a worker plugin (``cluster_worker.RenderSlot``, held by
Dask's worker object), on a thread of its own, so every chunk after the first starts
drawing at once; the show is keyed by a hash of its settings (scene, size, dome or
panorama, alpha), and a new show replaces the old one.

What a chunk does with its frames (``Job.mode``):

* ``"write"``: encode and write each frame atomically into the output folder, which is
  shared storage seen by every worker under the same path (as on any render farm);
  ``--resume`` is checked by the workers, on that storage.
* ``"encoded"``: send the encoded files back; the client writes them (a cluster with no
  shared storage).
* ``"pixels"``: send the RGBA frames back; the client pipes them, in order, into the
  one H.264 encoder (``-o show.mp4``).

A frame is a pure function of the show and its number, so the frames are the same bytes
as a single-machine render. A worker that dies costs only the chunk it was drawing: the
scheduler gives that chunk to another worker (frames already written are whole, and a
rewrite gives the same bytes). At most a window of chunks is in flight, so frames
waiting for the video encoder do not pile up in memory.

Before any frame, every worker is asked for its Perifocal version and whether it has
OpenGL, and (for ``"write"``) whether it can write the output folder; a cluster that
fails gets one clear line. After a ``"write"`` run the workers check the folder: every
frame of the run must be there and whole.
"""

from __future__ import annotations

import contextlib
import hashlib
import os
import pickle
import re
import tempfile
import uuid
from collections.abc import Generator, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, TextIO

from .. import __version__
from ..errors import UserInputError
from ..fileio import atomic_write_bytes, describe_os_error
from .completeness import frame_ranges, missing_frames, ranges_text
from .frames import SequenceResult, frame_path, prepare_folder, record_settings, render_video
from .progress import Progress

#: Frames per task unless --chunk says otherwise: small enough that a lost worker costs
#: little and the progress bar moves, large enough that scheduling is a small overhead.
DEFAULT_CHUNK = 8
PLUGIN_NAME = "perifocal-render"
ADDRESS_ENV = "DASK_SCHEDULER_ADDRESS"
_ADDRESS = re.compile(r"^(?:(tcp|tls)://)?(\[[0-9a-fA-F:]+\]|[A-Za-z0-9_.-]+):(\d{1,5})$")
_INSTALL = "install it with: pip install 'perifocal[cluster]'"


@dataclass(frozen=True)
class Show:
    """What every frame depends on: sent once to each worker, keyed by its hash."""

    scene: Any
    size_px: tuple[int, int]
    spec: Any = None
    transparent: bool = False

    def key(self) -> str:
        return hashlib.sha256(pickle.dumps(self, protocol=5)).hexdigest()


@dataclass(frozen=True)
class Job:
    """What a chunk does with its frames: see the module docstring for the modes."""

    mode: str
    fmt: str = "png"
    folder: str | None = None
    resume: bool = False
    options: dict[str, Any] = field(default_factory=dict)


def scheduler_address(flag: str | None, environ: dict[str, str] | None = None) -> str | None:
    """The scheduler to use: ``--scheduler``, else Dask's ``DASK_SCHEDULER_ADDRESS``."""
    env = os.environ if environ is None else environ
    text = flag if flag is not None else env.get(ADDRESS_ENV) or None
    if text is None:
        return None
    m = _ADDRESS.match(text.strip())
    where = "--scheduler" if flag is not None else ADDRESS_ENV
    if not m or not 1 <= int(m.group(3)) <= 65535:
        raise UserInputError(where, f"{text!r} is not a scheduler address; write "
                             "tcp://HOST:PORT (e.g. tcp://10.0.0.5:8786)")
    return f"{m.group(1) or 'tcp'}://{m.group(2)}:{m.group(3)}"


def check_chunk(chunk: int) -> int:
    if chunk < 1:
        raise UserInputError("--chunk", f"{chunk} frames per task: give 1 or more "
                             f"(default {DEFAULT_CHUNK})")
    return chunk


def _import_distributed() -> Any:
    try:
        import distributed
    except ImportError:
        raise UserInputError("--scheduler", f"rendering on a cluster needs Dask's "
                             f"distributed package; {_INSTALL}") from None
    return distributed


def software() -> str:
    """The versions that decide a frame's bytes besides the scene: Perifocal's, and its
    PNG compressor's (another isal version may write other, equally valid, bytes)."""
    from importlib.metadata import PackageNotFoundError, version

    try:
        isal = version("isal")
    except PackageNotFoundError:
        isal = "missing"
    return f"Perifocal {__version__}, isal {isal}"


def _worker_version() -> str:
    return software()


def _probe_folder(folder: str) -> str | None:
    """Run on each worker: can it create ``folder`` and write a file in it?"""
    try:
        Path(folder).mkdir(parents=True, exist_ok=True)
        with tempfile.NamedTemporaryFile(dir=folder, prefix=".perifocal-probe-"):
            pass
    except OSError as err:
        return describe_os_error(err)
    return None


def check_chunk_files(folder: str, frames: Sequence[int], fmt: str) -> list[int]:
    """A task: the frames of ``frames`` that are missing or broken in ``folder``.

    A whole frame's leftover temporary files (a worker killed while writing it leaves
    one; the frame was written again elsewhere) are removed.
    """
    missing = missing_frames(Path(folder), frames, fmt, threads=2)
    lost = set(missing)
    for k in frames:
        if k not in lost:
            name = frame_path(Path(folder), k, fmt).name
            for tmp in Path(folder).glob(f".{name}.*.tmp"):
                with contextlib.suppress(OSError):
                    tmp.unlink()
    return missing


def connect(address: str) -> Any:
    """A Client on ``address`` with at least one worker; one clear line if not.

    The wait is Dask's own connect timeout (``distributed.comm.timeouts.connect``).
    """
    distributed = _import_distributed()
    import dask

    timeout = dask.config.get("distributed.comm.timeouts.connect")
    try:
        client = distributed.Client(address, timeout=timeout, set_as_default=False)
    except (OSError, TimeoutError) as err:
        reason = str(err).splitlines()[0] if str(err) else type(err).__name__
        raise UserInputError("--scheduler", f"cannot reach a Dask scheduler at {address} "
                             f"({reason}); start one with 'dask scheduler' or check the "
                             "address") from None
    try:
        client.wait_for_workers(1, timeout=timeout)
    except (OSError, TimeoutError):
        client.close()
        raise UserInputError("--scheduler", f"the scheduler at {address} has no workers; "
                             f"start some with 'dask worker {address}'") from None
    return client


def _refuse(problems: dict[str, Any], what: str) -> None:
    bad = {w: p for w, p in problems.items() if p is not None}
    if bad:
        lines = [f"worker {w}: {p}" for w, p in sorted(bad.items())]
        raise UserInputError("--scheduler", [f"{len(bad)} of {len(problems)} workers "
                                             f"{what}"] + lines)


def prepare_workers(client: Any, folder: str | None) -> int:
    """Check versions, load the render slot, check GL and (if given) the output folder
    on every worker; returns the cluster's thread count."""
    try:
        versions = client.run(_worker_version, on_error="return")
    except Exception as err:  # a worker that cannot even load Perifocal's functions
        raise UserInputError("--scheduler", f"a worker cannot run Perifocal "
                             f"({type(err).__name__}: {err}); install perifocal on every "
                             "worker") from None
    mine = software()
    _refuse({w: (f"cannot run Perifocal ({v})" if isinstance(v, BaseException) else
                 None if v == mine else
                 f"has {v}, this client {mine}; install the same versions everywhere")
             for w, v in versions.items()}, "cannot render this show")
    from . import cluster_worker

    client.register_plugin(cluster_worker.RenderSlot(mine), name=PLUGIN_NAME)
    _refuse(client.run(cluster_worker.slot_problem), "have no OpenGL")
    if folder is not None:
        _refuse(client.run(_probe_folder, folder), f"cannot write the output folder {folder}")
    info = client.scheduler_info(n_workers=-1)
    return sum(int(w.get("nthreads", 1)) for w in info["workers"].values())


def _chunks(frames: Sequence[int], chunk: int) -> list[list[int]]:
    numbers = list(frames)
    return [numbers[i:i + chunk] for i in range(0, len(numbers), chunk)]


def _result(future: Any, frames: Sequence[int]) -> Any:
    """A chunk's result; a chunk whose workers kept dying is one clear line."""
    from distributed import KilledWorker

    try:
        return future.result()
    except KilledWorker:
        raise UserInputError("--scheduler", f"frames {frames[0]}..{frames[-1]}: the "
                             "workers drawing them died again and again (see the worker "
                             "logs; often memory)") from None


def chunk_results(client: Any, show: Show, chunks: list[list[int]], job: Job,
                  window: int) -> Generator[tuple[list[int], list[Any]], None, None]:
    """Submit ``chunks`` (at most ``window`` in flight) and yield ``(frames, result)`` of
    each: in chunk order for pictures (``"pixels"``, for the video encoder), else as they
    arrive. Closing the iterator early cancels what is still in flight."""
    from distributed import as_completed

    from .cluster_worker import render_chunk

    key = show.key()
    token = uuid.uuid4().hex[:8]
    # A task, not scattered data: if every worker holding it dies, the scheduler makes it
    # again from the task itself.
    show_future = client.submit(_same, show, key=f"perifocal-show-{key[:10]}-{token}")
    ordered = job.mode == "pixels"
    queue = as_completed(loop=client.loop)
    index: dict[str, int] = {}
    finished: dict[int, Any] = {}
    live: dict[str, Any] = {}
    submitted = consumed = 0

    def top_up() -> None:
        nonlocal submitted
        while submitted < len(chunks) and submitted - consumed < window:
            frames = chunks[submitted]
            f = client.submit(render_chunk, show_future, key, frames, job, pure=False,
                              key=f"perifocal-frames-{key[:10]}-{token}-{frames[0]}")
            index[f.key] = submitted
            live[f.key] = f
            queue.add(f)
            submitted += 1

    def take(i: int, f: Any) -> tuple[list[int], list[Any]]:
        nonlocal consumed
        result = _result(f, chunks[i])
        live.pop(f.key, None)
        f.release()
        consumed += 1
        return chunks[i], result

    try:
        top_up()
        for future in queue:
            i = index[future.key]
            if not ordered:
                yield take(i, future)
            else:
                finished[i] = future
                while consumed in finished:
                    yield take(consumed, finished.pop(consumed))
            top_up()
    except BaseException:
        client.cancel(list(live.values()))
        raise
    finally:
        show_future.release()


def _same(value: Any) -> Any:
    return value


def render_on_cluster(address: str, show: Show, frames: range, out: Path, kind: str,
                      fmt: str = "png", resume: bool = False, chunk: int = DEFAULT_CHUNK,
                      return_frames: bool = False, fps: float = 30.0,
                      quality: str = "preview", stream: TextIO | None = None,
                      settings: dict[str, Any] | None = None,
                      **options: Any) -> SequenceResult:
    """Render ``frames`` of ``show`` on the cluster at ``address`` into ``out`` (a folder
    for ``kind`` "sequence", an .mp4 for "video"). See the module docstring. A sequence's
    ``settings`` are recorded in its folder as a render on one machine records them (by
    this machine, or with shared storage by a worker), once the workers are checked."""
    check_chunk(chunk)
    client = connect(address)
    try:
        write_here = kind == "video" or return_frames
        threads = prepare_workers(client, None if write_here else str(out))
        window = max(4, 2 * threads)
        if kind == "video":
            return _video(client, show, frames, out, chunk, window, fps, quality, stream)
        if write_here:
            prepare_folder(out)
        if settings is not None:
            if write_here:
                record_settings(out, settings, resume)
            else:
                _result(client.submit(record_settings, out, settings, resume, pure=False),
                        list(frames))
        todo = list(frames)
        skipped = 0
        if resume and write_here:
            missing = set(missing_frames(out, todo, fmt))
            skipped = len(todo) - len(missing)
            todo = [k for k in todo if k in missing]
        progress = Progress(len(frames), "frames", stream)
        if skipped:
            progress.advance(skipped, skipped=True)
        job = Job("encoded" if write_here else "write", fmt, None if write_here else str(out),
                  resume and not write_here, options)

        for _numbers, result in chunk_results(client, show, _chunks(todo, chunk), job,
                                              window):
            for k, value in result:  # None: skipped as whole; bytes: a file to write here
                if isinstance(value, bytes):
                    try:
                        atomic_write_bytes(frame_path(out, k, fmt), value)
                    except OSError as err:
                        raise UserInputError(str(out), f"writing frames failed: "
                                             f"{describe_os_error(err)}") from None
                progress.advance(skipped=value is None)
        summary = progress.finish(str(out))
        _check_folder(client, out, frames, fmt, chunk, write_here)
        return SequenceResult(progress.done - progress.skipped, progress.skipped, summary)
    finally:
        client.close()


def _check_folder(client: Any, out: Path, frames: range, fmt: str, chunk: int,
                  here: bool) -> None:
    """Every frame of the run must now be whole in ``out`` (checked by the workers when
    they wrote it, so a folder that is not really shared is caught)."""
    if here:
        missing = missing_frames(out, frames, fmt)
    else:
        parts = [client.submit(check_chunk_files, str(out), c, fmt, pure=False)
                 for c in _chunks(frames, max(chunk, 16))]
        missing = [k for part in client.gather(parts) for k in part]
    if missing:
        raise UserInputError(str(out), f"{len(missing)} frames are missing or broken after "
                             f"the run (is the folder shared by every worker?): "
                             f"{ranges_text(frame_ranges(missing))}")


def _video(client: Any, show: Show, frames: range, out: Path, chunk: int, window: int,
           fps: float, quality: str, stream: TextIO | None) -> SequenceResult:
    """The client encodes the frames into one MP4, in order, as the chunks arrive."""
    results = chunk_results(client, show, _chunks(frames, chunk), Job("pixels"), window)
    pictures = ((k, rgba) for _numbers, result in results for k, rgba in result)

    def picture(k: int) -> Any:
        got, rgba = next(pictures)
        assert got == k, (got, k)
        return rgba

    try:
        return render_video(frames, picture, out, show.size_px, fps, quality, stream)
    finally:
        results.close()

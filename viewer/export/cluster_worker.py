"""The worker side of a cluster render (viewer.export.cluster): the render slot each
worker process keeps, and the task that draws a chunk of frames.

Imports Dask's distributed package, so only the cluster code imports this module, and
only once a cluster is asked for.
"""

from __future__ import annotations

import socket
from collections.abc import Sequence
from concurrent.futures import Future, ThreadPoolExecutor
from pathlib import Path
from typing import Any

from distributed import WorkerPlugin, get_worker

from ..errors import UserInputError
from ..fileio import atomic_write_bytes, describe_os_error
from .cluster import PLUGIN_NAME, Job, Show, software
from .encode import encode_still, image_is_complete
from .frames import frame_path


class RenderSlot(WorkerPlugin):
    """A worker's renderer: one GL context and one show, on one thread of their own.

    Registered with the client's Perifocal version; a worker with another version, or
    with no OpenGL, keeps the reason in ``problem`` and refuses every chunk with it.
    """

    def __init__(self, version: str) -> None:
        self.version = version
        self.problem: str | None = None

    def setup(self, worker: Any = None) -> None:
        self._thread = ThreadPoolExecutor(max_workers=1, thread_name_prefix="perifocal-gl")
        self._key: str | None = None
        self._show: Any = None
        self._renderer: Any = None
        self._ctx: Any = None
        if self.version != software():
            self.problem = (f"this worker has {software()}, the client {self.version}; "
                            "install the same versions everywhere")
            return
        self.problem = self._thread.submit(self._open).result()

    def _open(self) -> str | None:
        from ..render.context import headless_context
        from ..render.renderer import Renderer

        try:
            self._ctx = headless_context()
        except UserInputError as err:
            return "; ".join(err.problems)
        self._renderer = Renderer(self._ctx)
        return None

    def frame(self, show_key: str, show: Show, k: int) -> Future[Any]:
        """Frame ``k`` of ``show``, drawn on the slot's thread."""
        return self._thread.submit(self._frame, show_key, show, k)

    def _frame(self, show_key: str, show: Show, k: int) -> Any:
        if self.problem is not None:
            raise UserInputError(f"worker {socket.gethostname()}", self.problem)
        if show_key != self._key:
            from .show import ShowFrames

            self._close_show()
            self._show = ShowFrames(self._renderer, show.scene, show.size_px, show.spec,
                                    show.transparent)
            self._key = show_key
        return self._show.frame(k)

    def _close_show(self) -> None:
        if self._show is not None:
            self._show.close()
        self._show, self._key = None, None

    def _close(self) -> None:
        self._close_show()
        if self._renderer is not None:
            self._renderer.release()
        if self._ctx is not None:
            from ..render.context import release_context

            release_context(self._ctx)

    def teardown(self, worker: Any = None) -> None:
        self._thread.submit(self._close).result()
        self._thread.shutdown(wait=True)


def slot_problem(dask_worker: Any) -> str | None:
    """Run on each worker: why it cannot render, or None."""
    slot = dask_worker.plugins.get(PLUGIN_NAME)
    return "the Perifocal worker plugin is not loaded" if slot is None else slot.problem


def render_chunk(show: Show, show_key: str, frames: Sequence[int], job: Job) -> list[Any]:
    """A task: draw ``frames`` of ``show`` on this worker's slot and do ``job`` with them.

    Returns, per frame: ``(k, None)`` skipped as already whole (``"write"`` with resume),
    ``(k, nbytes)`` written, ``(k, bytes)`` encoded file, or ``(k, rgba)`` pixels.
    """
    slot: RenderSlot = get_worker().plugins[PLUGIN_NAME]  # type: ignore[assignment]
    folder = Path(job.folder) if job.folder is not None else None
    out: list[Any] = []
    todo = list(frames)
    if job.mode == "write" and job.resume:
        assert folder is not None
        out = [(k, None) for k in todo if image_is_complete(frame_path(folder, k, job.fmt))]
        done = {k for k, _ in out}
        todo = [k for k in todo if k not in done]
    pending = slot.frame(show_key, show, todo[0]) if todo else None
    for i, k in enumerate(todo):
        assert pending is not None
        rgba = pending.result()
        if i + 1 < len(todo):  # draw the next frame while this one is encoded
            pending = slot.frame(show_key, show, todo[i + 1])
        if job.mode == "pixels":
            out.append((k, rgba))
            continue
        data = encode_still(rgba, job.fmt, **job.options)
        if job.mode == "encoded":
            out.append((k, data))
            continue
        assert folder is not None
        path = frame_path(folder, k, job.fmt)
        try:
            atomic_write_bytes(path, data)
        except OSError as err:
            raise UserInputError(str(path), f"worker {socket.gethostname()} cannot write "
                                 f"the frame: {describe_os_error(err)}") from None
        out.append((k, len(data)))
    return out

"""What one window shows and is doing: the editor, the clock, the camera, the open
dialogs and prompts, a running render job. Plain Python: no imgui (the panels read and
call it; the window owns it).

The flows a user walks through live here, so they are tested without a window:

* quit or open another scene with unsaved changes: the unsaved-changes prompt comes
  first (save, discard, keep editing), then the action;
* open a scene, or save it as another file: a path typed, or picked in our own file
  chooser (``files.FileChooser``: one folder's sub-folders and scene files) or from the
  recent files (saved per user, ``settings``); the loader's or the writer's problems are
  shown in the dialog, one line each, and the current scene is kept;
* a still of the current view (PNG, JPEG, SVG) and a render job of the timeline (a frame
  folder or an .mp4) through ``jobs``;
* the show: the window follows the show's camera while it plays (the view is the show
  camera at the show time); a camera move of the user's stops following until the show
  plays or is sought again; "Key the camera here" stores the view as a camera key at the
  frame shown; show edits (``timeline_edits``) go through the editor's history; a new
  show from nothing takes its first camera key from the view.
"""

from __future__ import annotations

import os
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from ..errors import UserInputError
from .clock import Clock
from .editor import Editor
from .files import Entry, FileChooser, folder_of
from .jobs import RenderJob, export_still, job_request, still_request
from .timeline_edits import TimelineRefused

__all__ = ["Session"]

#: While time plays, the panels' time readouts (the Numbers panel, the Time panel's date
#: and slider) move on at most this many times a second, as instrument readouts do
#: (common practice, no source): digits that change at the frame rate cannot be read,
#: and a panel that stays the same need not be drawn again (ViewerWindow, on a screen
#: that keeps its pixels).
#: The picture, its captions and its clock move every frame. Paused, the readouts follow
#: the clock at once.
READOUT_HZ = 10.0


@dataclass
class Session:
    """What the window shows: the editor, the clock, the camera and the open dialogs.

    ``renderer`` is the window's ``viewer.render.Renderer`` (stills are drawn with it);
    ``job`` the render job running or last run.
    """

    editor: Editor
    clock: Clock
    camera: Any
    show_help: bool = False
    show_plots: bool = False
    #: The launch-season window (pork-chop plot; it takes the plots' place).
    show_season: bool = False
    #: Presentation: every panel hidden, the picture fills the window.
    presenting: bool = False
    fullscreen: bool = False
    #: Panel text, labels and markers scale together (``--ui-scale``, saved per user).
    ui_scale: float = 1.0
    #: View-wide switches over the scene's own settings (labels, grid, stars, foci,
    #: sectors, axes): None follows the scene; they never mark the file changed.
    overlays: dict[str, bool] = field(default_factory=dict)
    #: Set by the "fit" action: the window frames the whole scene on its next frame.
    fit_wanted: bool = False
    #: What the picture shows: "flat", or the "dome" master or "panorama" as exported.
    view_mode: str = "flat"
    message: str = ""
    quit_now: bool = False
    #: While the unsaved-changes prompt is up: what follows it ("quit" or "open").
    unsaved_for: str = ""
    save_as_prompt: bool = False
    save_as_text: str = ""
    save_as_errors: list[str] = field(default_factory=list)
    open_prompt: bool = False
    open_text: str = ""
    open_errors: list[str] = field(default_factory=list)
    #: The folder shown by the open or save-as dialog's file chooser.
    chooser: FileChooser | None = None
    #: Scene files opened or saved, newest first; kept in ``settings_file`` (the user's
    #: settings, ``settings.settings_path()``) when it is given, else for this window only.
    recent: list[str] = field(default_factory=list)
    settings_file: Path | None = None
    still_prompt: bool = False
    still_text: str = ""
    still_size: str = ""
    still_errors: list[str] = field(default_factory=list)
    job_prompt: bool = False
    job_text: str = ""
    job_size: str = ""
    job_frames: str = ""
    job_format: str = "png"
    job_quality: str = "preview"
    job_window_camera: bool = True
    job_errors: list[str] = field(default_factory=list)
    job_view: str = "flat"
    #: The show time range to render, in seconds of show ("" for the whole show).
    job_from: str = ""
    job_to: str = ""
    job: RenderJob | None = None
    renderer: Any = None
    #: The timeline panel (docked along the bottom, above Time).
    show_timeline: bool = False
    #: True while the view is the show's camera (it follows the show as it plays).
    follow_camera: bool = True
    #: What the timeline panel has selected: ("camera", key), ("fade", fade, point),
    #: ("caption", caption) or None.
    picked: tuple[Any, ...] | None = None
    new_show_prompt: bool = False
    new_show_duration: str = "30 s"
    new_show_rate: str = ""
    new_show_fps: str = "30"
    new_show_clock: str = "date"
    new_show_errors: list[str] = field(default_factory=list)
    _show_camera: Any = None
    _show_for: tuple[Any, ...] = ()
    _readout_wall_s: float = float("-inf")
    _readout_at: float | None = None
    _readout_kept: tuple[Any, ...] | None = None
    _texts: dict[str, tuple[tuple[object, ...], str]] = field(default_factory=dict)

    @property
    def quit_prompt(self) -> bool:
        """True while the unsaved-changes prompt asks before quitting."""
        return self.unsaved_for == "quit"

    @property
    def any_dialog(self) -> bool:
        """True while a modal prompt or dialog takes the keyboard."""
        return bool(self.unsaved_for or self.save_as_prompt or self.open_prompt
                    or self.still_prompt or self.job_prompt or self.new_show_prompt)

    @property
    def readout_t_s(self) -> float:
        """Scene time (s) the panels' readouts show: the clock's while paused (or before
        the window's first ``update_readout``), else the time taken at the last update."""
        if self._readout_at is None or not self.clock.playing:
            return self.clock.t_s
        return self._readout_at

    def update_readout(self, wall_s: float) -> None:
        """Called by the window at the start of each frame: while playing, the readout
        time moves to the clock's once 1 / READOUT_HZ s of wall time (``wall_s``, a
        monotonic clock) have passed since it last moved."""
        if not self.clock.playing or wall_s - self._readout_wall_s >= 1.0 / READOUT_HZ:
            self._readout_at = self.clock.t_s
            self._readout_wall_s = wall_s

    def kept_text(self, name: str, key: tuple[object, ...], make: Callable[[], str]) -> str:
        """``make()``, made again only when ``key`` changes (one text kept per ``name``):
        the dates the panels show every frame, formatted once per readout."""
        kept = self._texts.get(name)
        if kept is None or kept[0] != key:
            kept = self._texts[name] = (key, make())
        return kept[1]

    def readout(self, index: int) -> Any:
        """``body_readout`` of body ``index`` at the readout time, made again only when the
        scene (an edit makes a new one), the body or the readout time changes."""
        from .readout import body_readout

        scene, t_s = self.editor.scene, self.readout_t_s
        kept = self._readout_kept
        if kept is None or kept[0] is not scene or kept[1:3] != (index, t_s):
            kept = self._readout_kept = (scene, index, t_s, body_readout(scene, index, t_s))
        return kept[3]

    # --- quitting, saving -------------------------------------------------------------------

    def request_quit(self) -> None:
        """Quit, asking first if there are unsaved changes. A running render job is
        cancelled (its finished frames stay; a video's temporary file is removed)."""
        if self.editor.dirty:
            self.unsaved_for = "quit"
        else:
            self.quit_now = True

    def save(self) -> None:
        try:
            path = self.editor.save()
            self.message = f"saved {path}"
            self.remember(path)
        except UserInputError as err:
            if self.editor.path is None:
                self.open_save_as()
            else:
                self.message = "not saved: " + "; ".join(err.problems)

    def open_save_as(self) -> None:
        self.save_as_prompt = True
        self.save_as_errors = []
        self.save_as_text = str(self.editor.path or Path.cwd() / "scene.toml")
        self.chooser = FileChooser(folder_of(self.save_as_text))

    def save_as(self, path_text: str | None = None) -> bool:
        """Save to ``path_text`` (default: what the dialog holds); the writer's problems
        stay in the dialog, one line each, and nothing is written."""
        text = (self.save_as_text if path_text is None else path_text).strip()
        if not text or text.endswith(("/", os.sep)) or Path(text).expanduser().is_dir():
            self.save_as_errors = ["give a file name ending in .toml, not a folder"]
            return False
        try:
            path = self.editor.save(Path(text).expanduser())
        except UserInputError as err:
            self.save_as_errors = _lines(err)
            return False
        self.message = f"saved {path}"
        self.save_as_prompt = False
        self.save_as_errors = []
        self.remember(path)
        return True

    def remember(self, path: Path) -> None:
        """Put a scene file first among the recent files (saved in ``settings_file``)."""
        if self.settings_file is not None:
            from .settings import add_recent

            self.recent = add_recent(path, self.settings_file)
        else:
            name = str(Path(path).absolute())
            self.recent = [name] + [p for p in self.recent if p != name]

    def choose(self, entry: Entry, dialog: str) -> None:
        """A click in the file chooser of ``dialog`` ("open" or "save_as"): a folder is
        shown (the path then names it, or the same file name in it); a file is named."""
        attr = f"{dialog}_text"
        if entry.folder:
            assert self.chooser is not None
            self.chooser.go(entry.path)
            name = Path(getattr(self, attr)).name if dialog == "save_as" else ""
            setattr(self, attr, str(entry.path / name) if name else str(entry.path) + os.sep)
        else:
            setattr(self, attr, str(entry.path))

    def chooser_up(self, dialog: str) -> None:
        """The chooser's "up" button: show the folder above."""
        assert self.chooser is not None
        self.chooser.up()
        self.choose(Entry(self.chooser.folder.name, self.chooser.folder, True), dialog)

    def unsaved_choice(self, choice: str) -> None:
        """The answer to the unsaved-changes prompt: "save" (then go on if it saved),
        "discard" (go on; nothing is lost until another scene is opened) or "cancel"."""
        action, self.unsaved_for = self.unsaved_for, ""
        if choice == "cancel" or not action:
            return
        if choice == "save":
            self.save()
            if self.editor.dirty:  # not saved (the message says why) or save-as opened
                return
        if action == "quit":
            self.quit_now = True
        elif action == "open":
            self.show_open()

    # --- opening another scene --------------------------------------------------------------

    def request_open(self) -> None:
        """Open another scene: the unsaved-changes prompt first, then the path dialog."""
        if self.editor.dirty:
            self.unsaved_for = "open"
        else:
            self.show_open()

    def show_open(self) -> None:
        self.open_prompt = True
        self.open_errors = []
        if not self.open_text:
            folder = self.editor.path.parent if self.editor.path else Path.cwd()
            self.open_text = str(folder) + os.sep
        self.chooser = FileChooser(folder_of(self.open_text))

    def open_scene(self, path_text: str | None = None) -> bool:
        """Load the scene at ``path_text`` (default: what the dialog holds) and show it.
        On a problem the dialog lists the loader's lines and the current scene stays."""
        text = (self.open_text if path_text is None else path_text).strip()
        if not text:
            self.open_errors = ["give the path of a .toml scene file"]
            return False
        try:
            editor = Editor.open(Path(text).expanduser())
        except UserInputError as err:
            self.open_errors = [f"{err.source}:"] + [f"  {p}" for p in err.problems]
            return False
        self.replace_editor(editor)
        self.open_prompt = False
        self.open_errors = []
        self.message = f"opened {editor.path}"
        if editor.path is not None:
            self.remember(editor.path)
        return True

    def replace_editor(self, editor: Editor) -> None:
        """Show another scene: its editor, a clock at its timeline start, its camera."""
        self.editor = editor
        self.clock = Clock.for_scene(editor.scene)
        self.camera = editor.scene.camera
        self.still_text = self.job_text = ""
        self.picked = None
        self.follow_camera = True

    # --- the show ---------------------------------------------------------------------------

    def sync_show(self) -> None:
        """Once a frame, before drawing: the clock follows the (maybe edited) timeline;
        on the show and following, the view is the show's camera at the frame shown. A
        camera the user moved since (not the one set here) stops the following."""
        from ..scene.timeline import camera_at

        scene = self.editor.scene
        self.clock.follow_show(scene.timeline)
        if self._show_camera is not None and self.camera is not self._show_camera:
            self.follow_camera = False
            self._show_camera = None
        if not (self.clock.on_show and self.follow_camera and scene.timeline.camera_keys):
            self._show_camera = None
            return
        at = (scene, self.clock.frame_show_s, self.clock.t_s)
        if self._show_camera is not None and self._show_for[0] is scene \
                and self._show_for[1:] == at[1:]:
            return  # the same frame of the same show: the same camera object (no redraw)
        try:
            cam = camera_at(scene, self.clock.frame_show_s, self.clock.t_s)
        except KeyError:  # a key follows a body that is gone: keep the view
            return
        self.camera = self._show_camera = cam
        self._show_for = at

    def seek_show(self, show_s: float) -> None:
        """Go to a time into the show; the view follows the show's camera again."""
        self.clock.seek_show(show_s)
        self.follow_camera = True

    def toggle_play(self) -> None:
        """Play or pause; playing the show, the view is the show's camera."""
        self.clock.toggle()
        if self.clock.playing and self.clock.on_show:
            self.follow_camera = True

    def edit_show(self, edit: Any, label: str, merge: bool = False) -> Any:
        """Apply ``edit(timeline)`` (a ``timeline_edits`` function returning a Timeline,
        or (Timeline, index)) through the editor's history; returns what it returned.
        TimelineRefused passes to the caller with nothing changed."""
        out = edit(self.editor.scene.timeline)
        tl = out[0] if isinstance(out, tuple) else out
        self.editor.edit_timeline(tl, label, merge)
        return out

    def try_edit_show(self, edit: Any, label: str, merge: bool = False) -> Any:
        """``edit_show`` for a button or key: a refusal goes to the message line."""
        try:
            return self.edit_show(edit, label, merge)
        except TimelineRefused as err:
            self.message = "refused: " + err.problems[0]
            return None

    def key_camera_here(self) -> None:
        """Store the view as a camera key at the frame shown (the key there, if there is
        one, takes the view instead)."""
        from ..scene.timeline import resolved_keys
        from .timeline_edits import add_camera_key, delete_camera_key, key_from_camera, tidy_view

        if not self.clock.on_show:
            self.clock.seek_show(self.clock.show_s)
        at = self.clock.frame_show_s
        scene = self.editor.scene
        keys = scene.timeline.camera_keys
        same = [i for i, k in enumerate(keys) if abs(k.at_s - at) < 1e-9]
        before = [c for t, _, c in resolved_keys(scene) if t < at - 1e-9]
        base = before[-1] if before else scene.camera
        ease = keys[same[0]].ease if same else "in-out"
        key = key_from_camera(tidy_view(self.camera, scene.length_unit), at, base, ease)

        def edit(tl: Any) -> Any:
            if same:
                tl = delete_camera_key(tl, same[0])
            return add_camera_key(tl, key)

        out = self.try_edit_show(edit, f"camera key at {at:g} s")
        if out is not None:
            self.picked = ("camera", out[1])
            self.follow_camera = True
            self.message = (f"camera key {out[1] + 1} at {at:g} s holds the view "
                            "(Ctrl+Z undoes)")

    def show_new_show(self) -> None:
        """Open the "New show" dialog (duration, rate, fps, clock)."""
        self.new_show_prompt = True
        self.new_show_errors = []
        if not self.new_show_rate:
            from .timeline_edits import rate_text

            self.new_show_rate = rate_text(self.editor.scene.timeline.rate)

    def new_show(self) -> bool:
        """Give the scene a new show from the dialog's fields, its first camera key the
        view; one edit. Refused values stay in the dialog, one line each."""
        from .timeline_edits import add_camera_key, key_from_camera, new_show_from_text

        start = self.clock.t_s
        try:
            tl = new_show_from_text(self.new_show_duration, self.new_show_rate,
                                    self.new_show_fps, self.new_show_clock, start)
            tl, _ = add_camera_key(tl, key_from_camera(self.camera, 0.0))
        except TimelineRefused as err:
            self.new_show_errors = _lines(err)
            return False
        self.editor.edit_timeline(tl, "new show")
        self.clock.follow_show(tl)
        self.seek_show(0.0)
        self.show_timeline = True
        self.new_show_prompt = False
        self.new_show_errors = []
        self.picked = ("camera", 0)
        self.message = (f"a new show of {tl.duration_s:g} s from "
                        f"{self.editor.scene.epoch.plus_seconds(start).iso()}; its first "
                        "camera key holds the view")
        return True

    # --- exports ------------------------------------------------------------------------------

    def _stem(self) -> Path:
        p = self.editor.path
        return p.with_suffix("") if p is not None else Path.cwd() / "scene"

    def show_still(self) -> None:
        self.still_prompt = True
        self.still_errors = []
        if not self.still_text:
            self.still_text = str(self._stem()) + ".png"

    def export_still(self) -> bool:
        """Write the still the dialog describes: the current view at the current time."""
        try:
            request = still_request(self.still_text, self.still_size, self.editor.scene)
            self.message = export_still(self.editor.scene, self.camera, self.clock.t_s,
                                        request, self.renderer)
        except UserInputError as err:
            self.still_errors = _lines(err)
            return False
        self.still_prompt = False
        self.still_errors = []
        return True

    def show_job(self) -> None:
        self.job_prompt = True
        self.job_errors = []
        # A show with camera keys renders through its own camera unless asked otherwise.
        if self.editor.scene.timeline.camera_keys:
            self.job_window_camera = False
        if not self.job_text:
            self.job_text = str(self._stem()) + "-frames/"

    def start_job(self) -> bool:
        """Start the render job the dialog describes (one at a time)."""
        if self.job is not None and self.job.active:
            self.job_errors = ["a render is running; cancel it or wait for it to finish"]
            return False
        try:
            request = job_request(self.job_text, self.job_size, self.job_frames,
                                  self.editor.scene, self.job_format, self.job_quality,
                                  self.job_view, self.job_from, self.job_to)
        except UserInputError as err:
            self.job_errors = _lines(err)
            return False
        self.job = RenderJob(self.editor.scene,
                             self.camera if self.job_window_camera else None, request)
        self.job_prompt = False
        self.job_errors = []
        return True


def _lines(err: UserInputError) -> list[str]:
    """One line per problem, naming the file or field (not a command-line flag)."""
    if err.source.startswith("-"):
        return list(err.problems)
    return [f"{err.source}: {p}" for p in err.problems]

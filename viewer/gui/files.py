"""The file chooser of Open and Save As: one folder's sub-folders and scene files, to
walk through and pick from. Plain Python: no imgui (``panels/dialogs.py`` draws it).

A listing shows the folders (hidden ones left out) and the ``.toml`` files of one folder,
folders first, each group sorted by name without regard to case. A folder that cannot
be read gives one line saying why, and an empty listing; nothing is raised.
"""

from __future__ import annotations

import os
from dataclasses import dataclass, field
from pathlib import Path

__all__ = ["Entry", "FileChooser", "folder_of"]


@dataclass(frozen=True)
class Entry:
    """One line of a listing: a folder (``folder``) or a scene file."""

    name: str
    path: Path
    folder: bool

    @property
    def text(self) -> str:
        return self.name + ("/" if self.folder else "")


def folder_of(text: str) -> Path:
    """The folder a typed path points into: itself if it is a folder, else its parent
    (the working folder for an empty text or one whose folder does not exist)."""
    p = Path(text.strip()).expanduser() if text.strip() else Path.cwd()
    if p.is_dir():
        return p.absolute()
    return p.parent.absolute() if p.parent.is_dir() else Path.cwd()


@dataclass
class FileChooser:
    """The folder being shown, its entries and the problem reading it (one line)."""

    folder: Path
    entries: list[Entry] = field(default_factory=list)
    problem: str = ""

    def __post_init__(self) -> None:
        self.go(self.folder)

    def go(self, folder: Path) -> None:
        """Show ``folder``: its sub-folders and .toml files, or why it cannot be read."""
        self.folder = Path(folder).absolute()
        self.entries, self.problem = [], ""
        try:
            with os.scandir(self.folder) as it:
                found = list(it)
        except OSError as err:
            self.problem = f"cannot list {self.folder}: {err.strerror or err}"
            return
        folders, scenes = [], []
        for d in found:
            if d.name.startswith("."):
                continue
            try:
                is_folder = d.is_dir()
                is_scene = not is_folder and d.name.lower().endswith(".toml") and d.is_file()
            except OSError:
                continue
            if is_folder:
                folders.append(Entry(d.name, Path(d.path), True))
            elif is_scene:
                scenes.append(Entry(d.name, Path(d.path), False))
        key = lambda e: e.name.casefold()  # noqa: E731
        self.entries = sorted(folders, key=key) + sorted(scenes, key=key)

    def up(self) -> None:
        """Show the folder above (the root stays the root)."""
        self.go(self.folder.parent)

"""New files in a folder, each handed on once it has stopped changing.

An instrument writes a capture over some time; a file whose size or modification time
still moves between two looks is not finished and is left alone.  A file that is written
again under the same name (many instruments save to one name) counts as new again.
Plain polling with :func:`os.stat`: no watcher library, nothing that differs by system.
"""

from __future__ import annotations

import os
from pathlib import Path

from ..errors import InputError

__all__ = ["NewFiles"]


class NewFiles:
    """Hand out the files of ``folder`` matching ``pattern`` once each has settled.

    Parameters
    ----------
    folder : path
        The folder to look in (not its sub-folders).
    pattern : str
        Glob pattern of the file names, e.g. ``"*.csv"``.
    existing : bool
        Hand out the files already there at the start as well (default: only new ones).
    settle : int
        Looks in a row that must see the same size and modification time, at least 2.
    """

    def __init__(self, folder, pattern: str = "*.csv", existing: bool = False, settle: int = 2):
        self.folder = Path(folder)
        if not self.folder.is_dir():
            raise InputError(f"{folder}: not a folder (give the folder the instrument saves into)")
        if settle < 2:
            raise InputError(f"settle must be at least 2 looks, got {settle}")
        self.pattern = pattern
        self.settle = settle
        self._seen = {}      # path -> (stat key, looks in a row with that key)
        self._done = {}      # path -> stat key when handed out
        if not existing:
            self._done = {p: k for p, k in self._scan().items()}

    def _scan(self) -> dict:
        out = {}
        for p in self.folder.glob(self.pattern):
            if p.name.startswith("."):
                continue      # temporary files of atomic writers, ours included
            try:
                st = os.stat(p)
            except OSError:
                continue      # gone between the listing and the look
            if not os.path.isfile(p):
                continue
            out[p] = (st.st_size, st.st_mtime_ns)
        return out

    def poll(self) -> list:
        """One look: the files that have settled since the last, in name order."""
        ready = []
        now = self._scan()
        for p, key in now.items():
            if self._done.get(p) == key:
                continue
            old, looks = self._seen.get(p, (None, 0))
            looks = looks + 1 if old == key else 1
            self._seen[p] = (key, looks)
            if looks >= self.settle and key[0] > 0:
                ready.append(p)
                self._done[p] = key
                del self._seen[p]
        for p in list(self._seen):
            if p not in now:
                del self._seen[p]
        return sorted(ready)

    def again(self, path) -> None:
        """Forget that ``path`` was handed out: it is looked at again until it settles anew
        (for a file the reader refused while it may still be growing)."""
        self._done.pop(Path(path), None)
        self._seen.pop(Path(path), None)

    def stamp(self, path):
        """The (size, modification time) ``path`` had when it was handed out, or None."""
        return self._done.get(Path(path))

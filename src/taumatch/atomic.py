"""Atomic output: write to a temporary file beside the target, then rename.

A reader never sees a half-written file, and an existing file is replaced only
when the new one is complete.
"""

from __future__ import annotations

import contextlib
import os
import tempfile
from pathlib import Path

from .errors import InputError

__all__ = ["atomic_path", "atomic_write"]


@contextlib.contextmanager
def atomic_path(target, suffix: str | None = None):
    """Yield a temporary path in the target's folder; rename it over ``target`` on success.

    Parameters
    ----------
    target : str or os.PathLike
        The file to create or replace.
    suffix : str, optional
        Suffix for the temporary file (matplotlib picks the format from it); defaults to the
        target's own suffix.
    """
    target = Path(target)
    folder = target.parent if str(target.parent) else Path(".")
    if not folder.is_dir():
        raise InputError(f"{target}: the folder {folder} does not exist")
    fd, tmp = tempfile.mkstemp(
        prefix=f".{target.name}.", suffix=suffix if suffix is not None else target.suffix,
        dir=folder,
    )
    os.close(fd)
    try:
        yield Path(tmp)
        os.chmod(tmp, _mode_for(target))
        os.replace(tmp, target)
    except BaseException:
        with contextlib.suppress(OSError):
            os.unlink(tmp)
        raise


def _mode_for(target: Path) -> int:
    """The existing file's mode, else the usual one for a new file under the umask."""
    try:
        return os.stat(target).st_mode & 0o7777
    except OSError:
        mask = os.umask(0)
        os.umask(mask)
        return 0o666 & ~mask


def atomic_write(target, data, *, encoding: str = "utf-8") -> Path:
    """Write ``data`` (str or bytes) to ``target`` atomically and return the path."""
    with atomic_path(target) as tmp:
        if isinstance(data, bytes):
            tmp.write_bytes(data)
        else:
            with open(tmp, "w", encoding=encoding, newline="") as fh:
                fh.write(data)
    return Path(target)

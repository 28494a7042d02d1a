"""What a capture file holds, found from its bytes (never from its suffix): plain or
UTF-16 text, a NumPy array or archive, a binary waveform, or any of these inside a gzip,
bzip2, xz or Zstandard stream, a zip or a tar archive (one level of each).

The reader owns its decompression: every stream it opens is bounded
(``limits.MAX_INFLATED_BYTES``) and turns a damaged stream into one
line naming the file, so no decompressor's error reaches the user.
"""

from __future__ import annotations

import bz2
import codecs
import gzip
import io
import lzma
import tarfile
import zipfile
import zlib
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

from ..errors import InputError
from . import limits
from .model import few

__all__ = ["HEAD_BYTES", "Payload", "open_payload"]

#: Bytes of the content the sniffer looks at (and 500 lines).
HEAD_BYTES = 1 << 18
_STREAMS = {  # magic -> name
    b"\x1f\x8b": "gzip", b"BZh": "bzip2", b"\xfd7zXZ\x00": "xz", b"\x28\xb5\x2f\xfd": "Zstandard",
}
_SUFFIXES = {".gz", ".gzip", ".bz2", ".xz", ".lzma", ".zst", ".zstd", ".zip", ".tar", ".tgz",
             ".tbz2", ".txz"}
# what a damaged stream raises while it is read, by the library that reads it
_DAMAGE = (zlib.error, EOFError, OSError, lzma.LZMAError, zipfile.BadZipFile,
           tarfile.TarError, ValueError)


@dataclass(frozen=True)
class Payload:
    """The content of a capture file, after any container.

    Attributes
    ----------
    source : str
        The name for messages (``a.tar.gz:capture.csv`` for an archive member).
    kind : str
        ``"text"``, ``"npy"``, ``"npz"`` or ``"binary"``.
    head : bytes
        The first bytes of the content (for text: UTF-8 or Latin-1, after any BOM).
    opener : callable
        Returns a fresh binary stream of the content, positioned at ``head``'s start.
    path : Path or None
        The file itself when the content is the file's own bytes (fast paths use it).
    skip : int
        Bytes of the file before ``head`` (a UTF-8 byte-order mark).
    complete : bool
        True when ``head`` is the whole content.
    notes : tuple of str
        What the user should know about how the file was read.
    """

    source: str
    kind: str
    head: bytes
    opener: Callable
    path: Path | None = None
    skip: int = 0
    complete: bool = True
    notes: tuple = ()

    def open(self):
        """A fresh binary stream of the content, at ``head``'s start (use ``with``)."""
        fh = self.opener()
        if self.skip:
            fh.read(self.skip)
        return fh


class _Stream(io.RawIOBase):
    """A read-only stream over ``read(n)`` that stops at the size limit and turns a
    decompressor's error into one line naming the file."""

    def __init__(self, read, closers, source: str, what: str):
        self._read, self._closers = read, closers
        self._source, self._what = source, what
        self._count = 0
        self._pending = b""

    def readable(self):
        return True

    def readinto(self, b):
        if not self._pending:
            try:
                self._pending = self._read(len(b))
            except _DAMAGE as exc:
                raise InputError(f"{self._source}: damaged {self._what} data after "
                                 f"{self._count} bytes ({_short(exc)})") from None
            self._count += len(self._pending)
            if self._count > limits.MAX_INFLATED_BYTES:
                raise InputError(
                    f"{self._source}: {self._what} content inflates past "
                    f"{_size(limits.MAX_INFLATED_BYTES)}, the reader's limit for compressed "
                    "files; cut the record"
                )
        n = min(len(b), len(self._pending))
        b[:n] = self._pending[:n]
        self._pending = self._pending[n:]
        return n

    def close(self):
        for c in reversed(self._closers):
            try:
                c()
            except _DAMAGE:
                pass
        super().close()


def _size(n: int) -> str:
    return f"{n >> 30} GiB" if n >= 1 << 30 else f"{n >> 20} MiB"


def _short(exc) -> str:
    text = str(exc).splitlines()[0] if str(exc) else type(exc).__name__
    return text[:120]


def _buffered(read, closers, source, what):
    return io.BufferedReader(_Stream(read, closers, source, what), 1 << 16)


def _decompressor(kind: str, source: str):
    """A function making a decompressing reader over a binary stream."""
    if kind == "gzip":
        return lambda fh: gzip.GzipFile(fileobj=fh, mode="rb")
    if kind == "bzip2":
        return lambda fh: bz2.BZ2File(fh, mode="rb")
    if kind == "xz":
        return lambda fh: lzma.LZMAFile(fh, mode="rb")
    try:  # Zstandard: the standard library from Python 3.14, else the zstandard package
        from compression import zstd  # type: ignore[import-not-found]

        return lambda fh: zstd.ZstdFile(fh, mode="rb")
    except ImportError:
        pass
    try:
        import zstandard  # type: ignore[import-not-found]
    except ImportError:
        raise InputError(
            f"{source}: Zstandard-compressed, which this Python cannot decompress "
            "(Python 3.14, or the zstandard package, can); decompress it first: zstd -d FILE"
        ) from None
    return lambda fh: zstandard.ZstdDecompressor().stream_reader(fh)


def _layer(opener, kind: str, source: str):
    """An opener of the decompressed content of what ``opener`` opens."""
    make = _decompressor(kind, source)

    def open_inner():
        outer = opener()
        inner = make(outer)
        return _buffered(inner.read, [outer.close, inner.close], source, kind)
    return open_inner


def _read_head(opener):
    with opener() as fh:
        head = fh.read(HEAD_BYTES)
        complete = len(head) < HEAD_BYTES or not fh.read(1)
    return head, complete


def _one_member(names: list[str], source: str, what: str) -> str:
    if len(names) != 1:
        listed = f": {few(names, 4)}" if names else ""
        raise InputError(f"{source}: a {what} archive of {len(names)} files{listed}; a capture "
                         f"archive holds one file: extract the one you mean")
    return names[0]


def _zip_member(path: Path, source: str):
    """``(kind, opener, member)`` of a zip archive: ``npz`` when it holds ``.npy`` arrays
    (the array reader refuses any other member), else its one file."""
    try:
        with zipfile.ZipFile(path) as zf:
            names = [i.filename for i in zf.infolist() if not i.is_dir()]
    except (zipfile.BadZipFile, OSError, EOFError, ValueError) as exc:
        raise InputError(f"{source}: not a readable zip archive ({_short(exc)})") from None
    if any(n.endswith(".npy") for n in names):
        return "npz", None, None
    member = _one_member(names, source, "zip")
    where = f"{source}:{member}"

    def open_member():
        zf = zipfile.ZipFile(path)
        try:
            fh = zf.open(member)
        except (zipfile.BadZipFile, NotImplementedError, RuntimeError, OSError) as exc:
            zf.close()
            raise InputError(f"{where}: cannot unpack ({_short(exc)})") from None
        return _buffered(fh.read, [zf.close, fh.close], where, "zip")
    return "zip", open_member, member


def _tar_member(opener, source: str):
    """``(opener, member)`` of the one regular file in a tar stream."""
    def members(fh):
        try:
            tf = tarfile.open(fileobj=fh, mode="r|")  # noqa: SIM115 - closed by its stream
        except tarfile.TarError as exc:
            raise InputError(f"{source}: not a readable tar archive ({_short(exc)})") from None
        return tf

    with opener() as fh:
        tf = members(fh)
        try:
            names = [m.name for m in tf if m.isfile()]
        except tarfile.TarError as exc:
            raise InputError(f"{source}: damaged tar archive ({_short(exc)})") from None
    member = _one_member(names, source, "tar")
    where = f"{source}:{member}"

    def open_member():
        fh = opener()
        tf = members(fh)
        for m in tf:
            if m.isfile() and m.name == member:
                inner = tf.extractfile(m)
                return _buffered(inner.read, [fh.close, tf.close], where, "tar")
        fh.close()
        raise InputError(f"{where}: member vanished from the archive")
    return open_member, member


def _utf16(head: bytes) -> str | None:
    """The UTF-16 codec of ``head``, from its byte-order mark or its pattern of NULs."""
    if head.startswith(b"\xff\xfe"):
        return "utf-16-le"
    if head.startswith(b"\xfe\xff"):
        return "utf-16-be"
    sample = head[:4096]
    n = len(sample) // 2
    if n < 8:
        return None
    even, odd = sample[0:2 * n:2].count(0), sample[1:2 * n:2].count(0)
    if odd >= 0.9 * n and even <= 0.1 * n:
        return "utf-16-le"
    if even >= 0.9 * n and odd <= 0.1 * n:
        return "utf-16-be"
    return None


def _recoded(opener, codec: str, source: str):
    """An opener of ``opener``'s UTF-16 text as UTF-8 bytes (BOM dropped)."""
    def open_utf8():
        raw = opener()
        decoder = codecs.getincrementaldecoder(codec)(errors="replace")
        state = {"start": True}

        def read(n):
            while True:
                data = raw.read(max(2, n))
                text = decoder.decode(data, final=not data)
                if state["start"] and text:
                    text = text.lstrip("\ufeff")
                    state["start"] = False
                out = text.encode("utf-8")
                if out or not data:  # a lone byte decodes to nothing yet: read on
                    return out
        return _buffered(read, [raw.close], source, "UTF-16 text")
    return open_utf8


def open_payload(path: Path, source: str) -> Payload:
    """Find what the file at ``path`` holds; raise one line for what cannot be read."""
    def opener():  # the first of a chain of openers
        return open(path, "rb")

    head, complete = _read_head(opener)
    if not head:
        raise InputError(f"{source}: the file is empty")
    name, layers, notes = source, [], []
    for _ in range(4):
        kind = next((k for m, k in _STREAMS.items() if head.startswith(m)), None)
        if kind is not None:
            opener = _layer(opener, kind, name)
        elif len(head) > 262 and head[257:262] == b"ustar":
            kind = "tar"
            opener, member = _tar_member(opener, name)
            name = f"{name}:{member}"
        elif head.startswith((b"PK\x03\x04", b"PK\x05\x06")):
            if layers:
                raise InputError(f"{name}: a zip archive inside a {layers[-1]} stream; "
                                 "unpack it first")
            what, member_opener, member = _zip_member(path, name)
            if what == "npz":
                return Payload(source, "npz", head, opener, path=path)
            kind, opener, name = "zip", member_opener, f"{name}:{member}"
        else:
            break
        layers.append(kind)
        head, complete = _read_head(opener)
        if not head:
            raise InputError(f"{name}: the {kind} content is empty")
    else:
        raise InputError(f"{source}: containers nested {len(layers)} deep "
                         f"({' in '.join(reversed(layers))}); unpack it first")
    own = path if not layers else None
    suffix = Path(source).suffix.lower()
    if not layers and suffix in _SUFFIXES:
        notes.append(f"named {suffix} but not compressed or archived: read as it is")
    if head.startswith(b"\x93NUMPY"):
        return Payload(name, "npy", head, opener, own, 0, complete, tuple(notes))
    codec = _utf16(head)
    if codec is not None:
        opener = _recoded(opener, codec, name)
        head, complete = _read_head(opener)
        return Payload(name, "text", head, opener, None, 0, complete, tuple(notes))
    if b"\x00" in head:
        if layers:
            raise InputError(f"{name}: a binary file inside a {layers[-1]} container; "
                             "unpack it first")
        return Payload(name, "binary", head, opener, own, 0, complete, tuple(notes))
    skip = 3 if head.startswith(b"\xef\xbb\xbf") else 0
    return Payload(name, "text", head[skip:], opener, own, skip, complete, tuple(notes))

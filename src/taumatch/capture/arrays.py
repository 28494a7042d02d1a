"""NumPy captures: a ``.npy`` array (rows are samples, column 0 time) or an ``.npz``
archive of named 1-D arrays.

Each array's header is read first, so its shape and type are checked against the limits
before any data is inflated or loaded; no pickle is ever loaded.
"""

from __future__ import annotations

import tokenize
import zipfile
import zlib

import numpy as np
import numpy.lib.format as npformat

from ..errors import InputError
from ..units import parse_quantity
from . import limits
from .containers import Payload
from .limits import check_size
from .model import Capture, SampleProblem, few
from .timebase import time_index

__all__ = ["read_npy", "read_npz"]

# what numpy's header parser (ast/tokenize on the header text) raises on a damaged header
_HEADER_ERRORS = (ValueError, SyntaxError, tokenize.TokenError, TypeError, OverflowError,
                  EOFError, MemoryError)


def _header(fh, where: str):
    """``(shape, fortran, dtype)`` of the array whose ``.npy`` bytes start at ``fh``."""
    try:
        major, _ = npformat.read_magic(fh)
        if major == 1:
            shape, fortran, dtype = npformat.read_array_header_1_0(fh)
        elif major in (2, 3):
            shape, fortran, dtype = npformat.read_array_header_2_0(fh)
        else:
            raise ValueError(f"format version {major} unknown")
    except _HEADER_ERRORS as exc:
        raise InputError(f"{where}: not a readable .npy array ({_short(exc)})") from None
    if dtype.kind not in "iuf" or dtype.hasobject:
        raise InputError(f"{where}: the array must hold real numbers, got dtype {dtype}")
    return shape, fortran, dtype


def _short(exc) -> str:
    return (str(exc).splitlines() or [type(exc).__name__])[0][:120]


# what a damaged stream (a deflated archive member) raises while it is read
_STREAM_ERRORS = (OSError, EOFError, zlib.error, zipfile.BadZipFile)


def _load(open_stream, where: str, check) -> np.ndarray:
    """Check the header with ``check(shape)``, then read the data."""
    try:
        with open_stream() as fh:
            shape, _, _ = _header(fh, where)
        check(shape)
        with open_stream() as fh:
            return npformat.read_array(fh, allow_pickle=False)
    except InputError:
        raise
    except (ValueError, *_STREAM_ERRORS) as exc:
        raise InputError(f"{where}: damaged array data ({_short(exc)})") from None


def read_npy(payload: Payload, time_column, dt) -> Capture:
    """A capture from a 1-D (one channel, needs ``dt``) or 2-D (column 0 time) array."""
    where = payload.source

    def check(shape):
        if len(shape) not in (1, 2):
            raise InputError(f"{where}: .npy array must be 1-D or 2-D (rows = samples), "
                             f"got shape {shape}")
        if len(shape) == 2 and shape[1] == 0:
            raise InputError(f"{where}: the array of shape {shape} has no columns; "
                             "expected rows of time and channels")
        check_size(shape[0], 1 if len(shape) == 1 else shape[1] + 1, where)

    arr = _load(payload.open, where, check)
    if arr.ndim == 1:
        if dt is None:
            raise InputError(f"{where}: a 1-D .npy array needs sample_interval=")
        return _checked(dt * np.arange(arr.size, dtype=np.float64), {"CH1": arr}, {}, where)
    ncol = arr.shape[1]
    if time_column is None:
        tcol = None if dt is not None else 0
    else:
        tcol = time_index([f"col{i + 1}" for i in range(ncol)], time_column, dt, where)
    time = dt * np.arange(arr.shape[0], dtype=np.float64) if tcol is None else arr[:, tcol]
    chans = {f"CH{k + 1}": arr[:, i] for k, i in enumerate(i for i in range(ncol) if i != tcol)}
    if not chans:
        raise InputError(f"{where}: .npy array has a time column only (shape {arr.shape})")
    return _checked(time, chans, {}, where)


def read_npz(payload: Payload, time_column, dt) -> Capture:
    """A capture from named 1-D arrays (``t``/``time``, channels) and scalars (metadata)."""
    where = payload.source
    data = _npz_arrays(payload, where)
    metadata, arrays = {}, {}
    for key, value in data.items():
        if value.ndim == 0:
            metadata[key] = repr(float(value)) if value.dtype.kind in "iuf" else str(value)
        else:
            arrays[key] = value
    if not arrays:
        raise InputError(f"{where}: .npz archive holds no 1-D arrays")
    if time_column is not None:
        if str(time_column) not in arrays:
            raise InputError(f"{where}: no array named {time_column!r}; arrays are "
                             f"{few(arrays)}")
        tkey = str(time_column)
    elif dt is None:
        tkey = next((k for k in arrays if k.lower() in ("t", "time", "time_s")), None)
    else:
        tkey = None
    if tkey is None:
        if dt is None:
            for key in ("dt", "sample_interval"):
                if key in metadata:
                    dt = _quantity(metadata[key], f"{where}: array {key!r}")
                    break
        if dt is None or not dt > 0:
            raise InputError(f"{where}: no time array ('t' or 'time') and no sample interval "
                             "('dt' in the archive or sample_interval=)")
        n = next(iter(arrays.values())).size
        start = _quantity(metadata.get("t0", "0.0"), f"{where}: array 't0'")
        time = start + dt * np.arange(n, dtype=np.float64)
    else:
        time = arrays.pop(tkey)
    if not arrays:
        raise InputError(f"{where}: .npz archive has a time array only")
    return _checked(time, arrays, metadata, where)


def _npz_arrays(payload: Payload, where: str) -> dict:
    """The archive's arrays, each header checked before its data is inflated."""
    try:
        zf = zipfile.ZipFile(payload.path)
    except (zipfile.BadZipFile, OSError, EOFError, ValueError) as exc:
        raise InputError(f"{where}: not a readable .npz archive ({_short(exc)})") from None
    with zf:
        members = [i for i in zf.infolist() if not i.is_dir()]
        stray = [i.filename for i in members if not i.filename.endswith(".npy")]
        if stray:
            raise InputError(f"{where}: member {few(stray, 3)} is not a NumPy array (.npy); "
                             "an .npz capture holds only arrays")
        total = {"values": 0}
        out = {}
        for info in members:
            key = info.filename[:-4]
            name = f"{where}: array {key!r}"

            def check(shape, name=name):
                if len(shape) > 1:
                    raise InputError(f"{name} must be 1-D or a scalar, got shape {shape}")
                n = shape[0] if shape else 1
                total["values"] += n
                if n > limits.MAX_SAMPLES or total["values"] > limits.MAX_VALUES:
                    raise InputError(
                        f"{name}: {n} samples ({total['values']} in all); the reader keeps "
                        f"at most {limits.MAX_SAMPLES} samples per channel and "
                        f"{limits.MAX_VALUES} numbers "
                        "in all: cut or decimate the record")

            def open_member(info=info, name=name):
                try:
                    return zf.open(info)
                except (zipfile.BadZipFile, NotImplementedError, RuntimeError, OSError) as exc:
                    raise InputError(f"{name}: cannot unpack ({_short(exc)})") from None
            out[key] = _load(open_member, name, check)
    return out


def _quantity(text: str, field: str) -> float:
    """A time (s) from an archive's scalar, refused when too long to be one number."""
    if len(text) > limits.MAX_FIELD_CHARS:
        raise InputError(f"{field}: a value of {len(text)} characters is not a number")
    return parse_quantity(text, "s", field=field)


def _checked(time, chans, metadata, source) -> Capture:
    try:
        return Capture(time, chans, metadata, source)
    except SampleProblem as exc:
        raise InputError(str(exc)) from None

"""Writing report files so that nothing half-written is ever left behind."""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

from ..errors import InputError


def _umask() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return mask


def write_atomic(path: str | os.PathLike[str], data: bytes | str) -> Path:
    """Write ``data`` to ``path`` through a temporary file in the same folder and a rename.

    A run that fails or is interrupted leaves either the old file or none,
    never a partial one.  Text is written as UTF-8.
    """
    path = Path(path)
    folder = path.parent if str(path.parent) else Path(".")
    if not folder.is_dir():
        raise InputError(f"cannot write {path}: folder {folder} does not exist; create it or choose another path")
    payload = data.encode("utf-8") if isinstance(data, str) else data
    handle, temporary = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".part", dir=folder)
    try:
        with os.fdopen(handle, "wb") as stream:
            stream.write(payload)
            stream.flush()
            os.fsync(stream.fileno())
        os.chmod(temporary, 0o666 & ~_umask())  # mkstemp makes the file private; give it the usual mode
        os.replace(temporary, path)
    except BaseException:
        try:
            os.unlink(temporary)
        except FileNotFoundError:
            pass
        raise
    return path

"""Writing report files so that nothing half-written is ever left behind.

:func:`write_atomic` writes one file through a temporary file and a rename.
:func:`write_all` writes several (a run's CSV, XLSX and HTML) all or none:
every path is checked before any is written, every payload is written to its
temporary file before any is renamed into place, and an error names the path
the user gave, never the hidden temporary file.
"""

from __future__ import annotations

import os
import tempfile
from collections.abc import Callable, Sequence
from pathlib import Path

from ..errors import InputError
from .html import render_html
from .spreadsheet import render_csv, render_xlsx


def _umask() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return mask


def check_writable(path: str | os.PathLike[str]) -> Path:
    """Raise :class:`InputError`, naming ``path``, unless a file can be written there (nothing is created)."""
    path = Path(path)
    folder = path.parent if str(path.parent) else Path(".")
    if not folder.is_dir():
        raise InputError(f"cannot write {path}: folder {folder} does not exist; create it or choose another path")
    if path.is_dir():
        raise InputError(f"cannot write {path}: it is a folder; give a file name")
    if not os.access(folder, os.W_OK | os.X_OK):
        raise InputError(f"cannot write {path}: folder {folder} is not writable; choose a folder you can write to")
    if path.exists() and not os.access(path, os.W_OK):
        raise InputError(f"cannot write {path}: the file exists and is read-only; remove it or choose another path")
    return path


def _temporary_with(path: Path, payload: bytes) -> str:
    """A hidden temporary file beside ``path`` holding ``payload``, flushed to disk; errors name ``path``."""
    try:
        handle, temporary = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".part", dir=path.parent)
    except OSError as exc:
        raise InputError(f"cannot write {path}: {exc.strerror or exc}; choose a folder you can write to") from None
    try:
        with os.fdopen(handle, "wb") as stream:
            stream.write(payload)
            stream.flush()
            os.fsync(stream.fileno())
        os.chmod(temporary, 0o666 & ~_umask())  # mkstemp makes the file private; give it the usual mode
    except BaseException as exc:
        _remove(temporary)
        if isinstance(exc, OSError):
            raise InputError(f"cannot write {path}: {exc.strerror or exc}") from None
        raise
    return temporary


def _remove(temporary: str) -> None:
    try:
        os.unlink(temporary)
    except FileNotFoundError:
        pass


def _encoded(data: bytes | str) -> bytes:
    return data.encode("utf-8") if isinstance(data, str) else data


def write_atomic(path: str | os.PathLike[str], data: bytes | str) -> Path:
    """Write ``data`` to ``path`` through a temporary file in the same folder and a rename.

    A run that fails or is interrupted leaves either the old file or none,
    never a partial one.  Text is written as UTF-8.
    """
    return write_all([(path, lambda: data)])[0]


def write_all(outputs: Sequence[tuple[str | os.PathLike[str], Callable[[], bytes | str]]]) -> list[Path]:
    """Write several files all or none: pairs of a path and a function giving its content (text as UTF-8).

    Every path is checked first, then every content made, then each written to
    a temporary file beside its path; only when all are written are they
    renamed into place.  Any failure before the renames leaves every path as
    it was (a rename itself failing part-way, which takes a fault of the file
    system, could still leave the earlier renames done).  Errors are :class:`InputError` naming the user's path.
    """
    paths = [check_writable(p) for p, _ in outputs]
    if len({p.resolve() for p in paths}) < len(paths):
        raise InputError(f"the same file is named for two outputs ({', '.join(map(str, paths))}); give each its own")
    payloads = [_encoded(make()) for _, make in outputs]
    temporaries: list[str] = []
    try:
        for path, payload in zip(paths, payloads):
            temporaries.append(_temporary_with(path, payload))
        for path, temporary in zip(paths, temporaries):
            os.replace(temporary, path)
    except BaseException:
        for temporary in temporaries:
            _remove(temporary)
        raise
    return paths


def write_report_files(report, csv: str | None = None, xlsx: str | None = None,
                       html: str | None = None) -> list[Path]:
    """Write a :class:`~gibbsmin.report.document.Report` as CSV, XLSX and HTML where paths are given, all or none."""
    renderers = [(csv, render_csv), (xlsx, render_xlsx), (html, render_html)]
    return write_all([(path, lambda render=render: render(report)) for path, render in renderers if path])

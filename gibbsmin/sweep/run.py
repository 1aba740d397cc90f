"""Running a sweep: chunks, executors (this process, local processes, a Dask cluster), resumable output.

Output folder layout (our own):

    OUT/sweep.json              the sweep definition, its fingerprint and the chunk size
    OUT/chunk-000000.parquet    one table per chunk, written to a temporary name and renamed

A rerun with the same definition skips every chunk whose file exists; a file
appears only complete (rename is atomic), so an interrupted run leaves no
corrupt table.  A chunk solved twice (a worker that died and was replaced)
writes the same table twice: nothing is lost or duplicated.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import io
import json
import multiprocessing
import os
from collections.abc import Callable, Iterable
from concurrent.futures import ProcessPoolExecutor, as_completed
from dataclasses import dataclass
from pathlib import Path

if TYPE_CHECKING:
    import pandas as pd

from ..errors import InputError
from ..report.files import write_atomic
from .chunk import solve_points
from .grid import SweepSpec

DEFINITION_FILE = "sweep.json"


def chunk_path(out: Path, index: int) -> Path:
    return out / f"chunk-{index:06d}.parquet"


def _chunk_range(spec: SweepSpec, index: int, chunk_size: int) -> tuple[int, int]:
    first = index * chunk_size
    return first, min(spec.n_points, first + chunk_size)


def _write_table(frame: pd.DataFrame, target: Path) -> None:
    data = io.BytesIO()
    frame.to_parquet(data, index=False)
    write_atomic(target, data.getvalue())


def run_chunk(spec_json: str, index: int, chunk_size: int, out: str | None) -> pd.DataFrame | dict:
    """Solve one chunk; with an output folder write it and return a small summary, else return the table.

    A plain function of plain arguments, so that local processes and Dask
    workers can run it.
    """
    spec = SweepSpec.from_json(spec_json)
    first, last = _chunk_range(spec, index, chunk_size)
    frame = solve_points(spec, first, last)
    if out is None:
        return frame
    _write_table(frame, chunk_path(Path(out), index))
    return {"chunk": index, "points": last - first, "uncertified": int((~frame["certified"]).sum())}


@dataclass(frozen=True)
class SweepOutput:
    """A finished sweep on disk."""

    folder: Path
    spec: SweepSpec
    chunks: int
    uncertified: int

    def frame(self, columns: list[str] | None = None) -> pd.DataFrame:
        """All points as one table, in point order (reads every chunk: mind the memory on huge sweeps)."""
        import pandas as pd  # optional heavy dependency: loaded where a table is made

        parts = [pd.read_parquet(chunk_path(self.folder, i), columns=columns) for i in range(self.chunks)]
        return pd.concat(parts, ignore_index=True)


def _prepare_folder(out: Path, spec: SweepSpec, chunk_size: int, resume: bool) -> None:
    out.mkdir(parents=True, exist_ok=True)
    definition = out / DEFINITION_FILE
    record = {"fingerprint": spec.fingerprint(), "chunk_size": chunk_size, "points": spec.n_points,
              "spec": json.loads(spec.to_json())}
    if definition.exists():
        existing = json.loads(definition.read_text())
        same = existing.get("fingerprint") == record["fingerprint"] and existing.get("chunk_size") == chunk_size
        if not same:
            raise InputError(
                f"{out} holds the results of a different sweep (or chunk size); "
                "choose another output folder, or delete that one to start afresh"
            )
        if not resume:
            for stale in out.glob("chunk-*.parquet"):
                stale.unlink()
        return
    write_atomic(definition, json.dumps(record, indent=1))


def run_sweep(
    spec: SweepSpec,
    out: str | os.PathLike[str] | None = None,
    *,
    chunk_size: int = 5000,
    workers: int = 1,
    scheduler: object = None,
    resume: bool = True,
    progress: bool | Callable[[Iterable], Iterable] = False,
) -> pd.DataFrame | SweepOutput:
    """Solve every point of a sweep.

    Parameters
    ----------
    spec : SweepSpec
    out : path, optional
        Output folder for Parquet chunks (needed for resuming and for sweeps
        too large for memory).  Without it the table is returned.
    chunk_size : int
        Points per chunk (one batch solve, one file).
    workers : int
        Local processes (1 = this process; batches still use both cores' threads).
    scheduler : str or dask.distributed.Client, optional
        A Dask scheduler address ("tcp://host:8786") or client: chunks then run
        on that cluster instead of local processes; results are identical.
    resume : bool
        Skip chunks already in ``out`` (same sweep definition only).
    progress : bool or callable
        Show a progress bar (tqdm) or wrap the chunk iterator with a callable.

    Returns
    -------
    DataFrame (no ``out``) or SweepOutput
    """
    import pandas as pd  # optional heavy dependency: loaded where a table is made

    if chunk_size < 1 or workers < 1:
        raise InputError("chunk_size and workers must be positive whole numbers")
    n_chunks = -(-spec.n_points // chunk_size)
    folder = Path(out) if out is not None else None
    if folder is not None:
        _prepare_folder(folder, spec, chunk_size, resume)
        todo = [i for i in range(n_chunks) if not chunk_path(folder, i).exists()]
    else:
        todo = list(range(n_chunks))
    spec_json = spec.to_json()
    target = str(folder) if folder is not None else None
    results = _execute(spec_json, todo, chunk_size, target, workers, scheduler, _progress(progress, len(todo)))
    if folder is None:
        return pd.concat([results[i] for i in range(n_chunks)], ignore_index=True)
    uncertified = sum(int((~pd.read_parquet(chunk_path(folder, i), columns=["certified"])["certified"]).sum())
                      for i in range(n_chunks))
    return SweepOutput(folder, spec, n_chunks, uncertified)


def _progress(progress, total):
    if callable(progress):
        return progress
    if progress:
        from tqdm.auto import tqdm
        return lambda items: tqdm(items, total=total, unit="chunk", desc="sweep")
    return lambda items: items


def _execute(spec_json, todo, chunk_size, out, workers, scheduler, wrap) -> dict[int, object]:
    if scheduler is not None:
        return _execute_dask(spec_json, todo, chunk_size, out, scheduler, wrap)
    if workers == 1:
        return {i: run_chunk(spec_json, i, chunk_size, out) for i in wrap(todo)}
    results = {}
    # Fresh interpreters ("spawn"): forking a process whose compiled kernels
    # have started OpenMP threads is unsafe.
    context = multiprocessing.get_context("spawn")
    with ProcessPoolExecutor(max_workers=workers, initializer=_single_threaded, mp_context=context) as pool:
        futures = {pool.submit(run_chunk, spec_json, i, chunk_size, out): i for i in todo}
        for future in wrap(as_completed(futures)):
            results[futures[future]] = future.result()
    return results


def _single_threaded() -> None:
    # Each process solves its own chunks; threads inside would only contend for the cores.
    import numba
    numba.set_num_threads(1)


def _execute_dask(spec_json, todo, chunk_size, out, scheduler, wrap) -> dict[int, object]:
    try:
        from dask.distributed import Client, as_completed as dask_completed
    except ImportError:
        raise InputError("a Dask scheduler was given but dask.distributed is not installed; "
                         "pip install 'dask[distributed]'") from None
    client = scheduler if isinstance(scheduler, Client) else Client(scheduler)
    try:
        futures = client.map(run_chunk, [spec_json] * len(todo), todo, [chunk_size] * len(todo),
                             [out] * len(todo), pure=True, retries=3)
        index_of = {f.key: i for f, i in zip(futures, todo)}
        return {index_of[f.key]: f.result() for f in wrap(dask_completed(futures))}
    finally:
        if client is not scheduler:
            client.close()

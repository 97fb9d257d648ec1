"""Files in, files out: reading CSV and Parquet inputs, writing outputs atomically.

Inputs are checked before anything is computed, text columns of numbers or times are parsed with
the first bad cell named, and every output is written to a hidden ``.part`` file that is renamed
into place when complete (:func:`atomic`).
"""

from __future__ import annotations

import contextlib
import os
import stat
import tempfile
from collections.abc import Iterator, Sequence
from pathlib import Path
from typing import Any, Optional

import numpy as np

__all__ = [
    "PANDAS_HINT",
    "ROWS_PER_WRITE",
    "UsageError",
    "WriteError",
    "atomic",
    "check_input",
    "check_output",
    "destination",
    "format_of",
    "need_pandas",
    "need_pyarrow",
    "parse_numbers",
    "parse_times",
    "read_table",
    "write_output",
    "write_table",
]

ROWS_PER_WRITE = 1 << 18  # outputs are written in slices of this many rows (Parquet: row groups)
PANDAS_HINT = (
    "pip install 'osculate[pandas]' (or 'osculate[cli]', which adds pyarrow for Parquet and a "
    "progress bar)"
)
_CODECS = {".gz": "gzip", ".bz2": "bz2", ".zst": "zstd"}  # compressed CSV: suffix -> codec


class UsageError(Exception):
    """Bad input or arguments: exit code 2."""


class WriteError(Exception):
    """An output could not be written (disk full, permissions changed meanwhile): exit code 1."""


def format_of(path: Path, role: str) -> str:
    name = path.name.lower()
    if name.endswith((".csv", ".csv.gz", ".csv.bz2", ".csv.zst")):
        return "csv"
    if name.endswith((".parquet", ".pq")):
        return "parquet"
    raise UsageError(f"{role} {str(path)!r}: use a .csv or .parquet file name")


def need_pandas() -> Any:
    """Import pandas, or fail with one line and the install hint."""
    try:
        import pandas
    except ImportError as exc:
        raise ImportError(f"reading and writing tables needs pandas: {PANDAS_HINT}") from exc
    return pandas


def need_pyarrow(what: str) -> Any:
    try:
        import pyarrow
    except ImportError as exc:
        raise ImportError(f"{what} needs pyarrow: pip install 'osculate[cli]'") from exc
    return pyarrow


def _shown(value: Any, width: int = 40) -> str:
    """``repr`` of a cell for an error message, cut to about ``width`` characters."""
    text = repr(value)
    return text if len(text) <= width else text[: width - 1] + "…"


def _reason(err: BaseException, width: int = 120) -> str:
    """Return the readable head of a reader's message (parsers quote the bytes they met)."""
    text = " ".join(str(err).split())
    cut = next((i for i, ch in enumerate(text) if ch == "\ufffd" or not ch.isprintable()), None)
    if cut is not None:  # drop the quoted part: "..., got 2: <bytes>" -> "..., got 2"
        head = text[:cut]
        text = head.rsplit(": ", 1)[0] if ": " in head else head.rstrip(" :")
    return text if len(text) <= width else text[: width - 1] + "…"


def check_input(text: str) -> Path:
    """Return the input path if it names an existing .csv / .parquet file (else exit 2)."""
    path = Path(text)
    format_of(path, "input")
    if path.is_dir():
        raise UsageError(f"input {text!r}: is a folder, not a file")
    if not path.is_file():
        raise UsageError(f"input {text!r}: no such file")
    return path


def check_output(text: str, option: str) -> Path:
    """Return the output path if it can be written, checked before any computing (else exit 2).

    The file name must end in .csv or .parquet, not name a folder, and its folder must exist and
    be writable; an existing read-only file is not replaced.
    """
    path = Path(text)
    if path.is_dir():
        raise UsageError(f"{option} {text!r}: is a folder; give a .csv or .parquet file name")
    kind = format_of(path, option)
    dest = destination(path)
    folder = dest.parent
    if not folder.is_dir():
        raise UsageError(f"{option} {text!r}: folder {str(folder)!r} does not exist")
    if not os.access(folder, os.W_OK | os.X_OK):
        raise UsageError(f"{option} {text!r}: folder {str(folder)!r} is not writable")
    if dest.exists() and not os.access(dest, os.W_OK):
        raise UsageError(f"{option} {text!r}: the file exists and is read-only")
    if kind == "parquet":
        need_pyarrow("writing Parquet")
    return path


def destination(path: Path) -> Path:
    """Return the file really written: links are followed, so the rename lands on the target."""
    return Path(os.path.realpath(path))


def read_table(path: Path) -> Any:
    """Read the input table; an unreadable file is a :class:`UsageError` naming it."""
    pd = need_pandas()
    kind = format_of(path, "input")
    name = "Parquet" if kind == "parquet" else "CSV"
    try:
        if kind == "parquet":
            need_pyarrow("reading Parquet")
            return pd.read_parquet(path)
        try:
            import pyarrow  # noqa: F401  (the fast CSV reader; it also parses ISO 8601 times)
        except ImportError:
            return pd.read_csv(path)
        return pd.read_csv(path, engine="pyarrow")
    except pd.errors.EmptyDataError:
        raise UsageError(f"input {str(path)!r}: the file is empty (no header, no rows)") from None
    except (pd.errors.ParserError, UnicodeDecodeError, EOFError, OSError) as err:
        raise UsageError(f"input {str(path)!r}: cannot read it as {name}: {_reason(err)}") from err
    except Exception as err:
        if not type(err).__module__.startswith("pyarrow"):  # ArrowInvalid and friends
            raise
        raise UsageError(f"input {str(path)!r}: cannot read it as {name}: {_reason(err)}") from err


def _codec(path: Path) -> Optional[str]:
    """Return the compression of a CSV output from its name (``.csv.gz``, ``.bz2``, ``.zst``)."""
    name = path.name.lower()
    return next((c for suffix, c in _CODECS.items() if name.endswith(".csv" + suffix)), None)


def _new_file_mode(dest: Path) -> int:
    """Return the output's permission bits: the replaced file's, else 0o666 less the umask."""
    try:
        return stat.S_IMODE(os.stat(dest).st_mode)
    except OSError:
        umask = os.umask(0o022)
        os.umask(umask)
        return 0o666 & ~umask


def _fsync(path: Path) -> None:
    """Flush a file (or, on POSIX, a folder's entries) to the disk."""
    flags = os.O_RDONLY if path.is_dir() else os.O_RDWR
    fd = os.open(path, flags)
    try:
        os.fsync(fd)
    finally:
        os.close(fd)


@contextlib.contextmanager
def atomic(dest: Path) -> Iterator[Path]:
    """Yield a hidden temporary path next to ``dest``; rename it onto ``dest`` once complete.

    The temporary file (``.NAME.XXXX.part`` in the destination folder, so the rename stays on one
    file system) is flushed to disk, then moved into place with :func:`os.replace`, which is
    atomic: readers see the earlier file or the complete new one, never a part. On any error or
    interruption (KeyboardInterrupt, the SIGTERM handler's exception) the temporary file is
    removed and an earlier ``dest`` is left as it was. Only SIGKILL can leave the ``.part`` file.
    """
    with tempfile.NamedTemporaryFile(
        dir=dest.parent, prefix=f".{dest.name}.", suffix=".part", delete=False
    ) as handle:
        tmp = Path(handle.name)
    try:
        yield tmp
        _fsync(tmp)
        os.chmod(tmp, _new_file_mode(dest))
        os.replace(tmp, dest)
    except BaseException:
        with contextlib.suppress(OSError):
            tmp.unlink()
        raise
    if os.name == "posix":  # make the rename itself durable
        with contextlib.suppress(OSError):
            _fsync(dest.parent)


def write_table(df: Any, tmp: Path, kind: str, codec: Optional[str]) -> None:
    """Write ``df`` to ``tmp`` in slices of ``ROWS_PER_WRITE`` rows (signals are seen between)."""
    import pandas as pd

    keep_index = not isinstance(df.index, pd.RangeIndex)
    try:
        pa: Any = need_pyarrow("writing Parquet" if kind == "parquet" else "the CSV writer")
    except ImportError:
        if kind == "parquet":
            raise
        pa = None  # pandas writes the CSV (and compresses it) on its own
    if pa is None or (codec is not None and not pa.Codec.is_available(codec)):
        df.to_csv(tmp, index=keep_index, compression=codec, chunksize=ROWS_PER_WRITE)
        return
    if kind == "parquet":
        import pyarrow.parquet as pq

        table = pa.Table.from_pandas(df, preserve_index=keep_index)
        with pq.ParquetWriter(tmp, table.schema) as writer:
            for start in range(0, table.num_rows, ROWS_PER_WRITE):
                writer.write_table(table.slice(start, ROWS_PER_WRITE))
        return
    import pyarrow.csv as pacsv

    table = pa.Table.from_pandas(df.reset_index() if keep_index else df, preserve_index=False)
    path = str(tmp)
    sink = pa.OSFile(path, "wb") if codec is None else pa.CompressedOutputStream(path, codec)
    with sink, pacsv.CSVWriter(sink, table.schema) as writer:
        for start in range(0, table.num_rows, ROWS_PER_WRITE):
            writer.write_table(table.slice(start, ROWS_PER_WRITE))


def write_output(df: Any, path: Path, option: str) -> None:
    """Write ``df`` to ``path`` atomically (see :func:`atomic`); ``option`` names it in errors."""
    kind = format_of(path, option)
    dest = destination(path)
    try:
        with atomic(dest) as tmp:
            write_table(df, tmp, kind, _codec(dest))
    except OSError as err:
        raise WriteError(f"{option} {str(path)!r}: cannot write: {err.strerror or err}") from err


def _is_text(s: Any) -> bool:
    import pandas as pd

    return bool(pd.api.types.is_object_dtype(s.dtype) or pd.api.types.is_string_dtype(s.dtype))


def _first_bad(df: Any, column: str, bad: np.ndarray, what: str) -> UsageError:
    """Return the error naming the first cell of ``column`` flagged in ``bad`` (rows from 0)."""
    i = int(np.argmax(bad))
    value = df[column].iloc[i]
    return UsageError(
        f"column {column!r}, row {df.index[i]!r}: cannot read {_shown(value)} as {what}"
    )


def parse_numbers(df: Any, columns: Sequence[str]) -> Any:
    """Return ``df`` with text columns among ``columns`` read as numbers; a bad cell is named.

    A CSV column holding numbers and one stray word comes back as text; the accessor would only
    say the column is not numeric. Empty cells stay missing (the accessor flags those rows).
    """
    import pandas as pd

    converted = {}
    for column in dict.fromkeys(columns):  # a handful of columns, not rows
        if column not in df.columns or not _is_text(df[column]):
            continue
        s = df[column]
        values = pd.to_numeric(s, errors="coerce")
        bad = values.isna().to_numpy() & s.notna().to_numpy()
        if bad.any():
            raise _first_bad(df, column, bad, "a number")
        converted[column] = values.astype(np.float64)
    return df.assign(**converted) if converted else df


def parse_times(df: Any, column: str) -> Any:
    """Return ``df`` with a text time column read as numbers or ISO 8601 times; name a bad cell.

    A text column is read as ISO 8601 times; when that fails, as whichever of numbers or times
    more of its cells are, and the first cell that is not one is reported.
    """
    import pandas as pd

    if column not in df.columns or not _is_text(df[column]):
        return df
    s = df[column]
    try:
        return df.assign(**{column: pd.to_datetime(s, format="ISO8601", utc=True)})
    except (ValueError, TypeError):
        pass
    present = s.notna().to_numpy()
    numbers = pd.to_numeric(s, errors="coerce")
    stamps = pd.to_datetime(s, format="ISO8601", utc=True, errors="coerce")
    if int(numbers.notna().sum()) > int(stamps.notna().sum()):
        bad = present & numbers.isna().to_numpy()
        if bad.any():
            raise _first_bad(df, column, bad, "a number of seconds (the column holds numbers)")
        return df.assign(**{column: numbers.astype(np.float64)})
    bad = present & stamps.isna().to_numpy()
    if not bad.any():
        return df.assign(**{column: stamps})
    err = _first_bad(df, column, bad, "a time")
    raise UsageError(f"{err} (use numbers of seconds or ISO 8601)")

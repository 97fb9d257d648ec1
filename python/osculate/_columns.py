"""Columns of a caller's DataFrame by name, with the errors the accessor and the CLI share.

pandas is imported only inside the functions, which are handed a DataFrame (so it is imported
already): importing this module costs nothing.
"""

from __future__ import annotations

from collections.abc import Hashable
from typing import Any, Optional

from . import _core

__all__ = ["column_values", "input_error"]


def input_error(message: str, argument: str, row: Optional[int] = None, label: Any = None) -> Any:
    """Return an :class:`osculate.InputError` carrying the argument, row and track label."""
    err = _core.InputError(message)
    err.argument, err.track, err.row, err.detail = argument, None, row, message
    setattr(err, "label", label)  # noqa: B010  (InputError has no declared `label`)
    return err


def column_values(df: Any, name: Hashable, role: str) -> Any:
    """Return column ``name`` of ``df``, or the index level of that name (errors name the role).

    Parameters
    ----------
    df : pandas.DataFrame
        The caller's frame.
    name : hashable
        A column name, or the name of an index level.
    role : str
        The argument the column is for ("time", "position", "by"), named in errors.

    Returns
    -------
    pandas.Series
        The column (an index level comes back as a Series on the frame's index).

    Raises
    ------
    osculate.InputError
        No such column or index level (the message lists the first 20 columns), or a column
        name that appears more than once.

    Examples
    --------
    >>> import pandas as pd
    >>> from osculate._columns import column_values
    >>> df = pd.DataFrame({"t": [0.0, 1.0], "x": [1.0, 2.0]}).set_index("t")
    >>> column_values(df, "t", "time").tolist()
    [0.0, 1.0]
    >>> column_values(df, "y", "position")
    Traceback (most recent call last):
    ...
    osculate.InputError: position: column 'y' not found (columns: 'x')
    """
    import pandas as pd  # the caller passed a DataFrame: pandas is imported already

    if name in df.columns:
        col = df[name]
        if isinstance(col, pd.DataFrame):
            raise input_error(f"{role}: column {name!r} appears {col.shape[1]} times", str(name))
        return col
    if name is not None and name in df.index.names:
        return pd.Series(df.index.get_level_values(name), index=df.index)
    shown = ", ".join(repr(c) for c in list(df.columns)[:20])
    more = ", ..." if len(df.columns) > 20 else ""
    raise input_error(
        f"{role}: column {name!r} not found (columns: {shown}{more})", str(name), None
    )

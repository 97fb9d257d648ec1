"""osculate._columns: a frame's columns by name, with the accessor's own errors.

The command line checks the columns it needs before the accessor runs: its messages must be the
accessor's, word for word.
"""

import doctest

import numpy as np
import osculate as osc
import pytest
from osculate import _columns
from osculate._columns import column_values

pd = pytest.importorskip("pandas")


def frame():
    t = np.linspace(0.0, 5.0, 11)
    return pd.DataFrame({"t": t, "x": np.cos(t), "y": np.sin(t), "car": "a"})


def accessor_error(df, **where):
    spec = {"time": "t", "position": ["x", "y"], **where}
    with pytest.raises(osc.InputError) as info:
        df.osc.kinematics(**spec)
    return str(info.value)


@pytest.mark.parametrize(
    "role, name, where",
    [
        ("time", "when", {"time": "when"}),
        ("position", "z", {"position": ["x", "z"]}),
        ("by", "vehicle", {"by": "vehicle"}),
    ],
)
def test_missing_column_message_is_the_accessors(role, name, where):
    df = frame()
    with pytest.raises(osc.InputError) as info:
        column_values(df, name, role)
    assert str(info.value) == accessor_error(df, **where)
    assert info.value.argument == name and info.value.row is None


def test_repeated_column_message_is_the_accessors():
    df = frame()
    df = pd.concat([df, df[["x"]]], axis=1)  # two columns named "x"
    with pytest.raises(osc.InputError) as info:
        column_values(df, "x", "position")
    assert str(info.value) == "position: column 'x' appears 2 times"
    assert str(info.value) == accessor_error(df)


def test_index_levels_and_long_column_lists():
    df = frame().set_index(["car", "t"])
    got = column_values(df, "t", "time")
    assert isinstance(got, pd.Series) and got.index.equals(df.index)
    np.testing.assert_array_equal(got.to_numpy(), df.index.get_level_values("t"))
    wide = pd.DataFrame({f"c{i}": [0.0] for i in range(25)})
    with pytest.raises(osc.InputError, match=r"'c19', \.\.\.\)$"):
        column_values(wide, "t", "time")


def test_docstring_examples():
    result = doctest.testmod(_columns, optionflags=doctest.ELLIPSIS)
    assert result.attempted > 0 and result.failed == 0

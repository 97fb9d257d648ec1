"""`import osculate` leaves pandas alone; DataFrame.osc is there whenever pandas is imported.

Each case runs in a fresh interpreter: which modules an import pulls in is process-wide state.
"""

import subprocess
import sys
import textwrap

import pytest

# A unit circle at unit speed: curvature 1 (closed form), checked to 1e-3 (the fd estimate of
# 400 samples per turn is far closer; the check only shows the accessor computed something real).
CIRCLE = """
import numpy as np
t = np.linspace(0.0, 2 * np.pi, 401)
df = pd.DataFrame({"t": t, "x": np.cos(t), "y": np.sin(t)})
kappa = df.osc.kinematics(time="t", position=["x", "y"])["curvature"].to_numpy()
assert abs(float(np.median(kappa)) - 1.0) < 1e-3, np.median(kappa)
"""


def run(*parts):
    code = "\n".join(textwrap.dedent(p) for p in parts)
    res = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120)
    assert res.returncode == 0, res.stderr
    return res.stdout.split()


def test_import_osculate_does_not_import_pandas():
    out = run(
        """
        import sys
        import osculate as osc
        k = osc.kinematics([0.0, 1.0, 2.0], [[0, 0], [1, 1], [2, 4]])
        print("pandas" in sys.modules, type(sys.meta_path[0]).__name__)
        """
    )
    assert out == ["False", "AfterPandas"]


def test_pandas_imported_after_osculate_has_the_accessor():
    out = run(
        """
        import sys
        import osculate
        import pandas as pd
        """,
        CIRCLE,
        """
        from osculate._pandas_hook import AfterPandas
        hooks = [f for f in sys.meta_path if isinstance(f, AfterPandas)]
        # pandas keeps its own loader; the one-shot finder is gone.
        print(len(hooks), type(pd.__loader__).__name__, pd.__spec__.loader is pd.__loader__)
        """,
    )
    assert out == ["0", "SourceFileLoader", "True"]


def test_pandas_imported_before_osculate_has_the_accessor():
    out = run(
        """
        import sys
        import pandas as pd
        import osculate
        """,
        CIRCLE,
        """
        from osculate._pandas_hook import AfterPandas
        print(sum(isinstance(f, AfterPandas) for f in sys.meta_path))
        """,
    )
    assert out == ["0"]


@pytest.mark.parametrize("first", ["osculate.dask", "osculate.accessor"])
def test_modules_that_import_pandas_themselves(first):
    # The accessor module imports pandas while the hook is waiting: it is registered once.
    pytest.importorskip("dask")
    out = run(
        f"""
        import osculate
        import {first}
        import pandas as pd
        """,
        CIRCLE,
        """
        print("ok")
        """,
    )
    assert out == ["ok"]


def test_without_pandas_the_numpy_api_works():
    out = run(
        """
        import sys
        sys.modules["pandas"] = None  # pandas not installed
        import osculate as osc
        k = osc.kinematics([0.0, 1.0, 2.0], [[0, 0], [1, 1], [2, 4]])
        try:
            import pandas
        except ImportError:
            print(k.speed.shape[0], "no-pandas")
        """
    )
    assert out == ["3", "no-pandas"]


def test_a_failed_registration_warns_and_leaves_pandas_imported():
    # The accessor cannot be imported (None in sys.modules): `import pandas` still succeeds and
    # a RuntimeWarning names the cause.
    out = run(
        """
        import sys, warnings
        import osculate
        sys.modules["osculate.accessor"] = None
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always")
            import pandas as pd
        print(pd.DataFrame({"a": [1]}).shape[0], hasattr(pd.DataFrame, "osc"))
        print([w.category.__name__ for w in caught])
        print("osc accessor could not be registered" in str(caught[0].message).replace(".", " "))
        """
    )
    assert out == ["1", "False", "['RuntimeWarning']", "True"]


def test_a_failed_pandas_import_keeps_the_hook_for_the_next_attempt(tmp_path):
    # A stand-in pandas on the path fails while a flag file exists, then imports: the hook
    # stays through the failure and goes after the success (the stand-in has no accessor API,
    # so the registration warns; that is the previous test's path).
    fake = tmp_path / "pandas"
    fake.mkdir()
    flag = tmp_path / "fail"
    flag.write_text("")
    (fake / "__init__.py").write_text(
        f"import os\nif os.path.exists({str(flag)!r}):\n    raise RuntimeError('half installed')\n"
    )
    out = run(
        f"""
        import os, sys, warnings
        sys.path.insert(0, {str(tmp_path)!r})
        import osculate
        from osculate._pandas_hook import AfterPandas
        def hooks():
            return sum(isinstance(f, AfterPandas) for f in sys.meta_path)
        try:
            import pandas
        except RuntimeError:
            print("failed", hooks(), "pandas" in sys.modules)
        os.remove({str(flag)!r})
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always")
            import pandas
        print("imported", hooks(), [w.category.__name__ for w in caught])
        """
    )
    assert out == ["failed", "1", "False", "imported", "0", "['RuntimeWarning']"]


def test_the_finder_answers_for_pandas_only():
    from osculate._pandas_hook import AfterPandas

    finder = AfterPandas()
    assert finder.find_spec("numpy", None) is None
    assert finder.find_spec("pandas.core", None) is None  # submodules load as usual

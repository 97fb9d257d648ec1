"""Register the ``DataFrame.osc`` accessor without importing pandas.

``import osculate`` must stay light: pandas takes about half a second to import and many callers
(NumPy arrays in, NumPy arrays out) never touch it. The accessor lives in :mod:`osculate.accessor`,
which imports pandas, so :func:`install` registers it in one of two ways:

- pandas is already imported: import the accessor module now (its class decorator registers it);
- otherwise: put a one-shot finder at the front of :data:`sys.meta_path`. When pandas is first
  imported, the finder hands the import to the finders behind it, and its loader runs pandas'
  own loader, then imports the accessor module and takes the finder out of ``sys.meta_path``.
  Nothing is imported, and nothing else about the import changes: the module's ``__loader__``
  and ``__spec__.loader`` are pandas' own again once it has run.

A failure to register (a broken or too old pandas, say) must not break the caller's
``import pandas``: it is reported as a :class:`RuntimeWarning` naming the cause.
"""

from __future__ import annotations

import importlib
import importlib.abc
import sys
import threading
import types
import warnings
from collections.abc import Sequence
from importlib.machinery import ModuleSpec
from typing import Any, Optional

__all__ = ["AfterPandas", "install", "register"]

PANDAS = "pandas"


def register() -> None:
    """Import :mod:`osculate.accessor`, which registers ``DataFrame.osc`` (pandas imported)."""
    try:
        importlib.import_module("osculate.accessor")
    except Exception as exc:  # the caller's `import pandas` must not fail because of us
        warnings.warn(
            f"osculate: the DataFrame.osc accessor could not be registered: {exc}",
            RuntimeWarning,
            stacklevel=2,
        )


class _Loader(importlib.abc.Loader):
    """Pandas' own loader, then :func:`register`; every other attribute is the real loader's."""

    def __init__(self, real: Any, hook: AfterPandas) -> None:
        self._real = real
        self._hook = hook

    def __getattr__(self, name: str) -> Any:
        return getattr(self._real, name)

    def create_module(self, spec: ModuleSpec) -> Optional[types.ModuleType]:
        return self._real.create_module(spec)

    def exec_module(self, module: types.ModuleType) -> None:
        # Pandas' import sees its own loader, as without the hook.
        module.__loader__ = self._real
        if module.__spec__ is not None:
            module.__spec__.loader = self._real
        self._real.exec_module(module)  # an error here leaves the hook for the next attempt
        self._hook.remove()
        register()


class AfterPandas(importlib.abc.MetaPathFinder):
    """A :data:`sys.meta_path` finder that registers the accessor once pandas has been imported.

    It finds nothing itself: for ``pandas`` it asks the finders behind it and wraps the loader
    of the spec they return; for any other name it returns None at once.
    """

    def __init__(self) -> None:
        self._lock = threading.Lock()

    def find_spec(
        self,
        fullname: str,
        path: Optional[Sequence[str]],
        target: Optional[types.ModuleType] = None,
    ) -> Optional[ModuleSpec]:
        """Return pandas' spec with its loader wrapped; None for every other module."""
        if fullname != PANDAS:
            return None
        for finder in list(sys.meta_path):  # a handful of finders
            if finder is self or not hasattr(finder, "find_spec"):
                continue
            spec = finder.find_spec(fullname, path, target)
            if spec is not None:
                if spec.loader is not None and hasattr(spec.loader, "exec_module"):
                    spec.loader = _Loader(spec.loader, self)
                return spec
        return None

    def remove(self) -> None:
        """Take this finder out of :data:`sys.meta_path` (no error if it is not there)."""
        with self._lock:
            try:
                sys.meta_path.remove(self)
            except ValueError:
                pass


def install() -> None:
    """Register the accessor now if pandas is imported, else when it is (see the module notes)."""
    if sys.modules.get(PANDAS) is not None:
        register()
    elif not any(isinstance(f, AfterPandas) for f in sys.meta_path):
        sys.meta_path.insert(0, AfterPandas())

"""numba's on-disk cache, keyed on every source file the compiled code is built from.

numba's ``cache=True`` keys a cached function on its own file's time stamp and its own
bytecode, not on the functions it calls from other files: numba links a callee's machine code
into the caller's, so after an edit of :mod:`workbench.core.elastic.boundaries` or
:mod:`workbench.core.friction` the march loaded its old machine code from the cache, with
the old boundary code inside it, while the numpy kernel ran the new code (seen: the
compiled kernel kept a surge peak of 334.6 m after an edit that made it 278.1 m on numpy).
Here each cache entry's key also carries a SHA-256 of those files, so an edit of any of them
compiles afresh, and an unchanged checkout loads what it compiled before.

The cache lives where numba puts it: ``__pycache__`` beside the source when that folder is
writable, else the user's cache folder (``~/.cache/numba`` or ``$NUMBA_CACHE_DIR``), so a
read-only install caches too. This module imports numba; only the compiled kernel imports it.
"""

from __future__ import annotations

import hashlib
from pathlib import Path
from types import ModuleType

import numba

try:  # numba's own cache class; its key method is not public API, so guard the use of it
    from numba.core.caching import FunctionCache
except ImportError:  # pragma: no cover - a numba without it: compile in every process
    FunctionCache = None


def sources_digest(*modules: ModuleType) -> str:
    """SHA-256 (hex) of the source files of ``modules``, in the order given."""
    digest = hashlib.sha256()
    for module in modules:
        digest.update(Path(module.__file__).read_bytes())
    return digest.hexdigest()


def _keyed_cache_class(digest: str):
    class KeyedCache(FunctionCache):
        """numba's function cache with ``digest`` in every entry's key."""

        def _index_key(self, sig, codegen):
            return (super()._index_key(sig, codegen), digest)

    return KeyedCache


def cached_jit(*sources: ModuleType):
    """A decorator: ``numba.njit(nogil=True)`` cached on disk under a key that includes the
    source files of ``sources`` (every module whose code the compiled functions take in).

    Without numba's cache class (a numba that moved it) the functions compile in each
    process instead: slower to start, never stale.
    """
    index_key = getattr(FunctionCache, "_index_key", None)
    if index_key is None:
        return numba.njit(nogil=True)
    cache_class = _keyed_cache_class(sources_digest(*sources))

    def decorate(func):
        dispatcher = numba.njit(cache=True, nogil=True)(func)
        dispatcher._cache = cache_class(func)
        return dispatcher

    return decorate

"""numba's on-disk cache of the compiled kernel (workbench.core.elastic.jit_cache).

The check is numba's own behaviour, run here in fresh processes on two small modules of our
own: a function compiled with plain ``cache=True`` that calls a function of another file
keeps its cached machine code after that file is edited (numba keys an entry on the
function's own file and bytecode, numba documentation, "Cache invalidation", from memory),
while :func:`cached_jit` compiles afresh, and loads from the cache when nothing changed.
"""

from __future__ import annotations

import os
import subprocess
import sys
import textwrap

import pytest

from workbench.core.elastic import kernel as elastic_kernel

pytestmark = pytest.mark.skipif(not elastic_kernel.numba_installed(),
                                reason="numba is not installed here")

CALLER = textwrap.dedent("""
    import sys

    import numba

    import dep
    from workbench.core.elastic.jit_cache import cached_jit

    plain_inner = numba.njit(cache=True)(dep.inner)
    keyed_inner = cached_jit(dep)(dep.inner)


    @numba.njit(cache=True)
    def plain(x):
        return plain_inner(x)


    @cached_jit(sys.modules[__name__], dep)
    def keyed(x):
        return keyed_inner(x)


    @cached_jit(sys.modules[__name__])
    def unchanged(x):
        return 2.0 * x


    def hits(dispatcher):
        return sum(dispatcher.stats.cache_hits.values())


    print(plain(1.0), keyed(1.0), hits(keyed), unchanged(1.0), hits(unchanged))
""")


def _run(folder) -> list[str]:
    env = dict(os.environ, NUMBA_CACHE_DIR=str(folder / "cache"), PYTHONPATH=str(folder))
    return subprocess.run([sys.executable, str(folder / "caller.py")], capture_output=True,
                          text=True, check=True, env=env, cwd=folder).stdout.split()


def test_an_edit_of_a_called_module_compiles_afresh_and_no_edit_loads_the_cache(tmp_path):
    (tmp_path / "caller.py").write_text(CALLER)
    dep = tmp_path / "dep.py"
    dep.write_text("def inner(x):\n    return x + 1.0\n")
    # first run: everything compiled, nothing in the cache yet
    assert _run(tmp_path) == ["2.0", "2.0", "0", "2.0", "0"]
    dep.write_text("def inner(x):\n    return x + 20.0\n")
    plain, keyed, keyed_hits, unchanged, unchanged_hits = _run(tmp_path)
    assert plain == "2.0"  # numba's own key: the caller's old machine code, stale
    assert (keyed, keyed_hits) == ("21.0", "0")  # ours: the edit is seen, compiled again
    assert (unchanged, unchanged_hits) == ("2.0", "1")  # nothing it uses changed: loaded


def test_the_kernel_is_keyed_on_its_boundary_and_friction_sources():
    compiled = pytest.importorskip("workbench.core.elastic.compiled")
    from workbench.core import friction
    from workbench.core.elastic import boundaries, jit_cache

    digest = jit_cache.sources_digest(compiled, boundaries, friction)
    for dispatcher in (compiled.march, compiled.fixed_end, compiled.friction_re_product_scalar):
        key = dispatcher._cache._index_key(dispatcher.signatures[0] if dispatcher.signatures
                                           else (), dispatcher.targetctx.codegen())
        assert key[-1] == digest

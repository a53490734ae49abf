"""Fixtures shared by the core tests."""

from __future__ import annotations

import pytest


@pytest.fixture(params=["numpy", "compiled"])
def kernel(request, monkeypatch):
    """Run a check on both time-stepping kernels (workbench.core.elastic.kernel): a module
    asks for it with ``pytestmark = pytest.mark.usefixtures("kernel")``."""
    monkeypatch.setenv("WORKBENCH_KERNEL", request.param)
    return request.param

"""The ``simulate --json`` object's additions from other models: the elastic surge results
under ``surge.ID.elastic`` and their findings among the warnings.

Used by the ``simulate`` command and by the sweep runner, so it lives in the output layer
(the runner must not import a front end). Heavy modules are imported when results exist.
"""

from __future__ import annotations

__all__ = ["ELASTIC_SERIES", "add_elastic_json", "drop_elastic_series"]

#: Keys of the ``surge.ID.elastic`` object that are time series.
ELASTIC_SERIES = ("time_s", "valve_pressure_pa", "midline_pressure_pa")


def add_elastic_json(out: dict, results: dict) -> dict:
    """Add ``surge.ID.elastic`` objects and the elastic findings to a simulate JSON object.

    ``results`` maps line id to :class:`workbench.core.elastic.ElasticResult`; the transient
    keys already in ``out`` are left as they are. Returns ``out``.
    """
    if not results:
        return out
    from workbench.output.elastic import elastic_findings, elastic_to_json

    surge = out.setdefault("surge", {})
    for lid, obj in elastic_to_json(results).items():
        surge.setdefault(lid, {})["elastic"] = obj
    out.setdefault("warnings", []).extend(elastic_findings(results))
    return out


def drop_elastic_series(out: dict) -> dict:
    """Remove the time series (:data:`ELASTIC_SERIES`) from every ``surge.ID.elastic``
    object of a simulate JSON object, as the transient's own series are left out of a
    sweep. Returns ``out``."""
    for entry in out.get("surge", {}).values():
        elastic = entry.get("elastic") if isinstance(entry, dict) else None
        if isinstance(elastic, dict):
            for key in ELASTIC_SERIES:
                elastic.pop(key, None)
    return out

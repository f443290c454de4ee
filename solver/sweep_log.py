"""The points of a sweep written as they finish (``sweep_points.jsonl`` in the output folder, a
:class:`~solver.study_log.StudyLog`), so that an interrupted sweep run again into the same
folder solves only the points the log lacks (:func:`solver.sweep.run_sweep` ``done``). Each
line holds one point's outcome and its converged stage profile, or a network's unknowns in SI
(the neighbour of a warm start when the study resumes). The study is the case as read, the varied keys with their values and
whether points start warm. A point whose worker died ("internal error") is not kept, so that it
is solved again, nor one that is not a valid case ("bad input"), which the sweep finds anew.
"""

from __future__ import annotations

import os
from typing import Any, Mapping, Sequence

import numpy as np

from .network_unknowns import NetworkStart
from .streams import StageProfile
from .study_log import StudyLog, fingerprint
from .sweep import PointOutcome, Variation, sweep_points

__all__ = ["LOG_NAME", "PointLog", "sweep_fingerprint"]

#: The log's file name in the output folder.
LOG_NAME = "sweep_points.jsonl"

_NUMBERS = ("iterations", "residual_norm", "condenser_duty", "reboiler_duty", "reflux_ratio", "boilup_ratio")
_PROFILE = ("temperature", "pressure", "liquid_flow", "vapor_flow", "x", "y")
_NETWORK_PROFILE = ("temperature", "liquid", "vapor")


def _profile_record(profile: StageProfile | NetworkStart | None) -> dict[str, Any] | None:
    if profile is None:
        return None
    if isinstance(profile, NetworkStart):
        return {"network": True, **{name: np.asarray(getattr(profile, name)).tolist() for name in _NETWORK_PROFILE},
                "duties": dict(profile.duties), "rates": dict(profile.rates)}
    return {name: np.asarray(getattr(profile, name)).tolist() for name in _PROFILE}


def _profile(record: dict | None) -> StageProfile | NetworkStart | None:
    if record is None:
        return None
    if record.get("network"):
        return NetworkStart(*(np.asarray(record[name], dtype=float) for name in _NETWORK_PROFILE),
                            {k: float(v) for k, v in record["duties"].items()}, {k: float(v) for k, v in record["rates"].items()})
    return StageProfile(*(np.asarray(record[name], dtype=float) for name in _PROFILE))


def sweep_fingerprint(document: Mapping, variations: Sequence[Variation], warm: bool) -> str:
    """What a point's outcome depends on besides its index."""
    return fingerprint({"case": document, "vary": [[v.key, list(v.values)] for v in variations], "warm": warm})


def _record(outcome: PointOutcome) -> dict[str, Any]:
    return {
        "point": outcome.index, "values": list(outcome.values), "status": outcome.status, "message": outcome.message,
        **{name: getattr(outcome, name) for name in _NUMBERS},
        "products": None if outcome.products is None else {
            name: [flow, list(composition)] for name, (flow, composition) in outcome.products.items()},
        "seconds": outcome.seconds, "diameters": None if outcome.diameters is None else dict(outcome.diameters),
        "warm_start": outcome.warm_start, "duties": None if outcome.duties is None else dict(outcome.duties),
        "profile": _profile_record(outcome.profile),
    }


def _outcome(record: dict, values: tuple) -> PointOutcome:
    duties = record.get("duties")
    return PointOutcome(
        index=int(record["point"]), values=values, status=str(record["status"]), message=str(record["message"]),
        **{name: record[name] for name in _NUMBERS},
        products=None if record["products"] is None else {
            name: (float(flow), tuple(float(x) for x in composition))
            for name, (flow, composition) in record["products"].items()},
        seconds=float(record["seconds"]),
        diameters=None if record["diameters"] is None else {k: float(v) for k, v in record["diameters"].items()},
        warm_start=bool(record["warm_start"]),
        duties=None if duties is None else {k: float(v) for k, v in duties.items()},
        profile=_profile(record["profile"]),
    )


class PointLog:
    """The log of one sweep at ``path``: :attr:`done` the points it already holds (by index),
    :meth:`append` each point as it finishes."""

    def __init__(self, path: str | os.PathLike, document: Mapping, variations: Sequence[Variation], warm: bool) -> None:
        points = sweep_points(variations)

        def read(record: dict) -> tuple[int, PointOutcome] | None:
            index = int(record["point"])
            if not 0 <= index < len(points) or tuple(record["values"]) != tuple(points[index]):
                return None
            return index, _outcome(record, tuple(points[index]))

        self._log = StudyLog(path, sweep_fingerprint(document, variations, warm), read)
        self.path, self.done = self._log.path, self._log.done

    def append(self, outcome: PointOutcome) -> None:
        if outcome.status not in ("internal error", "bad input"):
            self._log.append(outcome.index, _record(outcome))

    def close(self) -> None:
        self._log.close()

"""The Result of a column simulation and its writers (JSON schema "traystack-result/1", CSV).

All writes are atomic: the file is written under a temporary name in the same folder and moved
over the target with :func:`os.replace`, so an interrupted run leaves the previous file intact.

Stream conventions of every result: ``L`` and ``V`` are the liquid and vapor flows leaving a
stage for its neighbours, side draws excluded (``liquid_draw`` / ``vapor_draw``). On a total
condenser ``L`` is the reflux, ``V`` is 0 and the distillate is the ``liquid_draw``; on a
partial condenser (or a top stage without condenser) ``V`` is the vapor overhead product; on
a partial reboiler (or the bottom stage) ``L`` is the bottoms product. A duty is the heat added
to the stage (a condenser's is negative).

Later steps attach typed findings to a result (``Result.extra``: the shortcut designs, the
audit); each is a :class:`ResultSection`, turned into plain data only when the JSON is written.
"""

from __future__ import annotations

import csv
import dataclasses
import io
import json
import math
import os
import tempfile
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Mapping, Protocol, Sequence

import numpy as np

from .case import Spec, StageDuty, molar_mass_of
from .streams import FlashedFeed
from .thermo.liquid_split import LiquidSplitCheck

__all__ = [
    "SCHEMA",
    "UNITS",
    "Result",
    "ResultSection",
    "json_safe",
    "stages_csv_text",
    "write_atomic",
    "write_result_json",
    "write_stages_csv",
    "case_summary",
]

SCHEMA = "traystack-result/1"
UNITS = {
    "temperature": "K",
    "pressure": "Pa",
    "flow": "mol/s",
    "duty": "W",
    "enthalpy": "J/mol",
    "composition": "mole fraction",
}


def case_summary(case) -> dict[str, Any]:
    """The normalized case (SI) as plain data, for the result file."""

    def plain(value: Any) -> Any:
        if dataclasses.is_dataclass(value):
            return {f.name: plain(getattr(value, f.name)) for f in dataclasses.fields(value) if f.name != "raw"}
        if isinstance(value, dict) or hasattr(value, "items"):
            return {str(k): plain(v) for k, v in value.items()}
        if isinstance(value, (list, tuple)):
            return [plain(v) for v in value]
        return value

    return plain(case)


@dataclass(frozen=True)
class Result:
    """A rigorous column solution (SI units). Arrays are stage-major, top stage first."""

    title: str
    case: Mapping[str, Any]
    converged: bool
    iterations: int
    residual_norm: float
    message: str
    components: tuple[str, ...]
    roles: tuple[str, ...]
    temperature: np.ndarray  # (N,) K
    pressure: np.ndarray  # (N,) Pa
    liquid_flow: np.ndarray  # (N,) mol/s, the L slot
    vapor_flow: np.ndarray  # (N,) mol/s, the engine's V slot: on a total condenser it holds the liquid distillate;
    # everything shown (stage_records, result.json, stages.csv, tables, the audit) has V = 0 there instead
    x: np.ndarray  # (N, c)
    y: np.ndarray  # (N, c), composition of the vapor slot (of the liquid distillate, for a total condenser)
    K: np.ndarray  # (N, c)
    h_liquid: np.ndarray  # (N,) J/mol
    h_vapor: np.ndarray  # (N,) J/mol (liquid distillate's, for a total condenser)
    efficiency: np.ndarray  # (N,)
    liquid_draw: np.ndarray  # (N,) mol/s side draws of liquid
    vapor_draw: np.ndarray  # (N,) mol/s side draws of vapor
    duty: np.ndarray  # (N,) W
    stage_feeds: tuple[tuple[FlashedFeed, ...], ...]
    condenser: str  # total | partial | none
    reboiler: str  # partial | none
    thermo: Mapping[str, Any]
    iteration_log: tuple[Mapping[str, float], ...]
    enthalpy_model: str = "rigorous"
    post_check: Mapping[str, float] = field(default_factory=dict)
    strategy: Mapping[str, Any] = field(default_factory=dict)  # which rung of the fallback chain solved it
    extra: Mapping[str, ResultSection] = field(default_factory=dict)  # "shortcut", "audit": added downstream
    liquid_split: LiquidSplitCheck | None = None  # every stage's liquid tested for two liquid phases

    @property
    def stage_count(self) -> int:
        return len(self.temperature)

    # ------------------------------------------------------------------ in a notebook
    def summary_lines(self) -> list[str]:
        """A few lines: how the solve ended, the duties and ratios, each product (°C, kmol/h,
        kW). The repr of a Result, and the HTML repr's content."""
        if self.converged:
            how = self.strategy.get("rung") if isinstance(self.strategy, Mapping) else None
            status = f"converged in {self.iterations} Newton iterations" + (f" ({how})" if how else "")
        else:
            status = f"NOT converged after {self.iterations} iterations: {self.message}"
        lines = [f"{self.title or 'column'}: {status}"]
        numbers = []
        if self.condenser_duty is not None:
            numbers.append(f"condenser {self.condenser_duty / 1e3:.5g} kW")
        if self.reboiler_duty is not None:
            numbers.append(f"reboiler {self.reboiler_duty / 1e3:.5g} kW")
        if self.reflux_ratio is not None:
            numbers.append(f"reflux ratio {self.reflux_ratio:.4g}")
        if self.boilup_ratio is not None:
            numbers.append(f"boilup ratio {self.boilup_ratio:.4g}")
        lines.append(f"{self.stage_count} stages; " + ", ".join(numbers))
        for name, product in self.products().items():
            parts = ", ".join(f"{c} {x:.4g}" for c, x in zip(self.components, product["composition"]))
            lines.append(f"{name.replace('_', ' ')}: {product['flow'] * 3.6:.5g} kmol/h at "
                         f"{product['T'] - 273.15:.2f} °C; {parts}")
        return lines

    def __repr__(self) -> str:
        return "<Result " + "\n  ".join(self.summary_lines()) + ">"

    def _repr_html_(self) -> str:
        """Jupyter's view: the summary lines as a small table."""
        import html

        head, *rest = self.summary_lines()
        colour = "" if self.converged else ' style="color:#b00"'
        rows = "".join(f"<tr><td style='text-align:left'>{html.escape(line)}</td></tr>" for line in rest)
        return f"<div><b{colour}>{html.escape(head)}</b><table>{rows}</table></div>"

    # ------------------------------------------------------------------ products
    @property
    def distillate_flow(self) -> float:
        return float(self.vapor_flow[0])

    @property
    def distillate_composition(self) -> np.ndarray:
        return self.y[0]

    @property
    def bottoms_flow(self) -> float:
        return float(self.liquid_flow[-1])

    @property
    def bottoms_composition(self) -> np.ndarray:
        return self.x[-1]

    @property
    def condenser_duty(self) -> float | None:
        return float(self.duty[0]) if self.condenser != "none" else None

    @property
    def reboiler_duty(self) -> float | None:
        return float(self.duty[-1]) if self.reboiler != "none" else None

    @property
    def reflux_ratio(self) -> float | None:
        if self.condenser == "none" or self.distillate_flow <= 0:
            return None
        return float(self.liquid_flow[0] / self.distillate_flow)

    @property
    def boilup_ratio(self) -> float | None:
        if self.reboiler == "none" or self.bottoms_flow <= 0:
            return None
        return float(self.vapor_flow[-1] / self.bottoms_flow)

    # ------------------------------------------------------------------ the case as recorded
    @property
    def specs(self) -> tuple[Spec, ...]:
        """The specifications of the case (SI), as ``case`` records them."""
        return tuple(Spec(**spec) for spec in self.case.get("specs", ()))

    @property
    def stage_duties(self) -> tuple[StageDuty, ...]:
        """The side heaters (duty > 0) and coolers of the case (W)."""
        return tuple(StageDuty(**duty) for duty in self.case.get("column", {}).get("stage_duties", ()))

    @property
    def reflux_temperature(self) -> float | None:
        """The temperature of a subcooled reflux the case specifies (K), if any."""
        return self.case.get("column", {}).get("reflux_temperature")

    @property
    def reflux_subcooling(self) -> float | None:
        """The subcooling of the reflux below its bubble point the case specifies (K), if any."""
        return self.case.get("column", {}).get("reflux_subcooling")

    @property
    def stated_efficiencies(self) -> np.ndarray:
        """The Murphree vapor efficiency of each stage as the case states it (the solved
        column's, ``efficiency``, when the case does not record them)."""
        return np.asarray(self.case.get("column", {}).get("efficiencies") or self.efficiency, dtype=float)

    @property
    def molar_masses(self) -> np.ndarray:
        """Molar mass [kg/mol] of each component (the case's component data, else CoolProp's)."""
        data = self.case.get("component_data", {})
        return np.array([data[name]["molar_mass"] if name in data else molar_mass_of(name) for name in self.components])

    @property
    def case_warnings(self) -> tuple[str, ...]:
        """The warnings the case reader gave."""
        return tuple(str(warning) for warning in self.case.get("warnings", ()))

    def balances(self) -> dict[str, float]:
        """Overall component and energy closure recomputed from the reported streams alone."""
        feed_in = np.zeros(len(self.components))
        energy_in = 0.0
        for feeds in self.stage_feeds:
            for feed in feeds:
                feed_in += feed.flow * np.asarray(feed.z)
                energy_in += feed.flow * feed.h
        out = self.distillate_flow * self.distillate_composition + self.bottoms_flow * self.bottoms_composition
        out = out + (self.liquid_draw[:, None] * self.x).sum(axis=0) + (self.vapor_draw[:, None] * self.y).sum(axis=0)
        scale = np.maximum(feed_in.sum(), 1e-300)
        component_closure = float(np.max(np.abs(feed_in - out)) / scale)
        energy_out = (
            self.distillate_flow * self.h_vapor[0]
            + self.bottoms_flow * self.h_liquid[-1]
            + float(self.liquid_draw @ self.h_liquid)
            + float(self.vapor_draw @ self.h_vapor)
        )
        duty_total = float(self.duty.sum())
        terms = abs(energy_in) + abs(energy_out) + float(np.abs(self.duty).sum())
        energy_closure = abs(energy_in + duty_total - energy_out) / max(terms, 1e-300)
        return {"component_closure_max": component_closure, "energy_closure_rel": float(energy_closure)}

    # ------------------------------------------------------------------ serialisation
    def stage_records(self) -> list[dict[str, Any]]:
        records = []
        total_condenser = self.condenser == "total"
        for j in range(self.stage_count):
            L = float(self.liquid_flow[j])
            V = float(self.vapor_flow[j])
            liquid_draw = float(self.liquid_draw[j])
            vapor_draw = float(self.vapor_draw[j])
            if j == 0 and total_condenser:
                liquid_draw += V  # the liquid distillate
                V = 0.0
            records.append(
                {
                    "number": j + 1,
                    "role": self.roles[j],
                    "T": float(self.temperature[j]),
                    "P": float(self.pressure[j]),
                    "L": L,
                    "V": V,
                    "x": self.x[j].tolist(),
                    "y": self.y[j].tolist(),
                    "K": self.K[j].tolist(),
                    "h_L": float(self.h_liquid[j]),
                    "h_V": float(self.h_vapor[j]),
                    "efficiency": float(self.efficiency[j]),
                    "feeds": [
                        {
                            "name": feed.name,
                            "flow": feed.flow,
                            "z": list(feed.z),
                            "h": feed.h,
                            "temperature": feed.temperature,
                            "pressure": feed.pressure,
                            "vapor_fraction": feed.vapor_fraction,
                            "q": feed.q,
                        }
                        for feed in self.stage_feeds[j]
                    ],
                    "liquid_draw": liquid_draw,
                    "vapor_draw": vapor_draw,
                    "duty": float(self.duty[j]),
                }
            )
        return records

    def products(self) -> dict[str, Any]:
        products = {
            "distillate": {
                "flow": self.distillate_flow,
                "composition": self.distillate_composition.tolist(),
                "T": float(self.temperature[0]),
                "phase": "liquid" if self.condenser == "total" else "vapor",
                "stage": 1,
            },
            "bottoms": {
                "flow": self.bottoms_flow,
                "composition": self.bottoms_composition.tolist(),
                "T": float(self.temperature[-1]),
                "phase": "liquid",
                "stage": self.stage_count,
            },
        }
        for j in np.flatnonzero(self.liquid_draw > 0):
            products[f"liquid_draw_stage_{j + 1}"] = {
                "flow": float(self.liquid_draw[j]), "composition": self.x[j].tolist(),
                "T": float(self.temperature[j]), "phase": "liquid", "stage": int(j + 1),
            }
        for j in np.flatnonzero(self.vapor_draw > 0):
            products[f"vapor_draw_stage_{j + 1}"] = {
                "flow": float(self.vapor_draw[j]), "composition": self.y[j].tolist(),
                "T": float(self.temperature[j]), "phase": "vapor", "stage": int(j + 1),
            }
        return products

    def to_dict(self) -> dict[str, Any]:
        return json_safe(
            {
                "schema": SCHEMA,
                "title": self.title,
                "case": self.case,
                "converged": bool(self.converged),
                "iterations": int(self.iterations),
                "residual_norm": float(self.residual_norm),
                "message": self.message,
                "components": list(self.components),
                "units": dict(UNITS),
                "conventions": {
                    "stages": "numbered from the top; condenser (if any) is stage 1, reboiler stage N",
                    "L_V": "flows leaving a stage for its neighbours, side draws excluded; total condenser: "
                    "L = reflux, V = 0, distillate in liquid_draw; partial condenser: V = vapor distillate; "
                    "reboiler: L = bottoms",
                    "top_stage_vapor": "the vapor leaving stage 1: 0 for a total condenser (the liquid distillate is "
                    "its liquid_draw), the vapor distillate for a partial condenser; the same in stages.csv, the stage "
                    "table and the audit's CMO table",
                    "duty": "heat added to the stage",
                    "equilibrium": "y_j = E_j K_j x_j + (1 - E_j) y_(j+1), K = gamma Psat / P",
                },
                "enthalpy_model": self.enthalpy_model,
                "stages": self.stage_records(),
                "products": self.products(),
                "duties": {"condenser": self.condenser_duty, "reboiler": self.reboiler_duty},
                "reflux_ratio": self.reflux_ratio,
                "boilup_ratio": self.boilup_ratio,
                "balances": self.balances(),
                "post_check": dict(self.post_check),
                "solution_strategy": dict(self.strategy),
                "liquid_stability": None if self.liquid_split is None else self.liquid_split.as_json(),
                "thermo": self.thermo,
                "iteration_log": [dict(entry) for entry in self.iteration_log],
                **{key: section.as_json() for key, section in self.extra.items()},
            }
        )

    def to_json(self) -> str:
        return json.dumps(self.to_dict(), indent=2, allow_nan=False)

    def stages_csv(self) -> str:
        return stages_csv_text(self.stage_records(), self.components)

    def with_extra(self, **sections: ResultSection) -> "Result":
        """This result with ``sections`` attached to ``extra`` (by key)."""
        return dataclasses.replace(self, extra={**self.extra, **sections})


class ResultSection(Protocol):
    """Typed findings a later step attaches to a result under a key of ``Result.extra`` (the
    shortcut designs, the audit); ``as_json()`` gives the plain data result.json holds under
    that key."""

    def as_json(self) -> Mapping[str, Any]: ...


def json_safe(value: Any) -> Any:
    """Plain JSON types; NaN and infinity become None (the schema never holds them)."""
    if isinstance(value, Mapping):
        return {str(key): json_safe(item) for key, item in value.items()}
    if isinstance(value, (list, tuple)):
        return [json_safe(item) for item in value]
    if isinstance(value, np.ndarray):
        return json_safe(value.tolist())
    if isinstance(value, (np.floating, float)):
        number = float(value)
        return number if math.isfinite(number) else None
    if isinstance(value, (np.integer,)):
        return int(value)
    if isinstance(value, np.bool_):
        return bool(value)
    return value


def _file_mode(target: Path) -> int:
    """The mode an ordinary new file would get (0o666 less the umask), or the existing file's."""
    try:
        return target.stat().st_mode & 0o777
    except FileNotFoundError:
        umask = os.umask(0)
        os.umask(umask)
        return 0o666 & ~umask


def write_atomic(path: str | os.PathLike, text: str | bytes) -> Path:
    """Write ``text`` to ``path`` atomically (temporary file in the same folder, then
    :func:`os.replace`)."""
    target = Path(path)
    target.parent.mkdir(parents=True, exist_ok=True)
    data = text.encode("utf-8") if isinstance(text, str) else text
    handle, temporary = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=target.parent)
    try:
        with os.fdopen(handle, "wb") as stream:
            stream.write(data)
            stream.flush()
            os.fsync(stream.fileno())
        os.chmod(temporary, _file_mode(target))
        os.replace(temporary, target)
    except BaseException:
        try:
            os.unlink(temporary)
        except FileNotFoundError:
            pass
        raise
    return target


def stages_csv_text(records: Sequence[Mapping[str, Any]], components: Sequence[str], *, leading: Sequence[str] = (),
                    trailing: Sequence[str] = ()) -> str:
    """The stage table as CSV: one row per stage record (see ``stage_records``), SI units in
    the headers; ``leading`` record keys come first (e.g. the column of a network's stage),
    ``trailing`` ones (flows, mol/s) after the draws."""
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    header = [*leading, "stage", "role", "T_K", "P_Pa", "L_mol_s", "V_mol_s", "liquid_draw_mol_s", "vapor_draw_mol_s",
              *[f"{key}_mol_s" for key in trailing], "duty_W", "h_L_J_mol", "h_V_J_mol"]
    header += [f"x_{name}" for name in components] + [f"y_{name}" for name in components]
    header += [f"K_{name}" for name in components]
    writer.writerow(header)
    for record in records:
        writer.writerow(
            [*[record[key] for key in leading], record["number"], record["role"], f"{record['T']:.6f}", f"{record['P']:.3f}",
             f"{record['L']:.9g}", f"{record['V']:.9g}", f"{record['liquid_draw']:.9g}", f"{record['vapor_draw']:.9g}",
             *[f"{record[key]:.9g}" for key in trailing], f"{record['duty']:.9g}", f"{record['h_L']:.9g}", f"{record['h_V']:.9g}"]
            + [f"{value:.9g}" for value in record["x"] + record["y"] + record["K"]]
        )
    return buffer.getvalue()


def write_result_json(result: Result, path: str | os.PathLike) -> Path:
    """Write ``result`` as result.json (schema :data:`SCHEMA`) to ``path`` atomically."""
    return write_atomic(path, result.to_json() + "\n")


def write_stages_csv(result: Result, path: str | os.PathLike) -> Path:
    """Write the stage table of ``result`` as CSV to ``path`` atomically."""
    return write_atomic(path, result.stages_csv())

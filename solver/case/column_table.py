"""The ``[column]`` table: stages, condenser and reboiler, pressures, Murphree efficiencies,
side draws and side heaters. Stages are numbered from the top; the condenser (if any) is stage
1 and the reboiler (if any) stage N."""

from __future__ import annotations

import difflib
import re
from typing import Any, Mapping

from solver.case.fields import (
    At,
    Field,
    Reader,
    check_keys,
    quantity,
    read_choice,
    read_fields,
    read_integer,
    read_list,
    read_quantity,
    read_table,
    read_text,
)
from solver.case.model import Column, SideDraw, StageDuty

__all__ = ["MAX_STAGES", "read_column_table", "stage_number"]

#: More stages than this is taken as a typing error, not a column.
MAX_STAGES = 2000

_COLUMN_KEYS = ("stages", "condenser", "reboiler", "pressure", "efficiency", "side_draws", "heaters")
_STAGE_KEY = re.compile(r"[0-9]{1,6}")


def stage_number(stages: int) -> Reader:
    """A reader of a stage number of a column of ``stages`` stages."""
    return lambda value, at: read_integer(value, at, minimum=1, maximum=stages, what="a stage number")


def _name(default: str) -> Field:
    return Field(lambda value, at: read_text(value, at, allow_empty=False, max_length=100), default=default)


def read_column_table(value: Any, at: At) -> Column:
    """The column; the efficiency of the condenser and reboiler is always 1 (they are
    equilibrium stages), whatever an efficiency list says for them."""
    table = read_table(value, at)
    check_keys(table, at, _COLUMN_KEYS, required=("stages", "condenser", "reboiler", "pressure"))
    condenser = read_choice(table["condenser"], at.child("condenser"), ("total", "partial", "none"))
    reboiler = read_choice(table["reboiler"], at.child("reboiler"), ("partial", "none"))
    fewest = 1 + (condenser != "none") + (reboiler != "none")
    stages_value = table["stages"]
    if isinstance(stages_value, int) and not isinstance(stages_value, bool) and stages_value > MAX_STAGES:
        at.child("stages").fail(
            f"more than {MAX_STAGES} stages is not a column this program is meant for", stages_value,
            f"a whole number from {fewest} to {MAX_STAGES}",
        )
    stages = read_integer(stages_value, at.child("stages"), minimum=fewest, maximum=MAX_STAGES, what="a number of stages")
    return Column(
        stages=stages,
        condenser=condenser,
        reboiler=reboiler,
        pressures=_read_pressures(table["pressure"], stages, at.child("pressure")),
        efficiencies=_read_efficiencies(table.get("efficiency", 1.0), stages, condenser, reboiler, at.child("efficiency")),
        side_draws=_read_side_draws(table.get("side_draws", []), stages, at.child("side_draws")),
        stage_duties=_read_heaters(table.get("heaters", []), stages, condenser, reboiler, at.child("heaters")),
    )


def _read_side_draws(value: Any, stages: int, at: At) -> tuple[SideDraw, ...]:
    side_draws: list[SideDraw] = []
    for index, entry in enumerate(read_list(value, at, max_length=MAX_STAGES)):
        entry_at = at.item(index)
        fields = {
            "stage": Field(stage_number(stages), required=True),
            "phase": Field(lambda item, where: read_choice(item, where, ("liquid", "vapor")), required=True),
            "flow": Field(quantity("molar_flow", above=0.0), required=True),
            "name": _name(f"side_draw_{index + 1}"),
        }
        draw = SideDraw(**read_fields(entry, entry_at, fields, "{ stage = ..., phase = \"liquid\", flow = ... }"))
        if any(d.name == draw.name for d in side_draws):
            entry_at.child("name").fail("another side draw has this name", draw.name, "a unique name")
        side_draws.append(draw)
    return tuple(side_draws)


def _read_heaters(value: Any, stages: int, condenser: str, reboiler: str, at: At) -> tuple[StageDuty, ...]:
    fields = {"stage": Field(stage_number(stages), required=True), "duty": Field(quantity("power"), required=True)}
    stage_duties: list[StageDuty] = []
    for index, entry in enumerate(read_list(value, at, max_length=MAX_STAGES)):
        entry_at = at.item(index)
        heater = StageDuty(**read_fields(entry, entry_at, fields, "{ stage = ..., duty = ... }"))
        stage = heater.stage
        if (stage == 1 and condenser != "none") or (stage == stages and reboiler != "none"):
            where = "the condenser" if stage == 1 and condenser != "none" else "the reboiler"
            entry_at.child("stage").fail(
                f"stage {stage} is {where}; its duty is set in [specs] or solved for", entry["stage"],
                "a stage between the condenser and the reboiler",
            )
        if any(d.stage == stage for d in stage_duties):
            entry_at.child("stage").fail("another heater is on this stage", entry["stage"], "one heater per stage")
        stage_duties.append(heater)
    return tuple(stage_duties)


def _read_pressures(value: Any, stages: int, at: At) -> tuple[float, ...]:
    """pressure = {top, drop_per_stage} or {profile = [N values]} or a single pressure (= top,
    no drop). P_k = top + drop * (k - 1), stage 1 at the top."""
    if not isinstance(value, Mapping):
        top = read_quantity(value, "pressure", at, above=0.0)
        return (top,) * stages
    check_keys(value, at, ("top", "drop_per_stage", "profile"))
    if "profile" in value:
        for other in ("top", "drop_per_stage"):
            if other in value:
                at.child(other).fail("cannot be combined with pressure.profile", value[other], "either profile or top")
        profile_at = at.child("profile")
        items = read_list(value["profile"], profile_at, length=stages)
        profile = tuple(read_quantity(item, "pressure", profile_at.item(k), above=0.0) for k, item in enumerate(items))
        for k in range(1, stages):
            if profile[k] < profile[k - 1]:
                profile_at.item(k).fail(
                    "the pressure falls from one stage to the next going down (stage 1 is the top)",
                    items[k],
                    f"a value >= {profile[k - 1]:g} Pa",
                )
        return profile
    if "top" not in value:
        at.child("top").fail("missing", expected="pressure.top, or pressure.profile")
    top = read_quantity(value["top"], "pressure", at.child("top"), above=0.0)
    drop = read_quantity(value.get("drop_per_stage", 0.0), "pressure_difference", at.child("drop_per_stage"), minimum=0.0)
    return tuple(top + drop * k for k in range(stages))


def _read_efficiencies(value: Any, stages: int, condenser: str, reboiler: str, at: At) -> tuple[float, ...]:
    """Murphree vapor efficiency per stage: one number, a list of N numbers, or a table
    {default = 0.7, "5" = 0.5}; always 1 on the condenser and reboiler."""
    fixed = set()
    if condenser != "none":
        fixed.add(1)
    if reboiler != "none":
        fixed.add(stages)
    efficiency = quantity("dimensionless", above=0.0, maximum=1.0)

    if isinstance(value, Mapping):
        default = efficiency(value["default"], at.child("default")) if "default" in value else 1.0
        result = [default] * stages
        seen: set[int] = set()
        for key, item in value.items():
            if key == "default":
                continue
            key_at = at.child(key)
            if not isinstance(key, str) or not _STAGE_KEY.fullmatch(key):
                close = difflib.get_close_matches(str(key), ["default"], n=1, cutoff=0.6)
                hint = f"; did you mean {close[0]!r}?" if close else ""
                key_at.fail(f"unknown key{hint}", key, "'default' or a stage number in quotes, such as \"5\"")
            stage = int(key)
            if not 1 <= stage <= stages:
                key_at.fail("no such stage", key, f"a stage number from 1 to {stages}")
            if stage in seen:
                key_at.fail("stage given twice", key)
            if stage in fixed:
                key_at.fail(
                    f"stage {stage} is the {'condenser' if stage == 1 and condenser != 'none' else 'reboiler'},"
                    " an equilibrium stage (efficiency 1)",
                    key,
                    "a stage between the condenser and the reboiler",
                )
            seen.add(stage)
            result[stage - 1] = efficiency(item, key_at)
    elif isinstance(value, (list, tuple)):
        items = read_list(value, at, length=stages)
        result = [efficiency(item, at.item(k)) for k, item in enumerate(items)]
    else:
        result = [efficiency(value, at)] * stages
    for stage in fixed:
        result[stage - 1] = 1.0
    return tuple(result)

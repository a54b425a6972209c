"""Actuators, springs and the foot: torque against stall, length against the spring's
maximum, deflection against the case's targets."""

from __future__ import annotations

import math

from stiff.checks.base import CheckRecord
from stiff.checks.context import CheckContext
from stiff.errors import CaseError
from stiff.loads import STATIC_CASES


def actuator_checks(ctx: CheckContext) -> list[CheckRecord]:
    """Each actuator's holding torque in every load case where the foot is free.

    In the stall cases the actuator is the load, so it is not checked against itself.
    """
    out = []
    for r in ctx.results:
        if r.case.foot_held:
            continue
        for a in r.actuators:
            out.append(CheckRecord(
                item=a.name, kind="actuator", mode="holding torque", load_case=r.name,
                demand=abs(a.torque_Nmm) / 1e3, capacity=a.stall_torque_Nmm / 1e3, unit="N·m",
                required_factor=ctx.required("actuator"),
                basis=f"stall torque from the case; {ctx.case.actuator(a.name).stiffness_basis}",
                suggestion="a stronger actuator, a longer lever or a spring that carries the "
                           "static load"))
    return out


def spring_checks(ctx: CheckContext) -> list[CheckRecord]:
    """Each spring's length in every load case against its maximum length."""
    out = []
    for r in ctx.results:
        for s in r.springs:
            if s.max_length_mm is None:
                continue
            out.append(CheckRecord(
                item=f"spring {s.name}", kind="spring", mode="length against maximum",
                load_case=r.name, demand=s.length_mm, capacity=s.max_length_mm, unit="mm",
                required_factor=ctx.required("spring"),
                basis="maximum length from the case (beyond it the coils yield or bind)",
                suggestion="a longer spring, or anchor it where it stretches less"))
    return out


def target_checks(ctx: CheckContext) -> list[CheckRecord]:
    """Foot and lateral deflection against the case's targets in the load cases they cover."""
    t = ctx.case.targets
    names = t.deflection_cases or STATIC_CASES
    known = [r.name for r in ctx.results]
    for n in t.deflection_cases or ():
        if n not in known:
            raise CaseError(ctx.case.file, "targets.deflection_cases",
                            f"no load case '{n}' (the load cases are: {', '.join(known)})")
    out = []
    for r in ctx.results:
        if r.case.foot_held or r.name not in names:
            continue
        dx, dy, dz = r.foot_deflection_mm
        for limit, value, mode in ((t.max_foot_deflection_mm, math.hypot(dx, dy),
                                    "deflection in the linkage plane"),
                                   (t.max_lateral_deflection_mm, abs(dz), "lateral deflection")):
            if limit is None:
                continue
            out.append(CheckRecord(
                item="foot", kind="foot", mode=mode, load_case=r.name, demand=value,
                capacity=limit, unit="mm", required_factor=1.0, basis="target from the case",
                suggestion="see where the give comes from: stiffen the largest share"))
    return out


def checks(ctx: CheckContext) -> list[CheckRecord]:
    """Actuator, spring and target checks."""
    return actuator_checks(ctx) + spring_checks(ctx) + target_checks(ctx)

"""Actuators, springs and the foot: torque against stall, length against the spring's
maximum, deflection against the case's targets.

Each check runs over a load set's B poses at once (``stiff.checks.base.CheckRows``); which
checks there are depends only on the case and the load case, never on the load, so every row
applies at every pose.
"""

from __future__ import annotations

import numpy as np

from stiff.checks.base import CheckRows
from stiff.checks.context import CheckContext
from stiff.errors import CaseError
from stiff.loads import STATIC_CASES


def actuator_checks(ctx: CheckContext) -> list[CheckRows]:
    """Each actuator's holding torque in every load set where the foot is free.

    In the stall cases the actuator is the load, so it is not checked against itself.
    """
    out = []
    factor = ctx.required("actuator")
    for loads in ctx.loads:
        if loads.foot_held:
            continue
        for k, name in enumerate(loads.actuator_names):
            out.append(CheckRows(
                item=name, kind="actuator", mode="holding torque", load_case=loads.name,
                demand=np.abs(loads.actuator_torque_Nmm[:, k]) / 1e3,
                capacity=float(loads.stall_torque_Nmm[k]) / 1e3, unit="N·m",
                required_factor=factor,
                basis=f"stall torque from the case; {ctx.case.actuator(name).stiffness_basis}",
                suggestion="a stronger actuator, a longer lever or a spring that carries the "
                           "static load"))
    return out


def spring_checks(ctx: CheckContext) -> list[CheckRows]:
    """Each spring's length in every load set against its maximum length."""
    out = []
    factor = ctx.required("spring")
    for loads in ctx.loads:
        for k, (name, longest) in enumerate(zip(loads.spring_names, loads.spring_max_mm,
                                                strict=True)):
            if longest is None:
                continue
            out.append(CheckRows(
                item=f"spring {name}", kind="spring", mode="length against maximum",
                load_case=loads.name, demand=loads.spring_length_mm[:, k], capacity=longest,
                unit="mm", required_factor=factor,
                basis="maximum length from the case (beyond it the coils yield or bind)",
                suggestion="a longer spring, or anchor it where it stretches less"))
    return out


def _known_cases(ctx: CheckContext) -> tuple[str, ...]:
    """The case's deflection-target load cases (the static ones by default); an unknown name
    is a :class:`CaseError`."""
    t = ctx.case.targets
    known = list(ctx.load_case_names or (s.name for s in ctx.loads))
    for n in t.deflection_cases or ():
        if n not in known:
            raise CaseError(ctx.case.file, "targets.deflection_cases",
                            f"no load case '{n}' (the load cases are: {', '.join(known)})")
    return t.deflection_cases or STATIC_CASES


def target_checks(ctx: CheckContext) -> list[CheckRows]:
    """Foot and lateral deflection against the case's targets in the load sets they cover."""
    t = ctx.case.targets
    names = _known_cases(ctx)
    out = []
    for loads in ctx.loads:
        if loads.foot_held or loads.name not in names:
            continue
        d = loads.foot_deflection_mm
        for limit, value, mode in ((t.max_foot_deflection_mm, np.hypot(d[:, 0], d[:, 1]),
                                    "deflection in the linkage plane"),
                                   (t.max_lateral_deflection_mm, np.abs(d[:, 2]),
                                    "lateral deflection")):
            if limit is None:
                continue
            out.append(CheckRows(
                item="foot", kind="foot", mode=mode, load_case=loads.name, demand=value,
                capacity=limit, unit="mm", required_factor=1.0, basis="target from the case",
                suggestion="see where the give comes from: stiffen the largest share"))
    return out


def checks(ctx: CheckContext) -> list[CheckRows]:
    """Actuator, spring and target checks."""
    return actuator_checks(ctx) + spring_checks(ctx) + target_checks(ctx)

"""Tube and socket checks on the demo cases, and cases whose numbers make no sense for them:
every tube and socket gets its checks, warnings name the problem in one line, nothing crashes.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from stiff.checks import sockets, tubes
from stiff.checks.base import expand
from stiff.checks.context import CheckContext
from stiff.checks.sockets import DEFAULT_FRICTION
from stiff.checks.spans import spans
from tests.demo_contexts import FIVE_BAR, HOPPING, context_of


@pytest.mark.parametrize("name", ["five_bar", "hopping"])
def test_every_tube_and_socket_is_checked(name: str, request: pytest.FixtureRequest) -> None:
    ctx: CheckContext = request.getfixturevalue(name)
    records = expand(tubes.checks(ctx) + sockets.checks(ctx))
    tube_names = {p.name for p in ctx.case.parts if p.kind == "tube"}
    socket_names = {f"socket {j.name}" for j in ctx.case.joints if j.socket is not None}
    assert {r.item for r in records} == tube_names | socket_names
    for t in tube_names:
        modes = {r.mode for r in records if r.item == t}
        assert {"axial and bending, compression", "local shell buckling (SP-8007)",
                "Euler buckling"} <= modes
    for s in socket_names:
        modes = {r.mode for r in records if r.item == s}
        assert {"adhesive shear, average", "adhesive shear, Volkersen peak",
                "printed wall shear at the bond (across the layers)"} <= modes
        assert any(m.startswith("pry bearing") for m in modes)
    for r in records:
        assert r.demand >= 0.0 and r.capacity > 0.0 and r.basis
        assert math.isfinite(r.demand) and math.isfinite(r.capacity)
    assert any(r.mode == "linear buckling (frame)" for r in records)


def test_five_bar_links_buckle_pin_to_pin(five_bar: CheckContext) -> None:
    """Each carbon link is bonded into two printed caps that are pinned: its span runs from the
    elbow pin to the foot pin, pinned-pinned (K = 1), not fixed-fixed."""
    link = five_bar.case.part("link_a")
    (span,) = spans(five_bar, link)
    assert [(e.kind, e.node) for e in span.ends] == [("pinned", "elbow_a"), ("pinned", "foot")]
    record = next(r for r in expand(tubes.checks(five_bar)) if r.item == "link_a"
                  and r.mode == "Euler buckling")
    xy = five_bar.built.model.xyz
    node = five_bar.built.node_of
    chord = float(np.linalg.norm(xy[node[("cap_a_top", "elbow_a")], :2]
                                 - xy[node[("cap_a_bottom", "foot")], :2]))
    assert f"L = {chord:.4g} mm" in record.basis
    assert "K = 1," in record.basis


def test_hopping_pins_through_the_pultruded_push_rod_are_warned(hopping: CheckContext) -> None:
    found = tubes.warnings(hopping)
    assert len([w for w in found if "pultruded tube push_rod" in w]) == 2
    assert all("\n" not in w for w in found)
    assert not any("thigh" in w for w in found)  # roll-wrapped, bonded: no warning


def test_demo_sockets_deeper_than_their_blocks_are_warned(hopping: CheckContext) -> None:
    """The hopping leg's hip and knee blocks reach 15 mm from the socket's node to the next
    pin; its thigh sockets are 20 mm deep."""
    found = sockets.warnings(hopping)
    assert len([w for w in found if "the bore runs into the next joint" in w]) == 2


def test_a_socket_shorter_than_the_tube_is_warned_and_still_checked() -> None:
    text = FIVE_BAR.replace(
        'socket = { tube = "link_a", engagement_mm = 12.0, fixing = "bonded", '
        'adhesive = "epoxy" }\n\n[joints.socket_a_bottom]',
        'socket = { tube = "link_a", engagement_mm = 4.0, fixing = "bonded", '
        'adhesive = "epoxy" }\n\n[joints.socket_a_bottom]', 1)
    assert text != FIVE_BAR
    ctx = context_of(text)
    found = [w for w in sockets.warnings(ctx) if "less than the tube's diameter" in w]
    assert len(found) == 1 and "socket_a_top" in found[0]
    short = [r for r in expand(sockets.checks(ctx)) if r.item == "socket socket_a_top"]
    assert short and all(math.isfinite(r.safety_factor) or r.demand == 0 for r in short)


def test_a_section_with_no_wall_round_the_tube_is_refused() -> None:
    text = FIVE_BAR.replace(
        '[parts.cap_a_top]\nkind = "printed"\nnodes = ["elbow_a", "socket_a_top"]\nz_mm = 15.0\n'
        'section = { material = "PETG", width_mm = 10.0,',
        '[parts.cap_a_top]\nkind = "printed"\nnodes = ["elbow_a", "socket_a_top"]\nz_mm = 15.0\n'
        'section = { material = "PETG", width_mm = 5.0,')
    assert text != FIVE_BAR
    ctx = context_of(text)
    assert not [r for r in expand(sockets.checks(ctx)) if r.item == "socket socket_a_top"]
    assert any("leaves no wall" in w and "socket_a_top" in w for w in sockets.warnings(ctx))


def _clamped(extra: str) -> str:
    old = 'socket = { tube = "thigh", engagement_mm = 20.0, fixing = "bonded", adhesive = "epoxy" }'
    text = HOPPING.replace(old, 'socket = { tube = "thigh", engagement_mm = 20.0, '
                                f'fixing = "clamped"{extra} }}', 1)
    assert text != HOPPING
    return text.replace('material = "CF-roll-wrapped"', 'material = "CF-pultruded"')


def test_a_clamp_without_its_force_is_warned_and_not_checked_for_slip() -> None:
    ctx = context_of(_clamped(""))
    assert any("without clamp_force_N" in w for w in sockets.warnings(ctx))
    assert any("a clamp on the pultruded tube thigh" in w for w in tubes.warnings(ctx))
    records = [r for r in expand(sockets.checks(ctx)) if r.item == "socket thigh_top"]
    assert records and not any(r.mode == "clamp slip (friction)" for r in records)


def test_a_clamp_with_its_force_is_checked_for_slip() -> None:
    ctx = context_of(_clamped(", clamp_force_N = 400.0"))
    slip = [r for r in expand(sockets.checks(ctx)) if r.mode == "clamp slip (friction)"]
    assert slip
    assert all(r.capacity == pytest.approx(DEFAULT_FRICTION * 400.0) for r in slip)
    assert all("default" in r.basis for r in slip)

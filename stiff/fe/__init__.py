"""The 3D frame engine: 6 DOF a node, mm, N, MPa.

``FrameModel`` holds the arrays; ``solve_static``, ``solve_second_order``, ``compliance`` and
``buckling_factors`` are the analyses; ``Solution`` is what a solve returns. Every function
accepts a batch of models with one topology (leading array axes) as well as a single model.
"""

from stiff.fe.assemble import preload_loads
from stiff.fe.batch import stack, take
from stiff.fe.model import DOF_NAMES, Beams, Connectors, FrameModel, Springs
from stiff.fe.results import Solution
from stiff.fe.solve import (
    assemble_model,
    buckling_factors,
    compliance,
    node_dofs,
    solve_second_order,
    solve_static,
)

__all__ = [
    "DOF_NAMES",
    "Beams",
    "Connectors",
    "FrameModel",
    "Solution",
    "Springs",
    "assemble_model",
    "buckling_factors",
    "compliance",
    "node_dofs",
    "preload_loads",
    "solve_second_order",
    "solve_static",
    "stack",
    "take",
]

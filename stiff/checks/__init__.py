"""Failure checks: lugs, printed segments, tubes, sockets, pins, actuators, springs, targets.

``run_checks(ctx)`` runs every check module over every load case and returns the records;
each module has one function ``checks(ctx) -> list[CheckRecord]``.
"""

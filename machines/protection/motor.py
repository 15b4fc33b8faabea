"""Induction-motor family: preparation (start study), the rules in sheet order, drawings. (placeholder)"""

from __future__ import annotations

from machines.model import motor_rated_current
from machines.protection.base import StudyContext


def prepare(case) -> StudyContext:
    return StudyContext(case=case, rated_current=motor_rated_current(case.machine))


RULES: list = []


def drawings(ctx, functions) -> list:
    return []

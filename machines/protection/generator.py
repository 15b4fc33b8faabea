"""Synchronous-generator family: preparation, the rules in sheet order, drawings. (placeholder)"""

from __future__ import annotations

from machines.model import generator_rated_current
from machines.protection.base import StudyContext


def prepare(case) -> StudyContext:
    m = case.machine
    return StudyContext(case=case, rated_current=generator_rated_current(m.rated_apparent_power, m.rated_voltage))


RULES: list = []


def drawings(ctx, functions) -> list:
    return []

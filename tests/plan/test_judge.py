"""The planner's judge agrees with the check rules on every crossing that exists.

The judge decides whether crossings a fix would create pass; it must ask what the rules ask. On
the demo board and on random designs, a receiver is flagged by a level, over-voltage or
back-powering rule exactly when the judge fails some (driver, receiver) pair on its net.
"""

from __future__ import annotations

from hypothesis import HealthCheck, given, settings

from linter.electrical.design_file import load_design
from linter.pipeline import annotate_design, check_annotation
from linter.plan.catalogue import default_catalogue_path, load_catalogue
from linter.plan.context import PlanContext
from linter.plan.crossings import UNPULLED_RULE, net_endpoints
from linter.plan.judge import FLOATING, Sink
from tests.plan.conftest import CTRL_BOARD
from tests.plan.random_designs import random_designs

JUDGED = ("low-level-margin", "high-level-margin", "input-overvoltage", "input-fed-while-unpowered")


def _disagreements(path) -> list[str]:
    design = load_design(path)
    annotation = annotate_design(design)
    findings = check_annotation(annotation).findings
    ctx = PlanContext(annotation, load_catalogue(default_catalogue_path(), design.families))
    flagged = {(f.subject, s.name) for f in findings if f.rule in JUDGED for s in f.sites if s.role == "receiver"}
    unpulled = {f.subject for f in findings if f.rule == UNPULLED_RULE}
    wrong = []
    for net, name in enumerate(annotation.graph.net_names):
        views = net_endpoints(annotation, net)
        drivers = [v for v in views if v.judged_driver]
        receivers = [v for v in views if v.judged_receiver]
        for receiver in receivers:
            verdicts = set()
            for driver in drivers:
                if driver.index == receiver.index:
                    continue
                source = ctx.source(driver, net)
                load = ctx.load([v.family for v in receivers if v.index != driver.index and v.family])
                verdicts.add(ctx.judge.verdict(source, Sink(receiver.family, receiver.rail), load,
                                               ctx.required_v(name, source)))
            judged_fails = bool(verdicts - {None, FLOATING})
            if FLOATING in verdicts and name in unpulled:
                continue
            if judged_fails != ((name, receiver.label) in flagged):
                wrong.append(f"{name} {receiver.label}: judge {sorted(map(str, verdicts))}")
    return wrong


def test_judge_agrees_with_the_rules_on_the_demo_board():
    assert _disagreements(CTRL_BOARD) == []


@settings(max_examples=30, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(random_designs(movable=False, extras=True))
def test_judge_agrees_with_the_rules_on_random_designs(tmp_path_factory, design):
    assert _disagreements(design.write(tmp_path_factory.mktemp("judge"))) == []

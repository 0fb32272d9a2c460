"""The library's limits hold in the Python interface as on the command line."""

from __future__ import annotations

import pytest
from helpers import economy, make_plan

import growthplan as gp
from growthplan import limits
from growthplan.scenarios.sweep import sweep
from growthplan.scenarios.uncertainty import (
    Normal,
    Uncertain,
    UncertaintySpec,
    reoptimise,
    robust_plan,
    stress_test,
)

SPEC = UncertaintySpec(items=[Uncertain(what="capital_coefficients",
                                        distribution=Normal(mean=1.0, sd=0.01))])


@pytest.fixture(scope="module")
def plan():
    return make_plan(economy(2), 3)


@pytest.mark.parametrize("call, field, limit", [
    # the reproducers: each raised MemoryError before the limit was enforced here
    (lambda p: reoptimise(p, SPEC, 10**12), "draws", limits.MAX_DRAWS),
    (lambda p: stress_test(p, SPEC, 2**63 - 1, nominal=object()), "draws", limits.MAX_DRAWS),
    (lambda p: reoptimise(p, SPEC, 3, chunk=10**12), "chunk", limits.MAX_DRAWS),
    (lambda p: robust_plan(p, SPEC, 10**9), "scenarios", limits.MAX_ROBUST_SCENARIOS),
    (lambda p: reoptimise(p, SPEC, 3, max_workers=10**9), "max_workers", limits.MAX_WORKERS),
    (lambda p: sweep(p, scenarios={"as it is": {}}, max_workers=10**9), "max_workers",
     limits.MAX_WORKERS),
])
def test_api_refuses_what_the_command_line_refuses(plan, call, field, limit):
    with pytest.raises(gp.InvalidInput, match=rf"^{field} must be at most {limit:,}\."):
        call(plan)


def test_the_command_line_states_the_same_limits():
    from growthplan.cli.scenarios import stress

    draws = next(p for p in stress.params if p.name == "draws")
    workers = next(p for p in stress.params if p.name == "workers")
    assert draws.type.max == limits.MAX_DRAWS
    assert workers.type.max == limits.MAX_WORKERS
    assert UncertaintySpec.model_fields["draws"].metadata[-1].le == limits.MAX_DRAWS

"""Techniques: starts only within a technique's years (column bounds), audited per vintage."""

from __future__ import annotations

from helpers import check_family, switch_plan


def _too_early(s, d):
    k = d.tech.keys.index("goods:saving")
    s.starts[0, k] = 50.0  # before its first year


def test_availability_count_audit_and_no_rows():
    plan = switch_plan()
    plan = plan.model_copy(update={"techniques": [
        plan.techniques[0].model_copy(update={"first_year": 2032})]})
    out = check_family(plan, "techniques", _too_early, "technique availability")
    assert out["block"] is None and not out["condition"].elastic


def test_the_labour_saving_technique_starts_in_2032():
    # closed form derived in tests/lp/test_techniques.py: the alternative is first
    # started when labour grown 5 % a year binds, in 2032
    r = switch_plan().solve()
    assert int(r.technique_years.loc["goods:saving", "first_start"]) == 2032

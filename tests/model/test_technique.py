"""A technique's fields carry the capital spec's names; the former spellings still read."""

from __future__ import annotations

import pytest
from conftest import assert_optimal, one_sector

import growthplan as gp


def test_the_former_spellings_read_with_a_warning():
    with pytest.warns(DeprecationWarning, match="'service_life' is now 'mean_service_life'"):
        old = gp.Technique(sector="goods", label="x", service_life=8)
    with pytest.warns(DeprecationWarning, match="'profile' is now 'retirement'"):
        older = gp.Technique(sector="goods", label="x", profile="sudden_exit")
    assert old == gp.Technique(sector="goods", label="x", mean_service_life=8)
    assert older.retirement == "sudden_exit"
    with pytest.warns(DeprecationWarning, match="mean_service_life"):
        assert old.service_life == 8


def test_both_spellings_at_once_are_refused():
    with (pytest.warns(DeprecationWarning),
          pytest.raises(gp.InvalidInput, match="mean_service_life must be given once")):
        gp.Technique(sector="goods", label="x", service_life=8, mean_service_life=9)


def test_the_same_technique_under_both_names_solves_alike():
    def plan(tq: gp.Technique) -> gp.Plan:
        return gp.Plan(economy=one_sector(), years=range(2030, 2036), techniques=[tq],
                       labour=gp.LabourSupply(start=80), terminal=gp.TerminalGrowth(rate=0.02))

    new = gp.Technique(sector="goods", label="x", labour=0.3, mean_service_life=8,
                       retirement="sudden_exit")
    with pytest.warns(DeprecationWarning):
        old = gp.Technique(sector="goods", label="x", labour=0.3, service_life=8,
                           profile="sudden_exit")
    assert assert_optimal(plan(old).solve()).objective == \
        assert_optimal(plan(new).solve()).objective

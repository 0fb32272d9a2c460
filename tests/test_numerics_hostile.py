"""Hostile numerics: extreme magnitudes, tiny and huge coefficients, negative past growth,
huge lives, reducible structures and repeated Perron roots. Every case ends in a valid
object whose derived arrays are finite, or in InvalidInput / NoBalancedGrowth /
UnproductiveEconomy with a message: never NaN, another exception, or a hang."""

from __future__ import annotations

import signal
import warnings
from collections import Counter

import numpy as np
import pytest

import growthplan as gp

HOSTILE: Counter = Counter()  # outcomes, reported at the end of the run (conftest)

CASE_SECONDS = 20  # a case that runs longer counts as a hang
MAGNITUDES = [1e-300, 1e-30, 1e-12, 1e-6, 1.0, 1e6, 1e30, 1e300]
EXPECTED = (gp.InvalidInput, gp.NoBalancedGrowth, gp.UnproductiveEconomy)


class Hang(Exception):
    pass


def _alarm(signum, frame):
    raise Hang


def run_case(kind: str, build, check) -> None:
    """Build and derive under a time cap; record the outcome; fail on anything else."""
    old = signal.signal(signal.SIGALRM, _alarm)
    signal.setitimer(signal.ITIMER_REAL, CASE_SECONDS)
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", gp.GrowthplanWarning)
            warnings.simplefilter("error", RuntimeWarning)  # an overflow is a defect too
            obj = build()
            check(obj)
        HOSTILE[f"{kind}: valid"] += 1
    except EXPECTED as exc:
        assert str(exc).strip(), f"{type(exc).__name__} without a message"
        HOSTILE[f"{kind}: {type(exc).__name__}"] += 1
    except Hang:
        pytest.fail(f"{kind} case ran longer than {CASE_SECONDS} s")
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, old)


def finite(*arrays) -> None:
    for a in arrays:
        arr = np.asarray(a, dtype=float)
        assert np.all(np.isfinite(arr)), arr


def capital_case(rng: np.random.Generator) -> dict:
    profile = str(rng.choice(gp.capital.PROFILES))
    spec: dict = {
        "initial_capacity": float(rng.choice(MAGNITUDES)),
        "mean_service_life": float(rng.choice([1, 1.5, 7.3, 60, 999, 1000, 1001, 1e7, 1e300])),
        "retirement": profile,
        "past_growth": float(rng.choice([-0.999, -0.9, -0.5, -0.1, -1e-3, 0.0, 0.1, 10.0,
                                         1e300])),
        "lead_time": int(rng.choice([0, 1, 5, 100, 101])),
    }
    if profile in ("weibull", "lognormal") and rng.uniform() < 0.7:
        spec["shape"] = float(rng.choice([0.01, 0.3, 0.5, 1.0, 2.0, 5.0, 20.0, 25.0]))
    if profile == "geometric" and rng.uniform() < 0.3:
        spec["declining_balance"] = float(rng.choice([1e-9, 0.5, 1.65, 5.0]))
    if rng.uniform() < 0.3:
        spec["investment_history"] = [float(rng.choice(MAGNITUDES + [0.0]))
                                      for _ in range(int(rng.integers(1, 12)))]
    return spec


def check_capital(c: gp.CapitalSpec) -> None:
    finite(c.survival(), c.initial_survival(30), c.survival(max_age=40))
    for g in (-0.05, 0.0, 0.05):
        finite(c.starts_per_capacity(g), c.deliveries_per_capacity(g))
    assert c.initial_survival(0)[0] == 1.0


@pytest.mark.parametrize("seed", range(260))
def test_capital_specs(seed):
    spec = capital_case(np.random.default_rng(seed))
    run_case("capital", lambda: gp.CapitalSpec(**spec), check_capital)


def hostile_matrix(rng: np.random.Generator, n: int) -> np.ndarray:
    kind = rng.choice(["random", "tiny", "huge", "triangular", "blocks", "diagonal", "cycle",
                       "mixed_magnitudes"])
    if kind == "blocks" and n >= 2:  # two identical parts: a repeated Perron root
        k = n // 2
        b = rng.uniform(0, 1, (k, k))
        a = np.zeros((n, n))
        a[:k, :k] = b
        a[k:2 * k, k:2 * k] = b
    elif kind == "diagonal":
        a = np.diag(np.full(n, rng.uniform(0, 1)))
    elif kind == "cycle":
        a = np.roll(np.eye(n), 1, axis=0) * rng.uniform(0, 1)
    elif kind == "triangular":
        a = np.triu(rng.uniform(0, 1, (n, n)))
    else:
        a = rng.uniform(0, 1, (n, n)) * (rng.uniform(0, 1, (n, n)) < 0.6)
    top = a.sum(axis=0).max()
    if top > 0:
        a *= rng.choice([0.3, 0.9, 0.999999, 1.0, 1.5]) / top
    if kind == "tiny":
        a *= 1e-300
    elif kind == "huge":
        a *= 1e300
    elif kind == "mixed_magnitudes":
        a[rng.uniform(0, 1, (n, n)) < 0.3] = float(rng.choice([1e-300, 1e-30, 1e-13]))
    return a


def economy_case(rng: np.random.Generator) -> dict:
    n = int(rng.integers(1, 7))
    names = [f"s{i}" for i in range(n)]
    data: dict = {"sectors": names, "input_coefficients": hostile_matrix(rng, n)}
    if rng.uniform() < 0.8:
        data["capital_coefficients"] = rng.uniform(0, 1, (n, n)) * float(rng.choice(MAGNITUDES))
    if rng.uniform() < 0.6:
        data["labour_coefficients"] = [rng.uniform(0, 1, n) * float(rng.choice(MAGNITUDES))]
        if rng.uniform() < 0.3:
            data["wage_basket"] = rng.uniform(0, 1, n) * float(rng.choice(MAGNITUDES))
    if rng.uniform() < 0.6:
        data["capital"] = {s: capital_case(rng) for s in names}
        for s in names:  # keep most specs sane so the economy itself is exercised
            if rng.uniform() < 0.7:
                data["capital"][s] = {"initial_capacity": 1.0, "mean_service_life":
                                      float(rng.choice([1, 5, 20, 80])),
                                      "retirement": str(rng.choice(gp.capital.PROFILES))}
    return data


def check_economy(e: gp.Economy) -> None:
    finite(e.leontief_inverse(), e.output_multipliers())
    for step in (lambda: e.balanced_growth(), lambda: e.dynamic_balanced_growth()
                 if e.capital is not None else None):
        try:
            bg = step()
        except gp.NoBalancedGrowth as exc:  # a legitimate answer for one analysis
            assert str(exc).strip()
            HOSTILE["economy: analysis without balanced growth"] += 1
            continue
        if bg is not None:
            finite(bg.proportions, bg.rate, bg.factor, bg.spectral_radius)
            assert (bg.proportions >= 0).all() and bg.proportions.sum() == pytest.approx(1)


@pytest.mark.parametrize("seed", range(260))
def test_economies(seed):
    data = economy_case(np.random.default_rng(10_000 + seed))
    run_case("economy", lambda: gp.Economy(**data), check_economy)

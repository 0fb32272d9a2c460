"""Retirement profiles of fixed capital and the perpetual inventory.

A vintage of capacity enters service at age 0 and a share ``S(a)`` of it is
still in service ``a`` whole years later, with ``S(0) = 1``.

Discretisation convention
-------------------------
Every family is parameterised by the mean service life ``L`` and discretised
on whole years so that ``sum_a S(a) = L`` (the expected number of years a unit
serves, counting the year it enters):

* ``sudden_exit``: ``S(a) = 1`` for ``a < floor(L)``, the fraction
  ``L - floor(L)`` in year ``floor(L)``, then 0;
* ``linear``: ``S(a) = max(0, 1 - a/W)`` with the width ``W`` chosen so the sum
  is ``L`` (``W = 2L - 1`` for whole ``L``: retirements spread evenly);
* ``geometric``: ``S(a) = (1 - δ)^a`` with ``δ = R/L``; the sum is ``L/R``,
  which is ``L`` for the default declining-balance rate ``R = 1``;
* ``weibull`` (shape ``k``) and ``lognormal`` (shape ``σ``): the continuous
  survival function evaluated at whole ages, with its scale chosen so the sum
  is ``L``. The continuous distribution with mean ``L`` itself is
  :func:`lifetime_distribution`.

A continuous survival function sampled at whole ages sums to about ``L + 1/2``
(the trapezoid rule); calibrating the scale instead keeps the discrete mean
exact, which is what the capacity accounts of a plan need.

Bounds
------
Arrays grow with the service life, so lives are bounded before anything is
allocated: at most :data:`MAX_LIFE` (1000) years for every profile but the
geometric one, whose arrays are cut at :data:`MAX_AGE` ages whatever its life
(it is memoryless and mostly used in closed form). Requested ages
(``max_age``, plan horizons) are at most :data:`MAX_AGE`, lead times at most
:data:`MAX_LEAD_TIME` (100) years.

Steady-state age structure
--------------------------
Today's stock built by vintages that grew at ``g0`` a year weighs age ``a`` by
``S(a)(1+g0)^-a``. With ``g0 < 0`` old vintages weigh more, and the weighted
sum ``Σ_a S(a)(1+g0)^-a`` converges only when the profile's tail falls faster
than ``1 + g0``: with the tail ratio ``r = lim S(a+1)/S(a)`` (0 for profiles
that end, ``1 − δ`` for the geometric one, 1 for the lognormal and the Weibull
with shape < 1, ``exp(−1/λ)`` for the Weibull with shape 1) the sum diverges
when ``r/(1+g0) ≥ 1``. Such an age structure is refused, and so is one whose
sum still depends on where the profile is cut at 1e-12: when the terms beyond
the cut, bounded by a geometric series with the last observed ratio, exceed
:data:`TRUNCATION_TOL` of the sum.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from functools import lru_cache
from typing import Any, Literal, cast

import numpy as np
from scipy import optimize, special, stats

from ..errors import invalid

__all__ = [
    "PROFILES",
    "Profile",
    "survival",
    "lifetime_distribution",
    "geometric_rate",
    "replacement_rate",
    "starts_per_capacity",
    "initial_survival",
    "perpetual_inventory",
    "tail_ratio",
    "MAX_LIFE",
    "MAX_AGE",
    "MAX_LEAD_TIME",
]

Profile = Literal["sudden_exit", "linear", "geometric", "weibull", "lognormal"]
PROFILES: tuple[str, ...] = ("sudden_exit", "linear", "geometric", "weibull", "lognormal")
DEFAULT_SHAPE = {"weibull": 2.0, "lognormal": 0.5}
SHAPE_RANGE = {"weibull": (0.3, 20.0), "lognormal": (0.01, 2.0)}
_TAIL = 1e-12
MAX_AGE = 5000  # longest array: a geometric profile with a very long life, max_age, horizons
MAX_LIFE = 1000.0  # longest mean service life of the profiles whose arrays grow with it
MAX_LEAD_TIME = 100  # longest construction lead time in years
TRUNCATION_TOL = 1e-9  # largest share of a weighted age sum left beyond the profile's cut


def _check(profile: str, mean_life: float, shape: float | None,
           declining_balance: float) -> float | None:
    if profile not in PROFILES:
        raise invalid("retirement", f"be one of {', '.join(PROFILES)}", profile)
    if not (np.isfinite(mean_life) and mean_life >= 1):
        raise invalid("mean_service_life", "be a finite number >= 1 year", mean_life)
    if profile != "geometric" and mean_life > MAX_LIFE:
        raise invalid("mean_service_life", f"be at most {MAX_LIFE:g} years for the {profile} "
                      "profile (its arrays grow with the life)", mean_life)
    if profile in DEFAULT_SHAPE:
        shape = DEFAULT_SHAPE[profile] if shape is None else shape
        lo, hi = SHAPE_RANGE[profile]
        if not (np.isfinite(shape) and lo <= shape <= hi):
            raise invalid("shape", f"be in [{lo}, {hi}] for the {profile} profile", shape)
    if profile == "geometric" and not (
        np.isfinite(declining_balance) and 0 < declining_balance <= mean_life
    ):
        raise invalid("declining_balance", "be in (0, mean_service_life]", declining_balance)
    return shape


def geometric_rate(service_life: float, declining_balance: float = 1.0) -> float:
    """Geometric retirement (or depreciation) rate ``δ = R / L``.

    Parameters
    ----------
    service_life : float
        Mean service life ``L`` in years.
    declining_balance : float, default 1.0
        Declining-balance rate ``R``. ``R = 1`` keeps the mean life ``L``;
        national accounts use other values (for example about 1.65 for
        machinery) when the rate measures depreciation.

    Examples
    --------
    >>> geometric_rate(20)
    0.05
    >>> round(geometric_rate(10, 1.65), 4)
    0.165
    """
    _check("geometric", service_life, None, declining_balance)
    return declining_balance / service_life


def lifetime_distribution(profile: str, mean_life: float, shape: float | None = None) -> Any:
    """The continuous service-life distribution with mean ``mean_life``.

    Only for ``weibull`` (``λ = L / Γ(1 + 1/k)``) and ``lognormal``
    (``μ = ln L − σ²/2``).

    Parameters
    ----------
    profile : {"weibull", "lognormal"}
        Retirement profile; the other profiles have no continuous counterpart.
    mean_life : float
        Mean service life ``L`` in years.
    shape : float, optional
        Weibull shape ``k`` (default 2) or lognormal ``σ`` (default 0.5).

    Returns
    -------
    scipy.stats frozen distribution
        ``weibull_min`` or ``lognorm`` with mean ``mean_life``.
    """
    # weibull and lognormal always come back with a shape
    shape = cast(float, _check(profile, mean_life, shape, 1.0))
    if profile == "weibull":
        scale = mean_life / special.gamma(1.0 + 1.0 / shape)
        return stats.weibull_min(shape, scale=scale)
    if profile == "lognormal":
        mu = math.log(mean_life) - shape**2 / 2.0
        return stats.lognorm(shape, scale=math.exp(mu))
    raise invalid("retirement", "be weibull or lognormal for a continuous distribution", profile)


def _linear(ages: np.ndarray, width: float) -> np.ndarray:
    s = np.clip(1.0 - ages / width, 0.0, 1.0)
    s[s < _TAIL] = 0.0  # rounding leaves ~1e-16 at the end of the profile: it is zero
    return s


def _continuous(profile: str, shape: float, scale: float, ages: np.ndarray) -> np.ndarray:
    if profile == "weibull":
        return np.exp(-((ages / scale) ** shape))
    # lognormal with median `scale`
    out = np.ones_like(ages, dtype=float)
    pos = ages > 0
    out[pos] = stats.norm.sf((np.log(ages[pos]) - math.log(scale)) / shape)
    return out


@lru_cache(maxsize=512)
def _calibrated(profile: str, mean_life: float, shape: float) -> tuple[float, int]:
    """Scale parameter making the whole-year survival sum equal the mean life."""
    total: Callable[[float], float]
    if profile == "linear":
        def total_linear(w: float) -> float:
            return float(_linear(np.arange(0, math.ceil(w) + 1.0), w).sum())
        total = total_linear
        lo, hi = 1e-9, 2.0 * mean_life + 2.0
    else:
        dist = lifetime_distribution(profile, mean_life, shape)
        horizon = int(min(math.ceil(dist.isf(_TAIL) * 3.0) + 2, 100 * mean_life + 1000))

        def total_continuous(s: float) -> float:
            return float(_continuous(profile, shape, s, np.arange(horizon, dtype=float)).sum())
        total = total_continuous
        base = mean_life / special.gamma(1 + 1 / shape) if profile == "weibull" else math.exp(
            math.log(mean_life) - shape**2 / 2)
        lo, hi = base * 1e-3, base * 4.0
    scale = optimize.brentq(lambda s: total(s) - mean_life, lo, hi, xtol=1e-13, rtol=1e-14)
    if profile == "linear":
        return scale, int(math.ceil(scale)) + 1
    return scale, horizon


def survival(
    profile: str,
    mean_life: float,
    *,
    shape: float | None = None,
    declining_balance: float = 1.0,
    max_age: int | None = None,
) -> np.ndarray:
    """Share of a vintage still in service at each whole age ``a = 0, 1, …``.

    Parameters
    ----------
    profile : {"sudden_exit", "linear", "geometric", "weibull", "lognormal"}
        Retirement profile family.
    mean_life : float
        Mean service life ``L`` in years (>= 1).
    shape : float, optional
        Weibull shape ``k`` (default 2) or lognormal ``σ`` (default 0.5).
    declining_balance : float, default 1.0
        Rate ``R`` of the geometric profile, ``δ = R/L``.
    max_age : int, optional
        Return ages ``0..max_age``. By default up to the age where the profile
        ends (or falls below 1e-12).

    Returns
    -------
    numpy.ndarray
        ``S(0..max_age)``, non-increasing, ``S(0) = 1``; sums to ``L`` (to
        ``L/R`` for the geometric profile) when ``max_age`` covers the tail.

    Examples
    --------
    >>> survival("sudden_exit", 3)
    array([1., 1., 1.])
    >>> float(survival("linear", 5).sum())
    5.0
    """
    shape = _check(profile, mean_life, shape, declining_balance)
    if max_age is not None and (int(max_age) != max_age or not 0 <= max_age <= MAX_AGE):
        raise invalid("max_age", f"be a whole number in [0, {MAX_AGE}]", max_age)
    if profile != "geometric" and mean_life - 1.0 < 1e-12:
        s = np.array([1.0])
    elif profile == "sudden_exit":
        whole = int(math.floor(mean_life))
        s = np.ones(whole + 1)
        s[whole] = mean_life - whole
        if s[-1] == 0.0:
            s = s[:-1]
    elif profile == "geometric":
        delta = declining_balance / mean_life
        if delta >= 1.0:
            s = np.array([1.0])
        else:
            # a vanishing δ (a life near 1e300) gives an infinite length: cap it first
            end = max_age if max_age is not None else int(min(
                math.log(_TAIL) / math.log1p(-delta), MAX_AGE))
            s = (1.0 - delta) ** np.arange(end + 1, dtype=float)
    else:
        scale, horizon = _calibrated(profile, float(mean_life), float(shape or 0.0))
        ages = np.arange(horizon, dtype=float)
        s = _linear(ages, scale) if profile == "linear" else _continuous(
            profile, cast(float, shape), scale, ages)
        if profile != "linear":
            s[0] = 1.0
            keep = np.nonzero(s >= _TAIL)[0]
            s = s[: keep[-1] + 1]
        else:
            s = s[: max(1, int(np.count_nonzero(s > 0)))]
    if max_age is None:
        return s
    out = np.zeros(int(max_age) + 1)
    m = min(out.size, s.size)
    out[:m] = s[:m]
    return out


def _discounted_sum(s: np.ndarray, g: float) -> float:
    """``Σ_a S(a)(1+g)^-a``; ``inf`` when it overflows (never NaN)."""
    with np.errstate(over="ignore", invalid="ignore"):
        w = (1.0 + g) ** -np.arange(s.size, dtype=float)
        total = float(np.sum(np.where(s > 0, s * w, 0.0)))
    return total if not math.isnan(total) else math.inf


def tail_ratio(
    profile: str, mean_life: float, *, shape: float | None = None,
    declining_balance: float = 1.0,
) -> float | None:
    """Limit of ``S(a+1)/S(a)`` beyond the end of the discretised profile.

    ``None`` for a profile that ends (sudden exit, linear, a one-year life):
    nothing is cut off. Otherwise the profile was cut where it fell below
    1e-12 and the ratio tells how fast the rest falls: ``1 − δ`` for the
    geometric profile, 0 for the Weibull with shape > 1, ``exp(−1/λ)`` for
    shape 1, and 1 for the Weibull with shape < 1 and the lognormal (tails
    that fall slower than any geometric rate).

    Examples
    --------
    >>> tail_ratio("geometric", 20)
    0.95
    >>> tail_ratio("lognormal", 20)
    1.0
    >>> tail_ratio("sudden_exit", 20) is None
    True
    """
    shape = _check(profile, mean_life, shape, declining_balance)
    if profile in ("sudden_exit", "linear") or (
            profile != "geometric" and mean_life - 1.0 < 1e-12):
        return None
    if profile == "geometric":
        return max(0.0, 1.0 - declining_balance / mean_life)
    if profile == "lognormal":
        return 1.0
    assert shape is not None
    if shape > 1.0:
        return 0.0
    if shape < 1.0:
        return 1.0
    scale, _ = _calibrated(profile, float(mean_life), float(shape))
    return math.exp(-1.0 / scale)


def starts_per_capacity(
    s: np.ndarray | None, g: float, *, lead_time: int = 1, spending: np.ndarray | None = None,
    delta: float | None = None,
) -> tuple[float, float]:
    """Starts and capital deliveries per unit of capacity on a path growing at ``g``.

    On a balanced path ``z_t = z (1+g)^t`` with capacity
    ``C_t = Σ_a S(a) z_{t-θ-a}``, starts per unit of capacity are
    ``(1+g)^θ / Σ_a S(a)(1+g)^-a``, and deliveries of capital goods per unit
    of capacity are that times ``Σ_s w(s)(1+g)^-s``.

    With ``delta`` (geometric profile) the sum has the closed form
    ``Σ_a (1−δ)^a (1+g)^-a = (1+g)/(g+δ)`` and ``s`` is not used.

    Returns
    -------
    (starts, deliveries) : tuple of float
    """
    if delta is not None:
        total = (1.0 + g) / (g + delta) if g + delta > 0 else np.inf
    else:
        assert s is not None, "a survival profile is needed without delta"
        total = _discounted_sum(s, g)
    ratio = (1.0 + g) ** lead_time / total
    if spending is None or len(spending) == 0:
        return ratio, ratio
    w = np.asarray(spending, dtype=float)
    return ratio, ratio * float(np.sum(w * (1.0 + g) ** -np.arange(w.size, dtype=float)))


def replacement_rate(
    profile: str,
    mean_life: float,
    g: float = 0.0,
    *,
    shape: float | None = None,
    declining_balance: float = 1.0,
) -> float:
    """Replacement rate ``d(g)`` that keeps a stock growing at ``g`` with this profile.

    With the library's timing (starts serve from the next year),
    ``d(g) = (1+g) / Σ_a S(a)(1+g)^-a − g``: new starts per unit of capacity
    minus the growth they add. ``d(0) = 1/L`` for every profile, and for the
    geometric profile ``d(g) = δ`` for every ``g``.

    Examples
    --------
    >>> round(replacement_rate("geometric", 20, 0.07), 12)
    0.05
    >>> round(replacement_rate("sudden_exit", 10, 0.0), 12)
    0.1
    """
    if not (np.isfinite(g) and g > -1):
        raise invalid("g", "be a finite growth rate > -1", g)
    if profile == "geometric":
        return geometric_rate(mean_life, declining_balance)
    s = survival(profile, mean_life, shape=shape, declining_balance=declining_balance)
    return starts_per_capacity(s, g, lead_time=1)[0] - g


def initial_survival(
    s: np.ndarray,
    horizon: int,
    *,
    past_growth: float = 0.0,
    history: np.ndarray | None = None,
    tail: float | None = None,
) -> np.ndarray:
    """Share ``R(t)``, ``t = 0..horizon``, of today's capacity still in service in year ``t``.

    Parameters
    ----------
    s : numpy.ndarray
        Survival profile ``S(a)``.
    horizon : int
        Last year ``t`` wanted (at most :data:`MAX_AGE`).
    past_growth : float, default 0.0
        Today's stock has the steady age structure of vintages that grew at
        this rate (used when ``history`` is None).
    history : array_like, optional
        Capacity that entered service in each past year, oldest first, the last
        entry in plan year 0 (age 0 then). The perpetual inventory of these
        vintages gives the stock and its survival.
    tail : float, optional
        Ratio ``S(a+1)/S(a)`` beyond the end of ``s`` when ``s`` was cut off
        (see :func:`tail_ratio`); None when the profile ends with ``s``.

    Returns
    -------
    numpy.ndarray
        ``R(0..horizon)`` with ``R(0) = 1``.

    Raises
    ------
    InvalidInput
        When the steady-state age sum ``Σ_a S(a)(1+g0)^-a`` diverges or depends
        on where the profile is cut (see the module notes), or no capacity of
        the history is in service in year 0.

    Notes
    -----
    Vintage weights are scaled so the largest is 1 before they are summed
    (in logarithms for the steady state), so neither a fast decline in the
    past nor a history near the largest float overflows; ``R`` only needs
    their ratios.
    """
    if not (int(horizon) == horizon and 0 <= horizon <= MAX_AGE):
        raise invalid("horizon", f"be a whole number in [0, {MAX_AGE}]", horizon)
    horizon = int(horizon)
    s = np.asarray(s, dtype=float)
    if history is None:
        if not (np.isfinite(past_growth) and past_growth > -1):
            raise invalid("past_growth", "be a finite number > -1", past_growth)
        logw = -np.arange(s.size, dtype=float) * math.log1p(past_growth)
        vint = np.exp(logw - logw.max())  # vintage of age a today, the largest weighs 1
        if past_growth < 0 and tail is not None:
            _check_age_sum(s, vint, past_growth, tail)
    else:
        h = np.asarray(history, dtype=float)
        if h.ndim != 1 or h.size == 0 or not np.all(np.isfinite(h)) or np.any(h < 0):
            raise invalid("investment_history", "be a non-empty list of finite numbers >= 0",
                          history)
        top = float(h.max())
        vint = (h / top if top > 0 else h)[::-1]
    full = np.zeros(vint.size + horizon)
    m = min(full.size, s.size)
    full[:m] = s[:m]
    stock = np.correlate(full, vint, mode="valid")  # stock[t] = Σ_a S(a+t) vint[a]
    if not stock[0] > 0:
        raise invalid("investment_history", "leave a positive stock in service in year 0",
                      history)
    out = stock / stock[0]
    if not np.all(np.isfinite(out)):  # cannot happen with scaled weights; never pass NaN on
        raise invalid("past_growth", "give a finite survival of today's stock", past_growth)
    return out


def _check_age_sum(s: np.ndarray, vint: np.ndarray, g0: float, tail: float) -> None:
    """Refuse a steady-state age sum that diverges or depends on the profile's cut."""
    q = 1.0 / (1.0 + g0)
    why = ("so the steady-state age sum Σ S(a)(1+past_growth)^-a converges")
    if tail * q >= 1.0:
        rule = ("be >= 0 with this retirement profile (its tail falls slower than any "
                f"geometric rate), {why}" if tail >= 1.0 else
                f"be > {tail - 1.0:.6g} with this retirement profile (its tail falls by "
                f"the factor {tail:.6g} a year), {why}")
        raise invalid("past_growth", rule, g0)
    terms = s * vint
    total = float(terms.sum())
    last = max(tail, s[-1] / s[-2] if s.size >= 2 and s[-2] > 0 else 0.0) * q
    if last >= 1.0 or not total > 0:
        rest = math.inf
    else:
        rest = float(terms[-1]) * last / (1.0 - last)
    if rest > TRUNCATION_TOL * total:
        raise invalid("past_growth", "be high enough that the steady-state age sum "
                      "Σ S(a)(1+past_growth)^-a does not depend on where the profile is cut "
                      f"(the ages beyond the cut would add more than {TRUNCATION_TOL:g} "
                      "of it)", g0)


def perpetual_inventory(
    investment: np.ndarray, s: np.ndarray, *, lead_time: int = 1
) -> np.ndarray:
    """Capital stock by the perpetual inventory method.

    ``K_t = Σ_{a ≥ 0} S(a) I_{t-θ-a}``: investment of year ``τ`` enters
    service in year ``τ + θ`` at age 0. With ``θ = 1`` and the geometric
    profile this is ``K_{t+1} = (1 − δ) K_t + I_t``.

    Parameters
    ----------
    investment : array_like
        Investment (capacity started) per year, oldest first.
    s : numpy.ndarray
        Survival profile.
    lead_time : int, default 1
        Years from investment to service.

    Returns
    -------
    numpy.ndarray
        ``K_t`` for the same years as ``investment``.
    """
    if not (int(lead_time) == lead_time and 0 <= lead_time <= MAX_LEAD_TIME):
        raise invalid("lead_time", f"be a whole number of years in [0, {MAX_LEAD_TIME}]",
                      lead_time)
    lead_time = int(lead_time)
    inv = np.asarray(investment, dtype=float)
    if inv.ndim != 1 or not np.all(np.isfinite(inv)):
        raise invalid("investment", "be a 1-dimensional list of finite numbers", investment)
    shifted = np.concatenate([np.zeros(lead_time), inv])[: inv.size]
    top = float(np.max(np.abs(shifted))) if shifted.size else 0.0
    if top == 0:
        return np.zeros(inv.size)
    with np.errstate(over="ignore", invalid="ignore"):  # summed scaled, then checked
        stock = np.convolve(shifted / top, s)[: inv.size] * top
    if not np.all(np.isfinite(stock)):
        raise invalid("investment", "keep the perpetual-inventory stock finite (the surviving "
                      "sum of its vintages overflows)", investment)
    return stock

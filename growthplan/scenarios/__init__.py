"""Many plans at once: sweeps of variants (:mod:`.sweep`), uncertain
coefficients with stress tests, re-optimisation and robust plans
(:mod:`.uncertainty`), and rolling revision against actuals (:mod:`.revision`)."""

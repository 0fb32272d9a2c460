"""Many plans at once: sweeps of variants (:mod:`.sweep`), uncertain
coefficients with stress tests, re-optimisation and robust plans
(:mod:`.uncertainty`), rolling revision against actuals (:mod:`.revision`) and the
marginal abatement curve of an emission limit (:mod:`.abatement`)."""

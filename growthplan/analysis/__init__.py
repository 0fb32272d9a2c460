"""Steady-state analysis without a plan: balanced growth and the Leontief
inverse (:mod:`.steady`), the von Neumann expanding economy (:mod:`.expanding`),
the choice of techniques (:mod:`.choice`), emissions in the steady state
(:mod:`.footprint`) and the figures of several regions (:mod:`.regions`)."""

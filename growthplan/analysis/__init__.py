"""Steady-state analysis without a plan: balanced growth and the Leontief
inverse (:mod:`.steady`), the von Neumann expanding economy (:mod:`.expanding`)
and the choice of techniques (:mod:`.choice`)."""

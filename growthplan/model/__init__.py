"""What the analyst states: the economy, capital and its service lives, series,
techniques, the plan and its objectives, and the validation they share.

Nothing here imports the pipeline at module level: a :class:`Plan` hands itself
to :mod:`growthplan.solve` only when one of its methods that solve is called.
"""

"""The time course in three rooms: :mod:`.model` builds it, :mod:`.solve` integrates it, :mod:`.summary` reads it.

:func:`interact.dynamic.simulate` runs the three in turn; the model and its assumptions are described there.
"""

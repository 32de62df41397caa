"""In vitro kinetics: inhibition constants from incubations, and their conversion.

``conversion`` holds the Cheng-Prusoff relations and the unbound correction
used by the engine.  Fitting lives in sibling modules.
"""

from .conversion import CHENG_PRUSOFF_SOURCE, ki_from_ic50, unbound

__all__ = ["CHENG_PRUSOFF_SOURCE", "ki_from_ic50", "unbound"]
